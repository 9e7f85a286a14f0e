#pragma once
// A minimal SVG line plot with logarithmic axes, for the study's delay-versus-change figure: one or more
// panels side by side, each with its own x axis and a shared logarithmic y axis, one polyline with
// markers per series, and a legend. No dependencies; the output is plain SVG 1.1.
#include <string>
#include <vector>

namespace rigcal::study {

struct SvgSeries {
  std::string label;
  std::string colour;  // any SVG colour, e.g. "#1f77b4"
  std::vector<double> x, y;  // points with y <= 0 or non-finite are skipped (no finite delay)
};

struct SvgPanel {
  std::string title;
  std::string x_label;
  bool log_x = true;
  std::vector<SvgSeries> series;
};

struct SvgFigure {
  std::string title;
  std::string y_label;
  std::vector<SvgPanel> panels;
  double panel_width = 360, panel_height = 300;  // plot area of one panel, px
};

// The whole document. The y range covers every series' points, widened to whole decades.
std::string render_svg(const SvgFigure& figure);

// Escapes &, <, >, " for text and attribute values.
std::string svg_escape(const std::string& text);

// Decades [lo, hi] (powers of ten) that cover the positive finite values; {1, 10} when there are none.
struct LogRange {
  double lo = 1, hi = 10;
};
LogRange covering_decades(const std::vector<double>& values);

}  // namespace rigcal::study
