#include "report_plots.hpp"

#include <cmath>
#include <fmt/format.h>
#include <numbers>

#include "html_text.hpp"
#include "svg_plot.hpp"

namespace rigcal::report {

namespace {

// The report's own palette: slate data, teal fit, burnt-orange certificate, red limits.
namespace colour {
constexpr const char* data = "#24313d";
constexpr const char* fit = "#0b6e69";
constexpr const char* band_confidence = "#0b6e69";
constexpr const char* band_prediction = "#8cc4bf";
constexpr const char* certified = "#b5532a";
constexpr const char* york = "#5b4a8b";
constexpr const char* limit = "#b3261e";
constexpr const char* secondary = "#8a6d1f";
constexpr const char* neutral = "#7a8691";
}  // namespace colour

Style line_style(const char* c, double width = 2, std::string dash = "") {
  Style s;
  s.stroke = c;
  s.stroke_width = width;
  s.dash = std::move(dash);
  return s;
}

Style fill_style(const char* c, double opacity) {
  Style s;
  s.fill = c;
  s.fill_opacity = opacity;
  return s;
}

Style marker_style(const char* c, double radius = 3) {
  Style s;
  s.fill = c;
  s.stroke = c;
  s.stroke_width = 1;
  s.marker_radius = radius;
  return s;
}

std::string with_units(const std::string& what, const std::string& units) {
  return units.empty() ? what : what + " (" + units + ")";
}

AxisSpec axis(std::string label, ScaleKind kind = ScaleKind::linear) { return AxisSpec(std::move(label), kind); }

std::string confidence_words(const Report& r) { return percent_label(r.options.confidence); }

// x positions of the band samples, and the named edge of each.
std::vector<double> band_x(const Report& r) {
  std::vector<double> x;
  for (const auto& b : r.band) x.push_back(b.x);
  return x;
}

template <class F>
std::vector<double> band_values(const Report& r, F f) {
  std::vector<double> v;
  for (const auto& b : r.band) v.push_back(f(b));
  return v;
}

double certified_at(const stats::CertifiedLine& c, double x) { return c.intercept + c.slope * x; }

void add_bands(SvgPlot& p, const Report& r, bool relative) {
  const double t = r.intervals.t;
  const auto off = [relative](const BandSample& b) { return relative ? b.fit : 0.0; };
  const Attributes common{{"data-confidence", exact_number(r.options.confidence)}, {"data-t", exact_number(t)}};
  p.add_band("prediction-band", "prediction band, " + confidence_words(r) + " (one new reading)", band_x(r),
             band_values(r, [&](const BandSample& b) { return b.prediction.lo - off(b); }),
             band_values(r, [&](const BandSample& b) { return b.prediction.hi - off(b); }),
             fill_style(colour::band_prediction, 0.35), common);
  p.add_band("confidence-band", "confidence band, " + confidence_words(r) + " (the mean line)", band_x(r),
             band_values(r, [&](const BandSample& b) { return b.confidence.lo - off(b); }),
             band_values(r, [&](const BandSample& b) { return b.confidence.hi - off(b); }),
             fill_style(colour::band_confidence, 0.30), common);
}

}  // namespace

Figure calibration_figure(const Report& r) {
  const std::string units = r.labels.units;
  SvgPlot p("plot-calibration", "Calibration data and fitted line",
            axis(with_units(r.labels.reference_name, units)), axis(with_units(r.labels.sensor_name, units)));
  p.set_size(900, 440);
  add_bands(p, r, false);
  const std::vector<double> x = band_x(r);
  const bool line = r.fit.model == stats::Model::line;
  p.add_line("fitted-line", line ? "fitted line y = b0 + b1 x" : "fitted line y = b1 x", x,
             band_values(r, [](const BandSample& b) { return b.fit; }), line_style(colour::fit),
             {{"data-b0", exact_number(r.fit.b0)}, {"data-b1", exact_number(r.fit.b1)}});
  if (const auto& c = r.options.certificate) {
    std::vector<double> y;
    for (double xi : x) y.push_back(certified_at(*c, xi));
    p.add_line("certified-line", "certified line", x, y, line_style(colour::certified, 2, "8 5"),
               {{"data-b0", exact_number(c->intercept)}, {"data-b1", exact_number(c->slope)}});
  }
  if (const auto& york = r.york) {
    std::vector<double> y;
    for (double xi : x) y.push_back(york->predict(xi));
    p.add_line("york-line", "errors-in-variables (York) line", x, y, line_style(colour::york, 2, "2 4"),
               {{"data-a", exact_number(york->a)}, {"data-b", exact_number(york->b)}});
  }
  p.add_points("data-points", "calibration pairs", r.data.x, r.data.y, marker_style(colour::data, 2.6));
  return {"plot-calibration",
          "Figure 1. Calibration pairs, the fitted line with its " + confidence_words(r) +
              " confidence band (where the mean line lies) and prediction band (where one new reading falls), "
              "and the certified line. At this scale the bands may be no wider than the line; Figure 2 shows "
              "them about the fitted line.",
          p.render()};
}

Figure residual_reference_figure(const Report& r) {
  const std::string units = r.labels.units;
  // A little room above and below, so that the outermost residuals and band edges are not on the frame.
  AxisSpec ya = axis(with_units("residual y \u2212 fit", units));
  ya.pad_fraction = 0.04;
  SvgPlot p("plot-residual-reference", "Residuals against the reference value",
            axis(with_units(r.labels.reference_name, units)), ya);
  p.set_size(900, 360);
  add_bands(p, r, true);
  const std::vector<double> x = band_x(r);
  p.add_line("fitted-line-residual", "fitted line (zero residual)", x, std::vector<double>(x.size(), 0.0),
             line_style(colour::fit));
  if (const auto& c = r.options.certificate) {
    std::vector<double> y;
    for (const auto& b : r.band) y.push_back(certified_at(*c, b.x) - b.fit);
    p.add_line("certified-line-residual", "certified line \u2212 fitted line", x, y,
               line_style(colour::certified, 2, "8 5"));
  }
  p.add_points("residuals", "residuals", r.data.x, r.residuals.residuals, marker_style(colour::data, 2.6));
  return {"plot-residual-reference",
          "Figure 2. Residuals against the reference value, with the confidence and prediction bands drawn about "
          "the fitted line (zero) and the certified line's difference from the fitted line. A curve or a funnel "
          "in the residuals means a straight line with constant scatter does not describe the sensor.",
          p.render()};
}

Figure residual_time_figure(const Report& r) {
  const bool timed = !r.data.time_s.empty();
  std::vector<double> x = r.data.time_s;
  if (!timed)
    for (std::size_t i = 0; i < r.data.x.size(); ++i) x.push_back(static_cast<double>(i + 1));
  AxisSpec xa = axis(timed ? "time (UTC)" : "pair order (the data carries no time stamps)");
  xa.time_utc = timed;
  AxisSpec ya = axis(with_units("residual y \u2212 fit", r.labels.units));
  ya.pad_fraction = 0.04;
  SvgPlot p("plot-residual-time", timed ? "Residuals against time" : "Residuals against pair order", xa, ya);
  p.set_size(900, 320);
  const double ts = r.intervals.t * r.fit.s;
  p.add_hline("residual-zero", "fitted line (zero residual)", 0.0, line_style(colour::fit));
  p.add_hline("residual-limit", "\u00b1 t\u00b7s (" + confidence_words(r) + ", unit weight)", ts,
              line_style(colour::neutral, 1.2, "4 4"), {{"data-t", exact_number(r.intervals.t)}});
  p.add_hline("residual-limit", "", -ts, line_style(colour::neutral, 1.2, "4 4"));
  p.add_points("residuals-time", "residuals", x, r.residuals.residuals, marker_style(colour::data, 2.6),
               {{"data-axis", timed ? "time" : "order"}});
  return {"plot-residual-time",
          std::string(timed ? "Figure 3. Residuals against the time of each pair (UTC). "
                            : "Figure 3. Residuals against the order of the pairs (no time stamps were given). ") +
              "A trend or a step here is drift or a change during the check, which a single line cannot describe.",
          p.render()};
}

std::optional<Figure> joint_region_figure(const Report& r) {
  if (!r.certificate_verdict || r.fit.model != stats::Model::line) return std::nullopt;
  const auto& c = *r.options.certificate;
  const auto& v = *r.certificate_verdict;
  const bool widen = r.options.widen_by_certificate;
  // Region {beta : (beta - b)' C^-1 (beta - b) <= 2 F}, C = C_fit (+ C_cert when widened): the same
  // quadratic form the library evaluates about the centroid, drawn here in (b0, b1).
  const double c00 = r.fit.se_b0 * r.fit.se_b0 + (widen ? c.u_intercept * c.u_intercept : 0.0);
  const double c11 = r.fit.se_b1 * r.fit.se_b1 + (widen ? c.u_slope * c.u_slope : 0.0);
  const double c01 = r.fit.cov_b0_b1 + (widen ? c.cov : 0.0);
  const double l00 = std::sqrt(c00), l10 = c01 / l00, l11 = std::sqrt(std::max(0.0, c11 - l10 * l10));
  const double radius = std::sqrt(2.0 * v.joint_critical);
  std::vector<double> ex, ey;
  constexpr int vertices = 120;
  for (int i = 0; i < vertices; ++i) {
    const double a = 2 * std::numbers::pi * i / vertices;
    const double u = radius * std::cos(a), w = radius * std::sin(a);
    ex.push_back(r.fit.b0 + l00 * u);
    ey.push_back(r.fit.b1 + l10 * u + l11 * w);
  }
  AxisSpec xa = axis("intercept b0"), ya = axis("slope b1");
  xa.pad_fraction = ya.pad_fraction = 0.06;
  SvgPlot p("plot-joint-region", "Joint confidence region of intercept and slope", xa, ya);
  p.set_size(900, 420);
  Style region = fill_style(colour::band_confidence, 0.25);
  region.stroke = colour::fit;
  p.add_polygon("joint-region", "joint " + confidence_words(r) + " region, F(2, " + fmt::format("{:g}", std::floor(r.fit.dof)) + ")", ex, ey,
                region,
                {{"data-statistic", exact_number(v.joint_statistic)},
                 {"data-critical", exact_number(v.joint_critical)},
                 {"data-consistent", v.joint_consistent ? "true" : "false"}});
  // The separate tests |b - b*| <= limit, drawn about the fit like the region: the certified point
  // passes both when it lies inside the rectangle.
  const double i0 = r.fit.b0 + v.intercept_limit, i1 = r.fit.b0 - v.intercept_limit;
  const double s0 = r.fit.b1 + v.slope_limit, s1 = r.fit.b1 - v.slope_limit;
  p.add_polygon("separate-intervals", "separate limits of each coefficient", {i1, i0, i0, i1},
                {s1, s1, s0, s0}, line_style(colour::neutral, 1.2, "4 4"),
                {{"data-intercept-limit", exact_number(v.intercept_limit)},
                 {"data-slope-limit", exact_number(v.slope_limit)}});
  p.add_points("fitted-coefficients", "fitted (b0, b1)", {r.fit.b0}, {r.fit.b1}, marker_style(colour::fit, 4));
  p.add_points("certified-coefficients", "certified (b0*, b1*)", {c.intercept}, {c.slope},
               marker_style(colour::certified, 4.5));
  return Figure{"plot-joint-region",
                "Figure 4. The joint " + confidence_words(r) +
                    " confidence region of the fitted intercept and slope" +
                    std::string(widen ? " (widened by the certificate's stated uncertainties)" : "") +
                    ". The certificate agrees jointly with the data when its point lies inside the region, and separately "
                    "when it lies inside the dashed rectangle of the separate limits of each coefficient.",
                p.render()};
}

std::optional<Figure> tolerance_figure(const Report& r) {
  if (!r.tolerance || r.error_curve.empty()) return std::nullopt;
  const std::string units = r.labels.units;
  SvgPlot p("plot-tolerance", "Sensor error against the maximum permissible error",
            axis(with_units(r.labels.reference_name, units)), axis(with_units("error of the corrected indication", units)));
  p.set_size(900, 380);
  std::vector<double> x, e, lo, hi, mpe_hi, mpe_lo;
  const auto& t = *r.options.tolerance;
  for (const auto& s : r.error_curve) {
    x.push_back(s.x);
    e.push_back(s.error);
    lo.push_back(s.error - s.expanded);
    hi.push_back(s.error + s.expanded);
    const double m = metrology::mpe_at(t.mpe, *t.range, s.x);
    mpe_hi.push_back(m);
    mpe_lo.push_back(-m);
  }
  p.add_band("error-uncertainty", "error \u00b1 U_e (" + percent_label(r.options.coverage) + ")", x, lo, hi,
             fill_style(colour::band_confidence, 0.25));
  p.add_line("mpe-upper", "\u00b1 maximum permissible error", x, mpe_hi, line_style(colour::limit, 2));
  p.add_line("mpe-lower", "", x, mpe_lo, line_style(colour::limit, 2));
  p.add_line("error-line", "error e(x) of the sensor with the certificate correction", x, e, line_style(colour::fit));
  std::vector<double> px, py, pu;
  for (const auto& pt : r.tolerance->points) {
    px.push_back(pt.error.x);
    py.push_back(pt.error.error);
    pu.push_back(pt.error.expanded);
  }
  p.add_points("checked-points", "checked points with U_e", px, py, marker_style(colour::data, 3.5), {}, pu);
  return Figure{"plot-tolerance",
                "Figure 5. The error of the sensor's mean indication, corrected with the certificate line, over the "
                "range, with its expanded uncertainty, against the maximum permissible error. The verdict is decided "
                "at the marked points.",
                p.render()};
}

Figure averaging_figure(const Report& r) {
  std::vector<double> m, total, rep;
  for (const auto& a : r.averaging) {
    m.push_back(a.m);
    total.push_back(a.u_c);
    rep.push_back(a.u_repeatability);
  }
  const double floor = r.averaging.front().floor;
  AxisSpec xa = axis("number of averaged readings m (log scale)", ScaleKind::log10);
  AxisSpec ya = axis(with_units("standard uncertainty of the corrected value", r.labels.units));
  ya.include_zero = true;
  SvgPlot p("plot-averaging", "Uncertainty of the corrected value against the number of averaged readings", xa, ya);
  p.set_size(900, 380);
  p.add_line("total-uncertainty", "combined u_c(m)", m, total, line_style(colour::fit, 2.4));
  p.add_line("repeatability-term", "repeatability s / (|b1| \u221am)", m, rep, line_style(colour::secondary, 2, "6 4"));
  p.add_hline("uncertainty-floor", "floor: calibration line, reference standard, resolution", floor,
              line_style(colour::certified, 2),
              {{"data-floor", exact_number(floor)}, {"data-reading", exact_number(r.reading)}});
  return {"plot-averaging",
          "Figure 6. Standard uncertainty of the corrected value at the indication " + fmt::format("{:.6g}", r.reading) +
              " against the number m of readings averaged. Only the repeatability term shrinks (as 1/\u221am); "
              "the calibration line, the reference standard and the resolution set a floor that no amount of "
              "averaging lowers. Averaging autocorrelated readings gains less than shown.",
          p.render()};
}

}  // namespace rigcal::report
