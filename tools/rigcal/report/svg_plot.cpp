#include "svg_plot.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <limits>
#include <tuple>

#include "html_text.hpp"

namespace rigcal::report {

namespace {

constexpr double font_px = 12;
constexpr double char_px = 6.8;  // mean advance of a 12 px sans-serif character, for layout estimates
constexpr double legend_row_px = 18;
constexpr double legend_swatch_px = 26;
constexpr const char* axis_colour = "#3b4650";
constexpr const char* grid_colour = "#dfe5ea";
constexpr const char* minor_grid_colour = "#eef1f4";

std::string px(double v) { return fmt::format("{:.2f}", v); }

std::string attr(std::string_view name, std::string_view value) {
  return fmt::format(" {}=\"{}\"", name, escape_html(value));
}

std::string style_attributes(const Style& s) {
  std::string out = attr("stroke", s.stroke) + attr("fill", s.fill);
  if (s.stroke != "none") out += attr("stroke-width", px(s.stroke_width));
  if (!s.dash.empty()) out += attr("stroke-dasharray", s.dash);
  if (s.fill != "none" && s.fill_opacity < 1) out += attr("fill-opacity", fmt::format("{:.3g}", s.fill_opacity));
  return out;
}

std::string extra_attributes(const Attributes& a) {
  std::string out;
  for (const auto& [name, value] : a) out += attr(name, value);
  return out;
}

double text_width(std::string_view s) {
  // Count code points, not bytes: superscripts and symbols are one character each.
  double n = 0;
  for (char c : s)
    if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) n += 1;
  return n * char_px;
}

void widen(double v, double& lo, double& hi) {
  if (!std::isfinite(v)) return;
  lo = std::min(lo, v);
  hi = std::max(hi, v);
}

std::string points_text(const std::vector<double>& x, const std::vector<double>& y, const Scale& sx,
                        const Scale& sy) {
  std::string out;
  for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
    if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
    if (sx.kind() == ScaleKind::log10 && !(x[i] > 0)) continue;
    if (!out.empty()) out += ' ';
    out += px(sx.to_pixel(x[i])) + "," + px(sy.to_pixel(y[i]));
  }
  return out;
}

const char* scale_name(const AxisSpec& a) {
  if (a.time_utc) return "time";
  return a.scale == ScaleKind::log10 ? "log10" : "linear";
}

}  // namespace

struct SvgPlot::Layout {
  double left = 0, right = 0, top = 0, bottom = 0;  // the plot area, pixels
};

SvgPlot::SvgPlot(std::string id, std::string description, AxisSpec x, AxisSpec y)
    : id_(std::move(id)), description_(std::move(description)), x_axis_(std::move(x)), y_axis_(std::move(y)) {}

void SvgPlot::set_size(double width_px, double height_px) {
  width_ = width_px;
  height_ = height_px;
}

void SvgPlot::add_line(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> y,
                       Style style, Attributes attributes) {
  series_.push_back({Kind::line, std::move(css_class), std::move(legend), std::move(x), std::move(y), {},
                     std::move(style), std::move(attributes)});
}

void SvgPlot::add_band(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> lo,
                       std::vector<double> hi, Style style, Attributes attributes) {
  series_.push_back({Kind::band, std::move(css_class), std::move(legend), std::move(x), std::move(lo),
                     std::move(hi), std::move(style), std::move(attributes)});
}

void SvgPlot::add_polygon(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> y,
                          Style style, Attributes attributes) {
  series_.push_back({Kind::polygon, std::move(css_class), std::move(legend), std::move(x), std::move(y), {},
                     std::move(style), std::move(attributes)});
}

void SvgPlot::add_points(std::string css_class, std::string legend, std::vector<double> x, std::vector<double> y,
                         Style style, Attributes attributes, std::vector<double> half_bar) {
  series_.push_back({Kind::points, std::move(css_class), std::move(legend), std::move(x), std::move(y),
                     std::move(half_bar), std::move(style), std::move(attributes)});
}

void SvgPlot::add_hline(std::string css_class, std::string legend, double y, Style style, Attributes attributes) {
  series_.push_back(
      {Kind::hline, std::move(css_class), std::move(legend), {}, {y}, {}, std::move(style), std::move(attributes)});
}

void SvgPlot::extent(double& x_lo, double& x_hi, double& y_lo, double& y_hi) const {
  constexpr double inf = std::numeric_limits<double>::infinity();
  x_lo = y_lo = inf;
  x_hi = y_hi = -inf;
  const bool x_log = x_axis_.scale == ScaleKind::log10, y_log = y_axis_.scale == ScaleKind::log10;
  for (const Series& s : series_) {
    for (std::size_t i = 0; i < s.y.size(); ++i) {
      const double x = i < s.x.size() ? s.x[i] : std::numeric_limits<double>::quiet_NaN();
      if (s.kind != Kind::hline && !(std::isfinite(x) && (!x_log || x > 0))) continue;
      if (s.kind != Kind::hline) widen(x, x_lo, x_hi);
      const double bar = s.kind == Kind::points && i < s.y2.size() ? s.y2[i] : 0.0;
      const double top = s.kind == Kind::band ? s.y2[i] : s.y[i] + bar;
      for (double y : {s.y[i] - bar, top})
        if (!y_log || y > 0) widen(y, y_lo, y_hi);
    }
  }
  if (x_axis_.include_zero) widen(0, x_lo, x_hi);
  if (y_axis_.include_zero) widen(0, y_lo, y_hi);
  for (auto [axis, lo, hi] : {std::tuple{&x_axis_, &x_lo, &x_hi}, std::tuple{&y_axis_, &y_lo, &y_hi}}) {
    const double pad = axis->pad_fraction * (*hi - *lo);
    if (axis->scale == ScaleKind::linear && std::isfinite(pad) && pad > 0) {
      *lo -= pad;
      *hi += pad;
    }
  }
  if (x_axis_.min) x_lo = *x_axis_.min;
  if (x_axis_.max) x_hi = *x_axis_.max;
  if (y_axis_.min) y_lo = *y_axis_.min;
  if (y_axis_.max) y_hi = *y_axis_.max;
  if (!std::isfinite(x_lo)) x_lo = x_hi = x_log ? 1.0 : 0.0;  // nothing to plot: still draw the axes
  if (!std::isfinite(y_lo)) y_lo = y_hi = y_log ? 1.0 : 0.0;
}

TickSet SvgPlot::axis_ticks(const AxisSpec& axis, double lo, double hi) const {
  if (axis.time_utc) return time_ticks(lo, hi);
  if (axis.scale == ScaleKind::log10) return log10_ticks(lo, hi);
  return linear_ticks(lo, hi);
}

double SvgPlot::legend_height(double width) const {
  double row = 0;
  int rows = 0;
  for (const Series& s : series_) {
    if (s.legend.empty()) continue;
    const double w = legend_swatch_px + 8 + text_width(s.legend) + 18;
    if (rows == 0 || row + w > width) {
      ++rows;
      row = 0;
    }
    row += w;
  }
  return rows * legend_row_px;
}

std::string SvgPlot::render_legend(double left, double top, double width) const {
  std::string out = "<g class=\"legend\"" + attr("font-size", px(font_px)) + ">";
  double x = 0, y = top - legend_row_px;
  bool first = true;
  for (const Series& s : series_) {
    if (s.legend.empty()) continue;
    const double w = legend_swatch_px + 8 + text_width(s.legend) + 18;
    if (first || x + w > width) {
      x = 0;
      y += legend_row_px;
      first = false;
    }
    const double sx = left + x, cy = y + legend_row_px / 2;
    out += "<g class=\"legend-entry\">";
    if (s.kind == Kind::band || (s.kind == Kind::polygon && s.style.fill != "none")) {
      out += "<rect" + attr("x", px(sx)) + attr("y", px(cy - 6)) + attr("width", px(legend_swatch_px)) +
             attr("height", "12") + style_attributes(s.style) + "/>";
    } else if (s.kind == Kind::points) {
      out += "<circle" + attr("cx", px(sx + legend_swatch_px / 2)) + attr("cy", px(cy)) +
             attr("r", px(s.style.marker_radius)) + style_attributes(s.style) + "/>";
    } else {
      out += "<line" + attr("x1", px(sx)) + attr("y1", px(cy)) + attr("x2", px(sx + legend_swatch_px)) +
             attr("y2", px(cy)) + style_attributes(s.style) + "/>";
    }
    out += "<text" + attr("x", px(sx + legend_swatch_px + 6)) + attr("y", px(cy + 4)) + attr("fill", axis_colour) +
           ">" + escape_html(s.legend) + "</text></g>";
    x += w;
  }
  return out + "</g>";
}

std::string SvgPlot::render_series(const Series& s, const Scale& sx, const Scale& sy) const {
  const std::string common = attr("class", s.css_class) + style_attributes(s.style) + extra_attributes(s.attributes);
  switch (s.kind) {
    case Kind::line:
      return "<polyline" + common + attr("points", points_text(s.x, s.y, sx, sy)) +
             attr("data-x", exact_number_list(s.x)) + attr("data-y", exact_number_list(s.y)) + "/>";
    case Kind::polygon:
      return "<polygon" + common + attr("points", points_text(s.x, s.y, sx, sy)) +
             attr("data-x", exact_number_list(s.x)) + attr("data-y", exact_number_list(s.y)) + "/>";
    case Kind::band: {
      std::vector<double> x(s.x), y(s.y2);
      x.insert(x.end(), s.x.rbegin(), s.x.rend());
      y.insert(y.end(), s.y.rbegin(), s.y.rend());
      return "<polygon" + common + attr("points", points_text(x, y, sx, sy)) + attr("data-x", exact_number_list(s.x)) +
             attr("data-lo", exact_number_list(s.y)) + attr("data-hi", exact_number_list(s.y2)) + "/>";
    }
    case Kind::hline: {
      const double y = sy.to_pixel(s.y.at(0));
      return "<line" + common + attr("x1", px(sx.p0())) + attr("x2", px(sx.p1())) + attr("y1", px(y)) +
             attr("y2", px(y)) + attr("data-y", exact_number(s.y.at(0))) + "/>";
    }
    case Kind::points: {
      std::string out = "<g" + common + attr("data-count", std::to_string(s.x.size())) + ">";
      for (std::size_t i = 0; i < s.x.size() && i < s.y.size(); ++i) {
        if (!std::isfinite(s.x[i]) || !std::isfinite(s.y[i])) continue;
        const double cx = sx.to_pixel(s.x[i]), cy = sy.to_pixel(s.y[i]);
        const bool bar = i < s.y2.size();
        if (bar) {
          out += "<line class=\"error-bar\"" + attr("x1", px(cx)) + attr("x2", px(cx)) +
                 attr("y1", px(sy.to_pixel(s.y[i] - s.y2[i]))) + attr("y2", px(sy.to_pixel(s.y[i] + s.y2[i]))) + "/>";
        }
        out += "<circle" + attr("cx", px(cx)) + attr("cy", px(cy)) + attr("r", px(s.style.marker_radius)) +
               attr("data-x", exact_number(s.x[i])) + attr("data-y", exact_number(s.y[i])) +
               (bar ? attr("data-u", exact_number(s.y2[i])) : std::string()) + "/>";
      }
      return out + "</g>";
    }
  }
  return {};
}

std::string SvgPlot::render() const {
  double x_lo = 0, x_hi = 0, y_lo = 0, y_hi = 0;
  extent(x_lo, x_hi, y_lo, y_hi);
  const TickSet xt = axis_ticks(x_axis_, x_lo, x_hi);
  const TickSet yt = axis_ticks(y_axis_, y_lo, y_hi);

  // Layout: the legend on top, y tick labels sized to the longest one, the axis titles outside.
  double y_label_px = 0;
  for (const Tick& t : yt.ticks) y_label_px = std::max(y_label_px, text_width(t.label));
  Layout l;
  l.left = 12 + font_px + 10 + y_label_px + 8;
  l.right = width_ - 18;
  const double legend_px = legend_height(l.right - l.left);
  l.top = 10 + legend_px + (legend_px > 0 ? 10 : 0);
  l.bottom = height_ - (12 + font_px + 10 + font_px + 6);
  const Scale sx(x_axis_.scale, xt.lo, xt.hi, l.left, l.right);
  const Scale sy(y_axis_.scale, yt.lo, yt.hi, l.bottom, l.top);

  std::string out = "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"plot\"" + attr("id", id_) +
                    attr("viewBox", fmt::format("0 0 {} {}", px(width_), px(height_))) + attr("width", px(width_)) +
                    attr("height", px(height_)) + " role=\"img\"" + attr("aria-labelledby", id_ + "-title") +
                    attr("font-family", "sans-serif") + attr("data-x-scale", scale_name(x_axis_)) +
                    attr("data-x-domain", exact_number(xt.lo) + " " + exact_number(xt.hi)) +
                    attr("data-x-pixels", exact_number(l.left) + " " + exact_number(l.right)) +
                    attr("data-y-scale", scale_name(y_axis_)) +
                    attr("data-y-domain", exact_number(yt.lo) + " " + exact_number(yt.hi)) +
                    attr("data-y-pixels", exact_number(l.bottom) + " " + exact_number(l.top)) + ">";
  out += "<title" + attr("id", id_ + "-title") + ">" + escape_html(description_) + "</title>";
  out += "<defs><clipPath" + attr("id", id_ + "-clip") + "><rect" + attr("x", px(l.left)) + attr("y", px(l.top)) +
         attr("width", px(l.right - l.left)) + attr("height", px(l.bottom - l.top)) + "/></clipPath></defs>";
  out += "<rect class=\"plot-area\"" + attr("x", px(l.left)) + attr("y", px(l.top)) +
         attr("width", px(l.right - l.left)) + attr("height", px(l.bottom - l.top)) + " fill=\"#ffffff\"/>";

  // Grid and ticks.
  out += "<g class=\"grid\" stroke-width=\"1\">";
  for (const Tick& t : xt.ticks) {
    const double x = sx.to_pixel(t.value);
    out += "<line" + attr("x1", px(x)) + attr("x2", px(x)) + attr("y1", px(l.top)) + attr("y2", px(l.bottom)) +
           attr("stroke", t.major ? grid_colour : minor_grid_colour) + "/>";
  }
  for (const Tick& t : yt.ticks) {
    const double y = sy.to_pixel(t.value);
    out += "<line" + attr("x1", px(l.left)) + attr("x2", px(l.right)) + attr("y1", px(y)) + attr("y2", px(y)) +
           attr("stroke", t.major ? grid_colour : minor_grid_colour) + "/>";
  }
  out += "</g>";

  out += "<g class=\"series\"" + attr("clip-path", "url(#" + id_ + "-clip)") + ">";
  for (const Series& s : series_)
    if (s.kind != Kind::points) out += render_series(s, sx, sy);
  out += "</g><g class=\"markers\">";
  for (const Series& s : series_)
    if (s.kind == Kind::points) out += render_series(s, sx, sy);
  out += "</g>";

  // Axes, tick labels and titles on top of the data.
  out += "<g class=\"axes\"" + attr("font-size", px(font_px)) + attr("fill", axis_colour) + ">";
  out += "<rect" + attr("x", px(l.left)) + attr("y", px(l.top)) + attr("width", px(l.right - l.left)) +
         attr("height", px(l.bottom - l.top)) + attr("fill", "none") + attr("stroke", axis_colour) + "/>";
  for (const Tick& t : xt.ticks) {
    if (!t.major) continue;
    const double x = sx.to_pixel(t.value);
    out += "<line" + attr("x1", px(x)) + attr("x2", px(x)) + attr("y1", px(l.bottom)) + attr("y2", px(l.bottom + 5)) +
           attr("stroke", axis_colour) + "/>";
    // A label at either end of the axis is kept inside the picture rather than centred on its tick.
    const double half = 0.5 * text_width(t.label);
    const double lx = std::clamp(x, half + 2, width_ - half - 2);
    out += "<text class=\"tick-label x-tick\"" + attr("x", px(lx)) + attr("y", px(l.bottom + 5 + font_px + 2)) +
           " text-anchor=\"middle\"" + attr("data-value", exact_number(t.value)) + ">" + escape_html(t.label) +
           "</text>";
  }
  for (const Tick& t : yt.ticks) {
    if (!t.major) continue;
    const double y = sy.to_pixel(t.value);
    out += "<line" + attr("x1", px(l.left - 5)) + attr("x2", px(l.left)) + attr("y1", px(y)) + attr("y2", px(y)) +
           attr("stroke", axis_colour) + "/>";
    out += "<text class=\"tick-label y-tick\"" + attr("x", px(l.left - 8)) + attr("y", px(y + 4)) +
           " text-anchor=\"end\"" + attr("data-value", exact_number(t.value)) + ">" + escape_html(t.label) + "</text>";
  }
  out += "<text class=\"axis-label x-label\"" + attr("x", px(0.5 * (l.left + l.right))) +
         attr("y", px(height_ - 10)) + " text-anchor=\"middle\">" + escape_html(x_axis_.label) + "</text>";
  const double ly = 0.5 * (l.top + l.bottom);
  out += "<text class=\"axis-label y-label\"" + attr("x", px(12 + font_px)) + attr("y", px(ly)) +
         " text-anchor=\"middle\"" + attr("transform", fmt::format("rotate(-90 {} {})", px(12 + font_px), px(ly))) +
         ">" + escape_html(y_axis_.label) + "</text>";
  out += "</g>";
  if (legend_px > 0) out += render_legend(l.left, 10, l.right - l.left);
  return out + "</svg>";
}

}  // namespace rigcal::report
