#include "report_text.hpp"

#include "rigcal/protocol/timestamp.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "report_wording.hpp"

namespace rigcal::report {

namespace {

std::string num(double v, int digits) {
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  return fmt::format("{:.{}g}", v, digits);
}

// Wraps a paragraph at 96 columns with the given indent. Counts bytes, which is close enough for
// the few non-ASCII symbols the sentences use.
std::string wrap(const std::string& text, const std::string& indent = "  ") {
  constexpr std::size_t width = 96;
  std::string out, line = indent;
  std::size_t pos = 0;
  while (pos < text.size()) {
    std::size_t end = text.find(' ', pos);
    if (end == std::string::npos) end = text.size();
    const std::string word = text.substr(pos, end - pos);
    if (line.size() > indent.size() && line.size() + 1 + word.size() > width) {
      out += line + "\n";
      line = indent;
    }
    if (line.size() > indent.size()) line += ' ';
    line += word;
    pos = end + 1;
  }
  return out + line + "\n";
}

std::string heading(const std::string& s) { return "\n" + s + "\n" + std::string(s.size(), '-') + "\n"; }

std::string notes(const std::vector<std::string>& ns) {
  std::string out;
  for (const auto& n : ns) out += wrap("Note: " + n);
  return out;
}

std::string value_or(const std::string& s) { return s.empty() ? "not given" : s; }

std::string identity(const Report& r) {
  const auto& l = r.labels;
  std::string out = "CALIBRATION REPORT: " + value_or(l.channel) + "\n";
  out += std::string(out.size() - 1, '=') + "\n";
  auto row = [&](const char* k, const std::string& v) { out += fmt::format("  {:<20} {}\n", k, v); };
  row("description", value_or(l.description));
  row("units", value_or(l.units));
  row("data source", l.source);
  row("pairs", std::to_string(r.fit.count));
  if (!r.data.time_s.empty()) {
    const auto [lo, hi] = std::minmax_element(r.data.time_s.begin(), r.data.time_s.end());
    row("period (UTC)", utc_text(*lo) + " to " + utc_text(*hi));
  } else {
    row("period (UTC)", "not known (no time stamps)");
  }
  if (l.period_from || l.period_until)
    row("selected period", "from " + l.period_from.value_or("start") + " until " + l.period_until.value_or("end"));
  row("reference standard", value_or(l.reference_id));
  row("certificate", value_or(l.certificate_id));
  row("generated (UTC)", l.generated_utc);
  row("rigcal version", l.version);
  return out;
}

std::string fit_block(const Report& r) {
  const auto& f = r.fit;
  const auto& ci = r.intervals;
  std::string out = heading("Fit");
  out += wrap(model_sentence(r) + "; " + percent_label(r.options.confidence) + " intervals, t = " + num(ci.t, 6) +
              " on " + fmt::format("{:g}", f.dof) + " dof.");
  if (f.model == stats::Model::line)
    out += fmt::format("  intercept b0  {:>20}  SE {:<12}  [{}, {}]\n", num(f.b0, 12), num(f.se_b0, 6), num(ci.b0.lo, 10),
                       num(ci.b0.hi, 10));
  out += fmt::format("  slope     b1  {:>20}  SE {:<12}  [{}, {}]\n", num(f.b1, 12), num(f.se_b1, 6), num(ci.b1.lo, 10),
                     num(ci.b1.hi, 10));
  if (f.model == stats::Model::line)
    out += fmt::format("  cov(b0, b1) {}, correlation {}\n", num(f.cov_b0_b1, 8), num(f.corr_b0_b1, 6));
  out += fmt::format("  residual SD s {}, R^2 {}, n {}, dof {:g}\n", num(f.s, 10),
                     f.r2 ? num(*f.r2, 12) : std::string("undefined"), f.count, f.dof);
  out += wrap(r2_caution());
  if (r.york) out += wrap(york_sentence(r));
  out += notes(r.york_notes);
  out += notes(r.data_notes);
  return out;
}

std::string certificate_block(const Report& r) {
  std::string out = heading("Agreement with the certificate");
  if (r.certificate_verdict) {
    const auto& c = *r.options.certificate;
    out += fmt::format("  certified b0* = {} (u {}), b1* = {} (u {})\n", num(c.intercept, 10), num(c.u_intercept, 4),
                       num(c.slope, 10), num(c.u_slope, 4));
    out += wrap(certificate_sentence(r));
  }
  return out + notes(r.certificate_notes);
}

std::string tolerance_block(const Report& r) {
  std::string out = heading("Tolerance verdict");
  if (r.tolerance) {
    const auto& v = *r.tolerance;
    out += "  VERDICT: " + verdict_word(v.verdict) + "\n";
    out += wrap(tolerance_sentence(r));
    out += wrap("Decision rule: " + v.rule_description);
    out += fmt::format("  {:<30} {:>12} {:>11} {:>10} {:>10} {:>10}  {}\n", "point", "x", "error", "U_e", "MPE", "w",
                       "statement");
    for (const auto& p : v.points)
      out += fmt::format("  {:<30} {:>12} {:>11} {:>10} {:>10} {:>10}  {}\n", point_origin_words(p.origin),
                         num(p.error.x, 8), num(p.error.error, 5), num(p.error.expanded, 4), num(p.mpe, 5),
                         num(p.guard_band, 4), metrology::to_string(p.statement));
  }
  return out + notes(r.tolerance_notes);
}

std::string budget_block(const Report& r) {
  const auto& cv = r.corrected;
  const auto& b = cv.budget;
  std::string out = heading("Uncertainty budget of a corrected value");
  out += wrap(fmt::format("Mean indication {} from m = {:g} readings -> x_hat = {}.", num(r.reading, 10),
                          r.options.averaged_readings, num(cv.x_hat, 10)));
  out += fmt::format("  {:<36} {:>4} {:>11} {:>11} {:>12} {:>8} {:>8}\n", "component", "type", "u", "c",
                     "contribution", "dof", "share %");
  for (const auto& l : b.lines)
    out += fmt::format("  {:<36} {:>4} {:>11} {:>11} {:>12} {:>8} {:>8}\n", l.name,
                       l.type == metrology::EvaluationType::type_a ? "A" : "B", num(l.u, 4), num(l.sensitivity, 6),
                       num(l.contribution, 4), num(l.dof, 4), num(l.variance_share_percent, 3));
  out += fmt::format("  u_c {}, nu_eff {}, k {} ({}), U {}\n", num(b.u_c, 4), num(b.nu_eff, 4), num(b.k, 4),
                     percent_label(b.coverage_probability), num(b.expanded, 4));
  out += notes(r.budget_notes);
  out += heading("Averaging");
  out += fmt::format("  {:>8} {:>14} {:>12} {:>12} {:>10}\n", "m", "repeatability", "floor", "u_c", "U");
  for (const auto& a : r.averaging_table)
    out += fmt::format("  {:>8} {:>14} {:>12} {:>12} {:>10}\n", num(a.m, 6), num(a.u_repeatability, 4),
                       num(a.floor, 4), num(a.u_c, 4), num(a.expanded, 4));
  out += wrap("Averaging shrinks only the repeatability term; the floor (calibration line, reference standard, "
              "resolution) stays.");
  return out;
}

}  // namespace

std::string render_text(const Report& r) {
  std::string out = identity(r);
  out += fit_block(r);
  out += certificate_block(r);
  out += tolerance_block(r);
  out += budget_block(r);
  if (r.monitoring) {
    out += heading("What rigcald saw");
    for (const auto& s : monitoring_sentences(*r.monitoring, r.labels.units)) out += wrap(s);
    for (const auto& e : r.monitoring->events)
      out += wrap(protocol::format_rfc3339(e.time, 0) + "  " + e.kind + " " + e.event + " (" + e.detector + ", " + e.test +
                  "): " + e.message);
  }
  out += heading("Cautions");
  for (const auto& c : cautions()) out += wrap("* " + c);
  return out;
}

}  // namespace rigcal::report
