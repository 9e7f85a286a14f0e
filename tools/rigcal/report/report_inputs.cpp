#include "report_inputs.hpp"

#include <algorithm>
#include <fmt/format.h>

#include "report_wording.hpp"
#include "rigcal/metrology/linearisation.hpp"

namespace rigcal::report {

namespace {

constexpr double ns_per_s = 1e9;

const char* linearisation_words(metrology::Linearisation::Kind k) {
  switch (k) {
    case metrology::Linearisation::Kind::none: return "none";
    case metrology::Linearisation::Kind::thermocouple: return "thermocouple (ITS-90 reference function)";
    case metrology::Linearisation::Kind::rtd: return "RTD (Callendar-Van Dusen)";
    case metrology::Linearisation::Kind::current_loop: break;
  }
  return "4-20 mA current loop";
}

// As rigcald's channel engine converts a raw value: unchanged without a linearisation.
Result<double> convert(const metrology::Linearisation& lin, double raw) {
  if (lin.kind == metrology::Linearisation::Kind::none) return raw;
  return metrology::linearise(lin, raw);
}

}  // namespace

Result<ReportData> data_from_table(const table::PairTable& t, const std::string& source,
                                   const std::string& time_column) {
  ReportData d;
  d.x = t.x;
  d.y = t.y;
  d.w = t.w;
  d.u_x = t.u_x;
  d.u_y = t.u_y;
  for (std::size_t i = 0; i < t.time.size(); ++i) {
    const auto parsed = protocol::parse_timestamp(t.time[i]);
    if (!parsed.time)
      return Error{fmt::format("{}:{}: time column '{}': \"{}\" is not a UTC time (RFC 3339 with Z, or epoch "
                               "seconds): {}",
                               source, t.line[i], time_column, t.time[i], parsed.error.reason)};
    d.time_s.push_back(static_cast<double>(*parsed.time) / ns_per_s);
  }
  for (std::size_t line : t.line) d.where.push_back(fmt::format("{}:{}", source, line));
  return d;
}

Result<ReportData> data_from_journal(const JournalScan& scan, const config::ChannelConfig& c) {
  if (!scan.resets.empty() && !scan.pairs.empty()) {
    for (protocol::TimeNs reset : scan.resets) {
      const bool before = std::any_of(scan.pairs.begin(), scan.pairs.end(), [&](const auto& p) { return p.time < reset; });
      const bool after = std::any_of(scan.pairs.begin(), scan.pairs.end(), [&](const auto& p) { return p.time >= reset; });
      if (before && after) {
        const std::string at = protocol::format_rfc3339(reset, 3);
        return Error{fmt::format("the selected period holds an operator reset (as-left) of {} at {}: the pairs before "
                                 "it are the as-found calibration and those after it the as-left one. Report one of "
                                 "them: --until {} for the as-found data, or --since {} for the as-left data",
                                 c.id, at, at, at)};
      }
    }
  }
  ReportData d;
  std::size_t out_of_range = 0;
  std::string first_reason;
  for (const JournalPair& p : scan.pairs) {
    auto x = convert(c.reference.linearisation, p.reference_raw);
    auto y = convert(c.sensor.linearisation, p.sensor_raw);
    if (!x || !y) {
      if (out_of_range++ == 0) first_reason = !x ? "reference: " + x.error().message : "sensor: " + y.error().message;
      continue;
    }
    d.x.push_back(x.value());
    d.y.push_back(y.value());
    d.time_s.push_back(static_cast<double>(p.time) / ns_per_s);
    d.where.push_back(p.segment + " at " + protocol::format_rfc3339(p.time, 3));
  }
  if (d.x.empty())
    return Error{fmt::format("no usable pairs of channel {} in the selected period ({} in the journal outside it{})",
                             c.id, scan.pairs_outside,
                             out_of_range ? fmt::format(", {} left out by the linearisation", out_of_range) : "")};
  if (out_of_range)
    d.source_notes.push_back(fmt::format(
        "{} pair(s) were left out because a raw value is outside its linearisation's range, as rigcald rejects them "
        "(first: {}).",
        out_of_range, first_reason));
  return d;
}

ReportOptions options_from_channel(const config::ChannelConfig& c) {
  ReportOptions o;
  o.from_configuration = true;
  o.model = c.fit.model;
  o.confidence = c.fit.confidence;
  o.coverage = c.averaging.coverage_probability;
  o.certificate = stats::CertifiedLine{c.certificate.intercept, c.certificate.slope, c.certificate.u_intercept,
                                       c.certificate.u_slope, c.certificate.cov};
  o.widen_by_certificate = c.fit.widen_by_certificate;
  if (c.tolerance.configured()) {
    ToleranceInput t;
    t.mpe = {c.tolerance.absolute, c.tolerance.percent_of_reading, c.tolerance.percent_of_span};
    if (c.range_low && c.range_high) t.range = metrology::SensorRange{*c.range_low, *c.range_high};
    t.rule = c.decision_rule == config::DecisionRule::simple ? metrology::DecisionRule::simple_acceptance
                                                             : metrology::DecisionRule::guarded_acceptance;
    t.guard_band = c.guard_band;
    o.tolerance = t;
  }
  if (c.reference.expanded_uncertainty > 0)
    o.reference = ReferenceStandardInput{c.reference.expanded_uncertainty, c.reference.coverage_factor, c.reference.dof};
  if (c.sensor.resolution > 0) o.resolution = c.sensor.resolution;
  if (c.averaging.block_readings > 0) {
    o.averaged_readings = c.averaging.block_readings;
    o.averaged_readings_origin = "the channel's averaging.block_readings";
  }
  if (c.fit.errors_in_variables) {
    ErrorsInVariablesInput e;
    if (c.reference.noise_sd > 0) e.u_reference = c.reference.noise_sd;
    e.u_sensor = c.sensor.noise_sd;
    o.errors_in_variables = e;
  }
  return o;
}

ReportLabels labels_from_channel(const config::ChannelConfig& c) {
  ReportLabels l;
  l.channel = c.id;
  l.description = c.description;
  l.units = c.units;
  l.reference_id = c.reference.id;
  l.certificate_id = c.certificate.id;
  return l;
}

std::vector<std::string> journal_notes(const JournalScan& scan, const config::ChannelConfig& c) {
  std::vector<std::string> n;
  const auto policy = c.fit.policy();
  if (policy.kind == stats::MemoryPolicy::Kind::window)
    n.push_back(fmt::format("rigcald fits a window of the last {} pairs; this report fits every pair of the selected "
                            "period, so its numbers differ from the daemon's current fit.",
                            c.fit.window_pairs));
  else if (policy.kind == stats::MemoryPolicy::Kind::forgetting)
    n.push_back(fmt::format("rigcald discounts old pairs (forgetting factor {}); this report weighs every pair of the "
                            "selected period equally.",
                            c.fit.forgetting_factor));
  if (c.screening.enabled)
    n.push_back("rigcald's outlier screening is not re-applied: every recorded pair of the period is in this fit. "
                "Check the residual plots and the largest standardised residual for spikes.");
  if (c.reference.linearisation.kind != metrology::Linearisation::Kind::none ||
      c.sensor.linearisation.kind != metrology::Linearisation::Kind::none)
    n.push_back(fmt::format("The journal holds raw signals; they were converted as rigcald converts them (reference: "
                            "{}; sensor: {}).",
                            linearisation_words(c.reference.linearisation.kind),
                            linearisation_words(c.sensor.linearisation.kind)));
  for (protocol::TimeNs reset : scan.resets)
    n.push_back("An operator reset (as-left) at " + protocol::format_rfc3339(reset, 3) +
                " lies in the selected period, outside the span of the pairs reported.");
  if (scan.pairs_outside > 0)
    n.push_back(fmt::format("{} further pair(s) of {} in the journal lie outside the selected period.", scan.pairs_outside,
                            c.id));
  for (const auto& p : scan.problems) n.push_back("Journal damage: " + p + " (the frames concerned were skipped).");
  return n;
}

}  // namespace rigcal::report
