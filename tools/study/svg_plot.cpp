#include "svg_plot.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

namespace rigcal::study {

namespace {

constexpr double margin_left = 70, margin_right = 20, margin_top = 50, margin_bottom = 55, gap = 40;
constexpr double legend_width = 280;

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f", v);
  return buf;
}

std::string tick_label(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

bool usable(double v) { return std::isfinite(v) && v > 0; }

// Maps a data value to a pixel coordinate on [p0, p1] (p1 may be below p0: the y axis points up).
struct Axis {
  double lo, hi;
  bool log;
  double p0, p1;
  double map(double v) const {
    const double f = log ? (std::log10(v) - std::log10(lo)) / (std::log10(hi) - std::log10(lo)) : (v - lo) / (hi - lo);
    return p0 + f * (p1 - p0);
  }
};

Axis x_axis_of(const SvgPanel& panel, double left, double width) {
  std::vector<double> xs;
  for (const auto& s : panel.series) xs.insert(xs.end(), s.x.begin(), s.x.end());
  double lo = 1, hi = 10;
  if (!xs.empty()) {
    lo = *std::min_element(xs.begin(), xs.end());
    hi = *std::max_element(xs.begin(), xs.end());
  }
  if (panel.log_x) {
    // A tenth of a decade of room either side, so end markers are not cut.
    lo = lo > 0 ? lo / std::pow(10.0, 0.1) : 1;
    hi = hi > lo ? hi * std::pow(10.0, 0.1) : lo * 10;
  } else {
    const double pad = hi > lo ? 0.05 * (hi - lo) : 1;
    lo -= pad;
    hi += pad;
  }
  return {lo, hi, panel.log_x, left, left + width};
}

void draw_x_ticks(std::ostringstream& o, const SvgPanel& panel, const Axis& x, double bottom) {
  std::vector<double> ticks;
  for (const auto& s : panel.series)
    for (double v : s.x)
      if (std::find(ticks.begin(), ticks.end(), v) == ticks.end()) ticks.push_back(v);
  for (double v : ticks) {
    const double px = x.map(v);
    o << "<line x1=\"" << num(px) << "\" y1=\"" << num(bottom) << "\" x2=\"" << num(px) << "\" y2=\""
      << num(bottom + 5) << "\" stroke=\"#333\"/>\n";
    o << "<text x=\"" << num(px) << "\" y=\"" << num(bottom + 18) << "\" text-anchor=\"middle\">"
      << tick_label(v) << "</text>\n";
  }
}

void draw_y_grid(std::ostringstream& o, const Axis& y, double left, double width) {
  for (double d = y.lo; d <= y.hi * 1.0001; d *= 10) {
    const double py = y.map(d);
    o << "<line x1=\"" << num(left) << "\" y1=\"" << num(py) << "\" x2=\"" << num(left + width) << "\" y2=\""
      << num(py) << "\" stroke=\"#ddd\"/>\n";
    o << "<text x=\"" << num(left - 6) << "\" y=\"" << num(py + 4) << "\" text-anchor=\"end\">" << tick_label(d)
      << "</text>\n";
    for (int m = 2; m < 10 && d * m < y.hi; ++m) {
      const double pm = y.map(d * m);
      o << "<line x1=\"" << num(left) << "\" y1=\"" << num(pm) << "\" x2=\"" << num(left + 4) << "\" y2=\""
        << num(pm) << "\" stroke=\"#999\"/>\n";
    }
  }
}

void draw_series(std::ostringstream& o, const SvgSeries& s, const Axis& x, const Axis& y) {
  std::string points;
  for (std::size_t i = 0; i < s.x.size() && i < s.y.size(); ++i) {
    if (!usable(s.y[i]) || (x.log && !usable(s.x[i]))) continue;
    points += num(x.map(s.x[i])) + "," + num(y.map(s.y[i])) + " ";
    o << "<circle cx=\"" << num(x.map(s.x[i])) << "\" cy=\"" << num(y.map(s.y[i])) << "\" r=\"3.5\" fill=\""
      << svg_escape(s.colour) << "\"/>\n";
  }
  if (!points.empty())
    o << "<polyline points=\"" << points << "\" fill=\"none\" stroke=\"" << svg_escape(s.colour)
      << "\" stroke-width=\"1.8\"/>\n";
}

void draw_panel(std::ostringstream& o, const SvgPanel& panel, const Axis& y, double left, double width,
                double height) {
  const double bottom = margin_top + height;
  const Axis x = x_axis_of(panel, left, width);
  o << "<rect x=\"" << num(left) << "\" y=\"" << num(margin_top) << "\" width=\"" << num(width) << "\" height=\""
    << num(height) << "\" fill=\"none\" stroke=\"#333\"/>\n";
  draw_y_grid(o, y, left, width);
  draw_x_ticks(o, panel, x, bottom);
  o << "<text x=\"" << num(left + width / 2) << "\" y=\"" << num(margin_top - 10)
    << "\" text-anchor=\"middle\" font-weight=\"bold\">" << svg_escape(panel.title) << "</text>\n";
  o << "<text x=\"" << num(left + width / 2) << "\" y=\"" << num(bottom + 40) << "\" text-anchor=\"middle\">"
    << svg_escape(panel.x_label) << "</text>\n";
  for (const auto& s : panel.series) draw_series(o, s, x, y);
}

void draw_legend(std::ostringstream& o, const SvgFigure& f, double left) {
  if (f.panels.empty()) return;
  double y = margin_top + 10;
  for (const auto& s : f.panels.front().series) {
    o << "<line x1=\"" << num(left) << "\" y1=\"" << num(y) << "\" x2=\"" << num(left + 24) << "\" y2=\"" << num(y)
      << "\" stroke=\"" << svg_escape(s.colour) << "\" stroke-width=\"2\"/>\n";
    o << "<circle cx=\"" << num(left + 12) << "\" cy=\"" << num(y) << "\" r=\"3.5\" fill=\"" << svg_escape(s.colour)
      << "\"/>\n";
    o << "<text x=\"" << num(left + 30) << "\" y=\"" << num(y + 4) << "\">" << svg_escape(s.label) << "</text>\n";
    y += 20;
  }
}

}  // namespace

std::string svg_escape(const std::string& text) {
  std::string out;
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      default: out += c;
    }
  }
  return out;
}

LogRange covering_decades(const std::vector<double>& values) {
  double lo = INFINITY, hi = -INFINITY;
  for (double v : values) {
    if (!usable(v)) continue;
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  if (!std::isfinite(lo)) return {};
  LogRange r{std::pow(10.0, std::floor(std::log10(lo))), std::pow(10.0, std::ceil(std::log10(hi)))};
  if (r.hi <= r.lo) r.hi = r.lo * 10;
  return r;
}

std::string render_svg(const SvgFigure& f) {
  std::vector<double> ys;
  for (const auto& p : f.panels)
    for (const auto& s : p.series) ys.insert(ys.end(), s.y.begin(), s.y.end());
  const LogRange yr = covering_decades(ys);
  const double n = static_cast<double>(f.panels.size());
  const double width = margin_left + n * f.panel_width + (n - 1) * gap + margin_right + legend_width;
  const double height = margin_top + f.panel_height + margin_bottom;
  const Axis y{yr.lo, yr.hi, true, margin_top + f.panel_height, margin_top};
  std::ostringstream o;
  o << "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
    << "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"" << num(width) << "\" height=\""
    << num(height + 20) << "\" font-family=\"sans-serif\" font-size=\"12\">\n"
    << "<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n"
    << "<text x=\"" << num(width / 2) << "\" y=\"20\" text-anchor=\"middle\" font-size=\"15\">" << svg_escape(f.title)
    << "</text>\n"
    << "<text transform=\"translate(18," << num(margin_top + f.panel_height / 2)
    << ") rotate(-90)\" text-anchor=\"middle\">" << svg_escape(f.y_label) << "</text>\n";
  double left = margin_left;
  for (const auto& p : f.panels) {
    draw_panel(o, p, y, left, f.panel_width, f.panel_height);
    left += f.panel_width + gap;
  }
  draw_legend(o, f, left - gap + 20);
  o << "</svg>\n";
  return o.str();
}

}  // namespace rigcal::study
