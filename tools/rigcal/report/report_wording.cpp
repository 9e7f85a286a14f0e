#include "report_wording.hpp"

#include <cmath>
#include <fmt/format.h>

#include "rigcal/protocol/timestamp.hpp"

namespace rigcal::report {

namespace {

std::string num(double v, int digits = 6) { return fmt::format("{:.{}g}", v, digits); }

}  // namespace

std::string model_sentence(const Report& r) {
  const bool line = r.fit.model == stats::Model::line;
  return fmt::format("{} fitted by {} least squares to {} pairs",
                     line ? "y = b0 + b1 x" : "y = b1 x (through the origin)",
                     r.data.w.empty() ? "ordinary" : "weighted", r.fit.count);
}

std::string certificate_sentence(const Report& r) {
  if (!r.certificate_verdict) return {};
  const auto& v = *r.certificate_verdict;
  const bool line = r.fit.model == stats::Model::line;
  const bool all = v.slope_consistent && v.intercept_consistent && v.joint_consistent;
  std::string s = fmt::format("At {} confidence the data is {} with the certificate line", percent_label(r.options.confidence),
                              all ? "consistent" : "NOT consistent");
  std::vector<std::string> parts;
  parts.push_back(fmt::format("slope {} (|b1 \u2212 b1*| = {} against a limit of {})",
                              v.slope_consistent ? "agrees" : "differs", num(std::abs(v.slope_deviation), 4),
                              num(v.slope_limit, 4)));
  if (line) {
    parts.push_back(fmt::format("intercept {} (|b0 \u2212 b0*| = {} against {})",
                                v.intercept_consistent ? "agrees" : "differs", num(std::abs(v.intercept_deviation), 4),
                                num(v.intercept_limit, 4)));
    parts.push_back(fmt::format("jointly {} (F = {} {} F(2, {:g}) = {})", v.joint_consistent ? "agrees" : "differs",
                                num(v.joint_statistic, 4), v.joint_consistent ? "\u2264" : ">", std::floor(r.fit.dof),
                                num(v.joint_critical, 4)));
  }
  s += ": ";
  for (std::size_t i = 0; i < parts.size(); ++i) s += (i ? "; " : "") + parts[i];
  s += ". This tests statistical agreement with the certificate, not fitness for purpose: the tolerance verdict "
       "decides that.";
  return s;
}

std::string tolerance_sentence(const Report& r) {
  if (!r.tolerance) return {};
  const auto& v = *r.tolerance;
  const auto& w = v.worst;
  const std::string at = fmt::format("at {} the error is {} \u00b1 {} (U_e) against a maximum permissible error of {}",
                                     num(w.error.x), num(w.error.error, 4), num(w.error.expanded, 3), num(w.mpe, 4));
  switch (v.verdict) {
    case metrology::Verdict::pass:
      return "PASS under " + v.rule_name + ": every checked point is within the tolerance (closest to the limit: " +
             at + ").";
    case metrology::Verdict::indeterminate:
      return "INDETERMINATE under " + v.rule_name + ": " + at + ", so the error's uncertainty straddles the limit (" +
             metrology::to_string(w.statement) + "); neither pass nor fail can be stated under this rule.";
    case metrology::Verdict::fail:
      break;
  }
  return "FAIL under " + v.rule_name + ": " + at + ".";
}

std::string york_sentence(const Report& r) {
  if (!r.york) return {};
  const auto& y = *r.york;
  const double diff = y.b - r.fit.b1;
  const double u = std::hypot(y.u_b, r.fit.se_b1);
  std::string s = fmt::format(
      "The errors-in-variables slope is {} (standard uncertainty {}), the ordinary least-squares slope {}: they differ "
      "by {}, {} times their combined standard uncertainty.",
      num(y.b, 10), num(y.u_b, 4), num(r.fit.b1, 10), num(diff, 4), num(u > 0 ? std::abs(diff) / u : 0.0, 3));
  s += fmt::format(" The chi-square check gives S = {} on {:g} degrees of freedom (S/dof = {}, p = {}){}.",
                   num(y.chi_square, 4), y.dof, num(y.reduced_chi_square, 4), num(y.p_value, 3),
                   y.p_value < 0.05 ? ": the scatter is larger than the stated uncertainties allow, or the relation "
                                      "is not a straight line"
                                    : ": the scatter agrees with the stated uncertainties");
  s += " The verdicts and the budget of this report use the ordinary least-squares fit, as rigcald does.";
  return s;
}

std::string r2_caution() {
  return "A high R\u00b2 does not make a calibration fit for purpose: it grows with the span of the reference values "
         "and says nothing about the size of the sensor's error against its tolerance. Judge the calibration by the "
         "residuals, the uncertainties and the tolerance verdict.";
}

std::vector<std::string> cautions() {
  return {
      "This report and its verdicts support maintenance and data-quality decisions. They do not replace a "
      "calibration by an accredited laboratory against traceable standards, carried out by competent (where "
      "required, licensed) personnel.",
      "The verdicts are statistical statements about the data in this report, at the stated confidence and under "
      "the stated decision rule; they are not certainties, and they say nothing about the sensor outside the period "
      "and the range of the data.",
      "Corrected values and alerts from rigcal are advisory. They must not feed safety instrumented functions or any "
      "other safety function, which must stay independent of monitoring systems (IEC 61508, IEC 61511).",
      "Before acting on this report (adjusting a sensor, returning it to service or extending its calibration "
      "interval), follow local codes and regulations and the site's management-of-change procedure.",
      "Keep the raw data with this report: the report is derived from it and can be regenerated from it.",
  };
}

std::string verdict_word(metrology::Verdict v) {
  switch (v) {
    case metrology::Verdict::pass: return "PASS";
    case metrology::Verdict::indeterminate: return "INDETERMINATE";
    case metrology::Verdict::fail: break;
  }
  return "FAIL";
}

std::string point_origin_words(metrology::PointOrigin o) {
  switch (o) {
    case metrology::PointOrigin::range_low: return "low end of the range";
    case metrology::PointOrigin::range_high: return "high end of the range";
    case metrology::PointOrigin::zero_reading: return "zero reading";
    case metrology::PointOrigin::guard_band_extremum: return "worst point inside the range";
    case metrology::PointOrigin::requested: break;
  }
  return "requested point";
}

std::string utc_text(double t_s) {
  const auto ns = static_cast<protocol::TimeNs>(std::llround(t_s * 1e9));
  return protocol::format_rfc3339(ns, ns % 1000000000 == 0 ? 0 : 3);
}

std::vector<std::string> monitoring_sentences(const MonitoringHistory& h, const std::string& units) {
  std::vector<std::string> out;
  const std::string span = h.first_pair && h.last_pair ? " from " + protocol::format_rfc3339(*h.first_pair, 0) + " to " +
                                                             protocol::format_rfc3339(*h.last_pair, 0)
                                                       : "";
  out.push_back("Replayed through rigcald's own channel engine with the daemon's configuration: " +
                std::to_string(h.pairs) + " pairs and " + std::to_string(h.readings) + " readings" + span + ", " +
                std::to_string(h.averages) + " corrected averages, " + std::to_string(h.outliers) +
                " pairs screened out as outliers, " + std::to_string(h.resets) + " resets.");
  if (h.oldest_segment_is_not_the_start)
    out.push_back("The oldest journal segments were retired (journal.retain: remove), so this history starts at the "
                  "oldest segment kept, not at the channel's first pair; the daemon's own state may differ.");
  std::string d = "Drift detector: " + h.detector + ", " + h.phase;
  if (!h.problem.empty()) d += " (" + h.problem + ")";
  if (h.detector != "interval" && h.sigma > 0) {
    d += "; noise sigma " + fmt::format("{:.4g}", h.sigma) + " " + units + (h.sigma_learned ? " (learned)" : " (configured)");
    if (h.arl0_pairs > 0)
      d += fmt::format("; designed for one false alert per {:.3g} pairs, detecting the design offset change in about "
                       "{:.3g} pairs and the design slope change in about {:.3g}",
                       h.arl0_pairs, h.arl1_offset_pairs, h.arl1_slope_pairs);
  }
  d += h.drift_alert ? ". A drift alert is raised at the end of the period." : ". No drift alert at the end of the period.";
  out.push_back(d);
  std::string f = "Calibration-due forecast: low end of the range " + h.due_low + "; high end " + h.due_high + ".";
  if (h.due_by) f += " Due by " + protocol::format_rfc3339(*h.due_by, 0) + " (the earliest crossing consistent with the trend).";
  out.push_back(f);
  return out;
}

}  // namespace rigcal::report
