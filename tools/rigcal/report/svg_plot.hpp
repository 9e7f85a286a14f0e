#pragma once
// A small builder of static SVG plots for the calibration report: two axes with nice ticks and
// labelled units, a grid, a legend, and series drawn as polylines, filled bands, closed polygons,
// markers (with optional error bars) and horizontal reference lines.
//
// Every series carries the numbers it draws as data attributes (exact_number text), so that a
// reader of the page (a test, another tool) can check what is plotted without reversing the pixel
// mapping:
//   line     data-x, data-y           band     data-x, data-lo, data-hi
//   polygon  data-x, data-y           hline    data-y
//   points   one <circle> per point with data-x, data-y (and data-u, the error bar's half length)
// and the root <svg> states its mapping: data-x-scale (linear|log10|time), data-x-domain "lo hi",
// data-x-pixels "p0 p1" and the same for y, so that pixel positions can be checked too.
//
// Non-finite values are left out of lines, polygons and points (and of the axis extent). Lines, bands
// and polygons are clipped to the plot area; markers are not, so that a point on the frame stays whole.
// The output is well-formed XML (an <svg> element with the SVG namespace): usable inline in HTML5 or
// on its own.
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "scale.hpp"
#include "ticks.hpp"

namespace rigcal::report {

struct Style {
  std::string stroke = "none";  // colour, or "none"
  std::string fill = "none";
  double stroke_width = 1.5;
  std::string dash;  // stroke-dasharray; empty for a solid line
  double fill_opacity = 1;
  double marker_radius = 3;
};

// Extra attributes of a series' element, e.g. {"data-b0", exact_number(b0)}. Values are escaped on
// output; names must be valid attribute names (the caller's constants).
using Attributes = std::vector<std::pair<std::string, std::string>>;

struct AxisSpec {
  AxisSpec(std::string label_text = {}, ScaleKind kind = ScaleKind::linear)  // NOLINT(google-explicit-constructor)
      : label(std::move(label_text)), scale(kind) {}
  std::string label;  // with units, e.g. "reference value (degC)"
  ScaleKind scale;
  bool time_utc = false;      // values are seconds since 1970-01-01T00:00:00Z, ticks in UTC
  bool include_zero = false;  // widen the extent to include 0 (linear axes)
  double pad_fraction = 0;    // widen the data's extent by this fraction of its span on each side
  std::optional<double> min, max;  // fixed ends instead of the data's extent (then widened to ticks)
};

class SvgPlot {
 public:
  // id: unique in the page, [A-Za-z0-9-]; description: the plot's accessible title.
  SvgPlot(std::string id, std::string description, AxisSpec x, AxisSpec y);

  void set_size(double width_px, double height_px);

  void add_line(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> y,
                Style style, Attributes attributes = {});
  // The region between lo(x) and hi(x), filled. REQUIRES: x, lo, hi of equal size.
  void add_band(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> lo,
                std::vector<double> hi, Style style, Attributes attributes = {});
  // A closed outline (an ellipse, a rectangle) through the given vertices.
  void add_polygon(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> y,
                   Style style, Attributes attributes = {});
  // Markers; half_bar, when given (same size as y), draws a vertical error bar y +- half_bar.
  void add_points(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> y,
                  Style style, Attributes attributes = {}, std::vector<double> half_bar = {});
  void add_hline(std::string css_class, std::string legend, double y, Style style, Attributes attributes = {});

  std::string render() const;

 private:
  enum class Kind { line, band, polygon, points, hline };
  struct Series {
    Kind kind;
    std::string css_class, legend;
    std::vector<double> x, y, y2;  // y2: band hi, or the error-bar half lengths of points
    Style style;
    Attributes attributes;
  };
  struct Layout;

  TickSet axis_ticks(const AxisSpec& axis, double lo, double hi) const;
  void extent(double& x_lo, double& x_hi, double& y_lo, double& y_hi) const;
  std::string render_series(const Series& s, const Scale& sx, const Scale& sy) const;
  std::string render_legend(double left, double top, double width) const;
  double legend_height(double width) const;

  std::string id_, description_;
  AxisSpec x_axis_, y_axis_;
  double width_ = 760, height_ = 380;
  std::vector<Series> series_;
};

}  // namespace rigcal::report
