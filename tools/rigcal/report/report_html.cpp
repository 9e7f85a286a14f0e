// Page structure (one function per section, in reading order):
//   header (identity, headline verdicts) -> 1 data and fit plots -> 2 coefficients (and York) ->
//   3 agreement with the certificate -> 4 tolerance verdict -> 5 uncertainty budget ->
//   6 averaging -> 7 cautions -> footer.
#include "report_html.hpp"

#include "rigcal/protocol/timestamp.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "html_text.hpp"
#include "report_css.hpp"
#include "report_plots.hpp"
#include "report_wording.hpp"

namespace rigcal::report {

namespace {

std::string esc(std::string_view s) { return escape_html(s); }

std::string num(double v, int digits) {
  if (std::isinf(v)) return v > 0 ? "\u221e" : "\u2212\u221e";
  return fmt::format("{:.{}g}", v, digits);
}

// A table cell holding a number: printed with `digits` significant digits, exact in data-value.
std::string num_cell(std::string_view quantity, double v, int digits) {
  std::string out = "<td class=\"num\"";
  if (!quantity.empty()) out += " data-quantity=\"" + esc(quantity) + "\"";
  return out + " data-value=\"" + exact_number(v) + "\">" + num(v, digits) + "</td>";
}

std::string text_cell(std::string_view s) { return "<td>" + esc(s) + "</td>"; }

std::string para(std::string_view s, std::string_view cls = "") {
  return cls.empty() ? "<p>" + esc(s) + "</p>\n" : "<p class=\"" + esc(cls) + "\">" + esc(s) + "</p>\n";
}

std::string notes(const std::vector<std::string>& ns) {
  std::string out;
  for (const auto& n : ns) out += para(n, "note");
  return out;
}

std::string figure(const Figure& f) {
  return "<figure>" + f.svg + "<figcaption>" + esc(f.caption) + "</figcaption></figure>\n";
}

std::string units_suffix(const Report& r) { return r.labels.units.empty() ? "" : " " + r.labels.units; }

std::string or_not_given(const std::string& s) { return s.empty() ? "not given" : s; }

std::string identity_row(std::string_view name, std::string_view value, std::string_view key) {
  return "<dt>" + esc(name) + "</dt><dd data-field=\"" + esc(key) + "\">" + esc(value) + "</dd>\n";
}

std::string period_text(const Report& r) {
  const auto& t = r.data.time_s;
  std::string s;
  if (!t.empty()) {
    const auto [lo, hi] = std::minmax_element(t.begin(), t.end());
    s = utc_text(*lo) + " to " + utc_text(*hi) + " (first and last pair)";
  } else {
    s = "not known (the pairs carry no time stamps)";
  }
  if (r.labels.period_from || r.labels.period_until)
    s += "; selected: from " + r.labels.period_from.value_or("the start of the journal") + " until " +
         r.labels.period_until.value_or("its end");
  return s;
}

std::string badge(std::string_view cls, std::string_view text, std::string_view key) {
  return "<span class=\"badge " + esc(cls) + "\" data-verdict=\"" + esc(key) + "\">" + esc(text) + "</span>";
}

std::string headline(const Report& r) {
  std::string out = "<div class=\"headline\">";
  if (r.tolerance) {
    const std::string word = verdict_word(r.tolerance->verdict);
    out += badge(metrology::to_string(r.tolerance->verdict), "Tolerance: " + word + " (" + r.tolerance->rule_name + ")",
                 "tolerance");
  } else {
    out += badge("not-judged", "Tolerance: not judged", "tolerance");
  }
  if (r.certificate_verdict) {
    const auto& v = *r.certificate_verdict;
    const bool ok = v.slope_consistent && v.intercept_consistent && v.joint_consistent;
    out += badge(ok ? "pass" : "fail", ok ? "Certificate: consistent" : "Certificate: NOT consistent", "certificate");
  } else {
    out += badge("not-judged", "Certificate: not tested", "certificate");
  }
  return out + "</div>\n";
}

std::string header_section(const Report& r) {
  const auto& l = r.labels;
  std::string out = "<header>\n<h1>Calibration report: " + esc(or_not_given(l.channel)) + "</h1>\n";
  out += "<p class=\"subtitle\">As-found check of a sensor against a reference standard" +
         (l.description.empty() ? std::string() : " \u2014 " + esc(l.description)) + "</p>\n";
  out += headline(r);
  out += "<dl class=\"identity\">\n";
  out += identity_row("Channel / sensor", or_not_given(l.channel), "channel");
  out += identity_row("Description", or_not_given(l.description), "description");
  out += identity_row("Units", or_not_given(l.units), "units");
  out += identity_row("Data source", l.source, "source");
  out += identity_row("Pairs", std::to_string(r.fit.count), "pairs");
  out += identity_row("Period (UTC)", period_text(r), "period");
  out += identity_row("Reference standard", or_not_given(l.reference_id), "reference-id");
  out += identity_row("Certificate", or_not_given(l.certificate_id), "certificate-id");
  out += identity_row("Generated (UTC)", l.generated_utc, "generated");
  out += identity_row("rigcal version", l.version, "version");
  out += "</dl>\n</header>\n";
  return out;
}

std::string data_section(const Report& r) {
  std::string out = "<section id=\"data\">\n<h2>1. Data and fitted line</h2>\n";
  out += para("Model: " + model_sentence(r) + ". Intervals and bands are two-sided at " +
              percent_label(r.options.confidence) + " confidence (Student t on " + fmt::format("{:g}", r.fit.dof) +
              " degrees of freedom).");
  out += figure(calibration_figure(r));
  out += figure(residual_reference_figure(r));
  out += figure(residual_time_figure(r));
  const auto& res = r.residuals;
  if (r.fit.s > 0 && !r.data.x.empty()) {
    const std::size_t i = res.largest_index;
    out += para(fmt::format("Largest standardised residual: {} at pair {} ({}; reference {}, indication {}). Under "
                            "normal errors values beyond about \u00b13 are rare; such a pair deserves a look at "
                            "the raw record.",
                            num(res.largest_standardised, 3), i + 1,
                            i < r.data.where.size() ? r.data.where[i] : std::string("no source position"),
                            num(r.data.x[i], 8), num(r.data.y[i], 8)));
  }
  out += notes(r.data_notes);
  return out + "</section>\n";
}

std::string coefficient_rows(const Report& r) {
  const auto& f = r.fit;
  const auto& ci = r.intervals;
  std::string out;
  auto row = [&](const char* name, const char* key, double v, double se, const stats::Interval& i) {
    out += "<tr><td>" + std::string(name) + "</td>" + num_cell(key, v, 12) + num_cell(std::string("se_") + key, se, 6) +
           num_cell(std::string("ci_") + key + "_lo", i.lo, 10) + num_cell(std::string("ci_") + key + "_hi", i.hi, 10) +
           "</tr>\n";
  };
  if (f.model == stats::Model::line) row("intercept b0", "b0", f.b0, f.se_b0, ci.b0);
  row("slope b1", "b1", f.b1, f.se_b1, ci.b1);
  return out;
}

std::string york_block(const Report& r) {
  if (!r.york) return "<h3>Errors in variables</h3>\n" + notes(r.york_notes);
  const auto& y = *r.york;
  std::string out = "<h3>Errors in variables (York fit)</h3>\n";
  out += "<table class=\"york\"><tr><th>quantity</th><th class=\"num\">value</th><th class=\"num\">u (stated "
         "uncertainties)</th><th class=\"num\">u (scaled by \u221a(S/dof))</th></tr>\n";
  out += "<tr><td>intercept a</td>" + num_cell("york_a", y.a, 12) + num_cell("york_u_a", y.u_a, 6) +
         num_cell("york_u_a_scaled", y.u_a_scaled, 6) + "</tr>\n";
  out += "<tr><td>slope b</td>" + num_cell("york_b", y.b, 12) + num_cell("york_u_b", y.u_b, 6) +
         num_cell("york_u_b_scaled", y.u_b_scaled, 6) + "</tr>\n";
  out += "<tr><td>cov(a, b)</td>" + num_cell("york_cov_ab", y.cov_ab, 6) + "<td></td>" +
         num_cell("york_cov_ab_scaled", y.cov_ab_scaled, 6) + "</tr>\n";
  out += "<tr><td>chi-square S</td>" + num_cell("york_chi_square", y.chi_square, 6) + "<td></td><td></td></tr>\n";
  out += "<tr><td>degrees of freedom</td>" + num_cell("york_dof", y.dof, 6) + "<td></td><td></td></tr>\n";
  out += "<tr><td>P(chi-square \u2265 S)</td>" + num_cell("york_p_value", y.p_value, 4) +
         "<td></td><td></td></tr>\n</table>\n";
  return out + para(york_sentence(r));
}

std::string fit_section(const Report& r) {
  const auto& f = r.fit;
  std::string out = "<section id=\"fit\">\n<h2>2. Fitted coefficients</h2>\n";
  out += "<table class=\"coefficients\"><tr><th>coefficient</th><th class=\"num\">estimate</th><th class=\"num\">"
         "standard error</th><th class=\"num\">" + esc(percent_label(r.options.confidence)) +
         " lower</th><th class=\"num\">upper</th></tr>\n" + coefficient_rows(r) + "</table>\n";
  out += "<table class=\"statistics\"><tr><th>statistic</th><th class=\"num\">value</th><th>meaning</th></tr>\n";
  auto row = [&](const char* name, const char* key, double v, int digits, const char* meaning) {
    out += "<tr><td>" + std::string(name) + "</td>" + num_cell(key, v, digits) + "<td>" + esc(meaning) + "</td></tr>\n";
  };
  if (f.model == stats::Model::line) {
    row("cov(b0, b1)", "cov_b0_b1", f.cov_b0_b1, 8, "covariance of intercept and slope");
    row("corr(b0, b1)", "corr_b0_b1", f.corr_b0_b1, 6, "their correlation: use both, never one alone");
  }
  row("residual SD s", "s", f.s, 10, "scatter of one indication about the line, indication units");
  if (f.r2) row("R\u00b2", "r2", *f.r2, 12, "share of the indications' variance the line explains");
  row("n", "n", static_cast<double>(f.count), 12, "pairs in the fit");
  row("dof", "dof", f.dof, 12, "residual degrees of freedom");
  row("t", "t", r.intervals.t, 8, "critical value of the intervals and bands");
  row("mean reference value", "mean_x", f.mean_x, 10, "centroid of the data, where the line is best known");
  row("Sxx", "sxx", f.sxx, 10, "spread of the reference values");
  out += "</table>\n";
  if (!f.r2) out += para("R\u00b2 is undefined: the indications have no spread at all.", "note");
  out += para(r2_caution(), "statement");
  out += york_block(r);
  return out + "</section>\n";
}

std::string certificate_section(const Report& r) {
  std::string out = "<section id=\"certificate\">\n<h2>3. Agreement with the certificate</h2>\n";
  if (r.certificate_verdict) {
    const auto& c = *r.options.certificate;
    const auto& v = *r.certificate_verdict;
    const bool line = r.fit.model == stats::Model::line;
    out += "<table class=\"certificate\"><tr><th>test</th><th class=\"num\">certified</th><th class=\"num\">u "
           "certified</th><th class=\"num\">fitted \u2212 certified</th><th class=\"num\">limit / critical</th>"
           "<th>verdict</th></tr>\n";
    auto verdict = [](bool ok) { return std::string(ok ? "<td>consistent</td>" : "<td><b>NOT consistent</b></td>"); };
    out += "<tr><td>slope (t)</td>" + num_cell("certified_b1", c.slope, 10) + num_cell("u_certified_b1", c.u_slope, 4) +
           num_cell("slope_deviation", v.slope_deviation, 6) + num_cell("slope_limit", v.slope_limit, 6) +
           verdict(v.slope_consistent) + "</tr>\n";
    if (line) {
      out += "<tr><td>intercept (t)</td>" + num_cell("certified_b0", c.intercept, 10) +
             num_cell("u_certified_b0", c.u_intercept, 4) + num_cell("intercept_deviation", v.intercept_deviation, 6) +
             num_cell("intercept_limit", v.intercept_limit, 6) + verdict(v.intercept_consistent) + "</tr>\n";
      out += "<tr><td>joint (F statistic)</td><td></td><td></td>" + num_cell("joint_statistic", v.joint_statistic, 6) +
             num_cell("joint_critical", v.joint_critical, 6) + verdict(v.joint_consistent) + "</tr>\n";
    }
    out += "</table>\n";
    out += para(std::string("The separate tests compare each coefficient with t times its standard error") +
                (r.options.widen_by_certificate ? ", combined with the certificate's standard uncertainty" : "") +
                "; the joint test compares the quadratic form of both differences with F(2, n \u2212 2), as both "
                "coefficients are used together.");
    out += para(certificate_sentence(r), "statement");
    if (auto f = joint_region_figure(r)) out += figure(*f);
  }
  out += notes(r.certificate_notes);
  return out + "</section>\n";
}

std::string tolerance_points(const Report& r) {
  const auto& v = *r.tolerance;
  std::string out =
      "<table class=\"tolerance-points\"><tr><th>point</th><th class=\"num\">reference value</th><th class=\"num\">"
      "error e</th><th class=\"num\">U_e</th><th class=\"num\">k</th><th class=\"num\">MPE</th><th class=\"num\">"
      "guard band w</th><th class=\"num\">P(beyond)</th><th>statement</th></tr>\n";
  for (const auto& p : v.points) {
    out += "<tr class=\"tolerance-point\">" + text_cell(point_origin_words(p.origin)) + num_cell("x", p.error.x, 8) +
           num_cell("error", p.error.error, 5) + num_cell("expanded", p.error.expanded, 4) + num_cell("k", p.error.k, 4) +
           num_cell("mpe", p.mpe, 5) + num_cell("guard_band", p.guard_band, 4) +
           num_cell("probability_beyond", p.probability_beyond_limit, 3) + text_cell(metrology::to_string(p.statement)) +
           "</tr>\n";
  }
  return out + "</table>\n";
}

std::string tolerance_section(const Report& r) {
  std::string out = "<section id=\"tolerance\">\n<h2>4. Tolerance verdict</h2>\n";
  if (r.tolerance) {
    const auto& v = *r.tolerance;
    const auto& t = *r.options.tolerance;
    out += "<p>" + badge(metrology::to_string(v.verdict), verdict_word(v.verdict), "tolerance-detail") + "</p>\n";
    out += para(tolerance_sentence(r), "statement");
    out += para(fmt::format("Maximum permissible error: {}{} + {} % of reading + {} % of span, over the range {} to "
                            "{}{}. The error is that of the sensor's indication corrected with the certificate line.",
                            num(t.mpe.absolute, 6), units_suffix(r), num(t.mpe.percent_of_reading, 6),
                            num(t.mpe.percent_of_span, 6), num(t.range->lo, 8), num(t.range->hi, 8), units_suffix(r)));
    out += para("Decision rule: " + v.rule_description);
    out += tolerance_points(r);
    if (auto f = tolerance_figure(r)) out += figure(*f);
  }
  out += notes(r.tolerance_notes);
  return out + "</section>\n";
}

std::string budget_table(const Report& r) {
  const auto& b = r.corrected.budget;
  std::string out =
      "<table class=\"budget\"><tr><th>component</th><th>type</th><th class=\"num\">u(x\u1d62)</th><th class=\"num\">"
      "sensitivity c\u1d62</th><th class=\"num\">contribution |c\u1d62| u</th><th class=\"num\">dof \u03bd\u1d62</th>"
      "<th class=\"num\">share of u_c\u00b2</th></tr>\n";
  for (const auto& l : b.lines) {
    out += "<tr class=\"budget-line\">" + text_cell(l.name) +
           text_cell(l.type == metrology::EvaluationType::type_a ? "A" : "B") + num_cell("u", l.u, 4) +
           num_cell("sensitivity", l.sensitivity, 6) + num_cell("contribution", l.contribution, 4) +
           num_cell("dof", l.dof, 4) + num_cell("share", l.variance_share_percent, 3) + "</tr>\n";
  }
  out += "<tr class=\"total\"><td colspan=\"4\">combined standard uncertainty u_c</td>" + num_cell("u_c", b.u_c, 4) +
         num_cell("nu_eff", b.nu_eff, 4) + "<td class=\"num\">100</td></tr>\n</table>\n";
  return out;
}

std::string budget_section(const Report& r) {
  const auto& cv = r.corrected;
  const auto& b = cv.budget;
  std::string out = "<section id=\"budget\">\n<h2>5. Uncertainty budget of a corrected value</h2>\n";
  std::string m_words = fmt::format("{:g}", r.options.averaged_readings);
  if (!r.options.averaged_readings_origin.empty()) m_words += " (" + r.options.averaged_readings_origin + ")";
  out += para(fmt::format("A mean indication of {}{} from m = {} readings, corrected through the fitted line, gives the "
                          "reference-scale value x\u0302 = {}{}{}.",
                          num(r.reading, 10), units_suffix(r), m_words, num(cv.x_hat, 10), units_suffix(r),
                          r.options.reading ? "" : " (the mean indication of the calibration data, where the line "
                                                   "is best known)"));
  out += budget_table(r);
  out += "<table class=\"expanded\"><tr><th>result</th><th class=\"num\">value</th></tr>\n";
  out += "<tr><td>effective degrees of freedom \u03bd_eff (Welch\u2013Satterthwaite)</td>" + num_cell("nu_eff", b.nu_eff, 4) + "</tr>\n";
  out += "<tr><td>coverage factor k (t at " + esc(percent_label(b.coverage_probability)) + ")</td>" + num_cell("k", b.k, 4) +
         "</tr>\n";
  out += "<tr><td>expanded uncertainty U = k u_c</td>" + num_cell("expanded", b.expanded, 4) + "</tr>\n";
  out += "<tr><td>result</td><td class=\"num\">" +
         esc(fmt::format("{} \u00b1 {}{}", num(cv.x_hat, 10), num(b.expanded, 3), units_suffix(r))) + "</td></tr>\n";
  out += "</table>\n";
  const auto& ip = cv.inverse;
  out += para(fmt::format("From the fit alone (without the reference standard and resolution), the {} interval of "
                          "x\u0302 is {} to {} by the delta method{}.",
                          percent_label(r.options.coverage), num(ip.delta.lo, 10), num(ip.delta.hi, 10),
                          ip.fieller_bounded ? fmt::format(" and {} to {} by Fieller's exact method",
                                                           num(ip.fieller.lo, 10), num(ip.fieller.hi, 10))
                                             : "; Fieller's exact interval is unbounded (the slope is too poorly "
                                               "determined to invert the line reliably)"));
  out += para("The repeatability and calibration-line components both come from the fit's residual variance and "
              "share its degrees of freedom; they are pooled into one Welch\u2013Satterthwaite term.");
  out += notes(r.budget_notes);
  return out + "</section>\n";
}

std::string averaging_section(const Report& r) {
  std::string out = "<section id=\"averaging\">\n<h2>6. Averaging and the calibration floor</h2>\n";
  out += figure(averaging_figure(r));
  out += "<table class=\"averaging\"><tr><th class=\"num\">m</th><th class=\"num\">repeatability</th><th "
         "class=\"num\">floor</th><th class=\"num\">u_c</th><th class=\"num\">\u03bd_eff</th><th class=\"num\">k</th>"
         "<th class=\"num\">U</th></tr>\n";
  for (const auto& a : r.averaging_table) {
    out += "<tr class=\"averaging-row\">" + num_cell("m", a.m, 6) + num_cell("u_repeatability", a.u_repeatability, 4) +
           num_cell("floor", a.floor, 4) + num_cell("u_c", a.u_c, 4) + num_cell("nu_eff", a.nu_eff, 4) +
           num_cell("k", a.k, 4) + num_cell("expanded", a.expanded, 4) + "</tr>\n";
  }
  return out + "</table>\n</section>\n";
}

std::string monitoring_section(const Report& r) {
  if (!r.monitoring) return "";
  const MonitoringHistory& h = *r.monitoring;
  std::string out = "<section id=\"monitoring\">\n<h2>7. What rigcald saw: drift, alerts and the calibration-due "
                    "forecast</h2>\n";
  for (const auto& s : monitoring_sentences(h, r.labels.units)) out += para(s);
  if (h.events.empty()) return out + para("No alert was raised or cleared in the period.") + "</section>\n";
  out += "<table class=\"alerts\">\n<tr><th>time (UTC)</th><th>alert</th><th>event</th><th>detector</th><th>test</th>"
         "<th>message</th></tr>\n";
  for (const auto& e : h.events)
    out += "<tr class=\"alert-row\" data-kind=\"" + esc(e.kind) + "\" data-event=\"" + esc(e.event) + "\">" +
           text_cell(protocol::format_rfc3339(e.time, 0)) + text_cell(e.kind) + text_cell(e.event) +
           text_cell(e.detector) + text_cell(e.test) + text_cell(e.message) + "</tr>\n";
  return out + "</table>\n</section>\n";
}

std::string cautions_section(bool monitoring) {
  std::string out = std::string("<section id=\"cautions\">\n<h2>") + (monitoring ? "8" : "7") +
                    ". Cautions</h2>\n<ul class=\"caution\">\n";
  for (const auto& c : cautions()) out += "<li>" + esc(c) + "</li>\n";
  return out + "</ul>\n</section>\n";
}

}  // namespace

std::string render_html(const Report& r) {
  std::string out = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
                    "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
                    "<meta name=\"generator\" content=\"rigcal " + esc(r.labels.version) + "\">\n"
                    "<title>Calibration report: " + esc(or_not_given(r.labels.channel)) + "</title>\n<style>" +
                    report_css + "</style>\n</head>\n<body>\n<main>\n";
  out += header_section(r);
  out += data_section(r);
  out += fit_section(r);
  out += certificate_section(r);
  out += tolerance_section(r);
  out += budget_section(r);
  out += averaging_section(r);
  out += monitoring_section(r);
  out += cautions_section(r.monitoring.has_value());
  out += "<footer>Generated by rigcal " + esc(r.labels.version) + " on " + esc(r.labels.generated_utc) +
         " from " + esc(r.labels.source) + ". Raw data are not altered; every value here is derived from them.</footer>\n";
  return out + "</main>\n</body>\n</html>\n";
}

}  // namespace rigcal::report
