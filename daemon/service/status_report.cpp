#include "status_report.hpp"

#include <sstream>

#include "records_json.hpp"
#include "rigcal/stats/inference.hpp"

namespace rigcal::service {

using nlohmann::ordered_json;

namespace {

ordered_json fit_json(const engine::ChannelEngine& ch) {
  const auto fit = ch.fit_summary();
  if (!fit) return {{"valid", false}, {"problem", fit.error().message}};
  const auto& f = fit.value();
  const auto ci = stats::coefficient_intervals(f, ch.fit_t());
  const auto& cert = ch.config().certificate;
  const auto v = stats::judge_against_certificate(
      f, stats::CertifiedLine{cert.intercept, cert.slope, cert.u_intercept, cert.u_slope, cert.cov}, ch.fit_t(),
      ch.config().fit.widen_by_certificate);
  return {{"valid", true},
          {"n", f.count},
          {"dof", f.dof},
          {"b0", f.b0},
          {"b1", f.b1},
          {"se_b0", f.se_b0},
          {"se_b1", f.se_b1},
          {"cov_b0_b1", f.cov_b0_b1},
          {"ci_b0", {ci.b0.lo, ci.b0.hi}},
          {"ci_b1", {ci.b1.lo, ci.b1.hi}},
          {"s", f.s},
          {"r2", f.r2 ? ordered_json(*f.r2) : ordered_json()},
          {"confidence", ch.config().fit.confidence},
          {"reference_spread", f.reference_spread()},
          {"spread_sufficient", f.reference_spread() >= ch.config().min_reference_spread()},
          {"verdict",
           {{"slope_consistent", v.slope_consistent},
            {"intercept_consistent", v.intercept_consistent},
            {"joint_consistent", v.joint_consistent},
            {"joint_statistic", v.joint_statistic},
            {"joint_critical", v.joint_critical}}}};
}

ordered_json drift_json(const engine::ChannelEngine& ch) {
  const auto& d = ch.drift();
  const auto& design = d.design();
  ordered_json j = {{"detector", design.kind}, {"phase", d.phase_name()}};
  if (d.phase() == engine::DriftMonitor::Phase::unavailable) j["problem"] = d.unavailable_reason();
  const auto& f = ch.last_finding();
  if (f.evaluated)
    j["finding"] = {{"present", f.present}, {"test", f.test}, {"statistic", f.statistic}, {"threshold", f.threshold}};
  if (design.kind != "interval" && d.phase() == engine::DriftMonitor::Phase::monitoring) {
    j["sigma"] = design.sigma;
    j["sigma_learned"] = design.sigma_learned;
    j["reference_centre"] = design.centre.x_centre;
    j["statistic_offset"] = d.statistic_offset();
    j["statistic_slope"] = d.statistic_slope();
    if (design.kind == "cusum")
      j["design"] = {{"k_offset", design.k_offset}, {"h_offset", design.h_offset},
                     {"k_slope", design.k_slope},   {"h_slope", design.h_slope}};
    if (design.kind == "ewma")
      j["design"] = {{"lambda_offset", design.lambda_offset}, {"L_offset", design.L_offset},
                     {"lambda_slope", design.lambda_slope},   {"L_slope", design.L_slope}};
    if (design.kind == "anytime") j["design"] = {{"alpha", design.alpha}, {"rho", design.rho}};
    j["arl0_pairs"] = number_or_null(design.arl0_pairs);
    j["arl1_offset_pairs"] = number_or_null(design.arl1_offset_pairs);
    j["arl1_slope_pairs"] = number_or_null(design.arl1_slope_pairs);
  }
  return j;
}

ordered_json tolerance_json(const engine::ChannelEngine& ch) {
  const auto v = ch.tolerance_verdict();
  if (!v) return {{"available", false}, {"reason", v.error().message}};
  ordered_json points = ordered_json::array();
  for (const auto& p : v->points)
    points.push_back({{"x", p.error.x},
                      {"error", p.error.error},
                      {"u", p.error.u},
                      {"U", p.error.expanded},
                      {"mpe", p.mpe},
                      {"guard_band", p.guard_band},
                      {"probability_beyond_limit", p.probability_beyond_limit},
                      {"statement", metrology::to_string(p.statement)}});
  return {{"available", true},
          {"verdict", metrology::to_string(v->verdict)},
          {"rule", v->rule_name},
          {"rule_description", v->rule_description},
          {"worst_x", v->worst.error.x},
          {"worst_error", v->worst.error.error},
          {"worst_U", v->worst.error.expanded},
          {"worst_mpe", v->worst.mpe},
          {"alert", ch.tolerance_alert_raised()},
          {"points", points}};
}

ordered_json due_json(const engine::ChannelEngine& ch) {
  auto one = [](const std::optional<metrology::DueForecast>& f) -> ordered_json {
    if (!f) return nullptr;
    ordered_json j = {{"status", metrology::to_string(f->status)}, {"reason", f->reason}, {"snapshots", f->snapshots}};
    if (f->trend)
      j["trend_per_day"] = {{"slope", f->trend->slope_per_s * 86400}, {"u_slope", f->trend->u_slope_per_s * 86400}};
    if (f->crossing) {
      j["crossing"] = protocol::format_rfc3339(static_cast<protocol::TimeNs>(f->crossing->time_s * 1e9), 0);
      j["due_by"] = protocol::format_rfc3339(static_cast<protocol::TimeNs>(f->crossing->due_by_s * 1e9), 0);
    }
    return j;
  };
  const auto due = ch.due_by();
  return {{"due_by", due ? ordered_json(protocol::format_rfc3339(*due, 0)) : ordered_json()},
          {"alert", ch.due_alert_raised()},
          {"range_low", one(ch.due_forecast_low())},
          {"range_high", one(ch.due_forecast_high())}};
}

}  // namespace

ordered_json channel_status_json(const engine::ChannelEngine& ch) {
  const auto& c = ch.counters();
  const auto last_average = ch.last_record();
  ordered_json j = {{"id", ch.config().id},
                    {"description", ch.config().description},
                    {"units", ch.config().units},
                    {"calibration_version", ch.calibration_version()},
                    {"certificate",
                     {{"id", ch.config().certificate.id},
                      {"intercept", ch.config().certificate.intercept},
                      {"slope", ch.config().certificate.slope}}},
                    {"fit", fit_json(ch)},
                    {"drift", drift_json(ch)},
                    {"tolerance", tolerance_json(ch)},
                    {"calibration_due", due_json(ch)},
                    {"alert", {{"raised", ch.alert_raised()},
                               {"since", ch.alert_raised() ? ordered_json(protocol::format_rfc3339(ch.alert_since()))
                                                           : ordered_json()}}},
                    {"last_time", ch.last_time() ? ordered_json(protocol::format_rfc3339(*ch.last_time())) : ordered_json()},
                    {"last_average", last_average ? historian_json(*last_average) : ordered_json()},
                    {"counters",
                     {{"pairs", c.pairs},
                      {"pairs_in_fit", c.pairs_in_fit},
                      {"readings", c.readings},
                      {"held_outliers", ch.screen().held().size()},
                      {"outliers", c.outliers},
                      {"released_as_change", c.released},
                      {"signal_rejects", c.signal_rejects},
                      {"clock_rejects", c.clock_rejects},
                      {"historian_records", c.historian_records},
                      {"alerts_raised", c.alerts_raised},
                      {"alerts_cleared", c.alerts_cleared}}}};
  return j;
}

ordered_json status_json(const DaemonFacts& facts, const Counters& counters, const engine::Engine& engine) {
  ordered_json inputs = ordered_json::array();
  for (const auto& [name, c] : counters.inputs) {
    ordered_json rejects = ordered_json::object();
    for (std::size_t r = 0; r < protocol::reject_reason_count; ++r)
      if (c.rejects[r]) rejects[std::string(protocol::reject_reason_name(static_cast<protocol::RejectReason>(r)))] = c.rejects[r];
    inputs.push_back({{"name", name},
                      {"lines", c.lines},
                      {"pairs", c.pairs},
                      {"readings", c.readings},
                      {"duplicates", c.duplicates},
                      {"connections", c.connections},
                      {"refused_connections", c.refused_connections},
                      {"rejects_total", c.rejects_total()},
                      {"rejects", rejects}});
  }
  ordered_json channels = ordered_json::array();
  for (std::size_t i = 0; i < engine.size(); ++i) channels.push_back(channel_status_json(engine.channel(i)));
  return {{"daemon",
           {{"version", facts.version},
            {"started", protocol::format_rfc3339(facts.started)},
            {"now", protocol::format_rfc3339(facts.now)},
            {"state_directory", facts.state_directory},
            {"journal",
             {{"segment", facts.journal_segment},
              {"appended_bytes", facts.journal_appended},
              {"durable_bytes", facts.journal_durable},
              {"blocked", facts.journal_blocked},
              {"error", facts.journal_error}}},
            {"checkpoint",
             {{"number", facts.checkpoint_number},
              {"time", facts.checkpoint_time ? ordered_json(protocol::format_rfc3339(facts.checkpoint_time)) : ordered_json()}}},
            {"historian_subscribers", facts.historian_subscribers},
            {"streams", facts.streams},
            {"notice", "decision support only: not a safety function"}}},
          {"inputs", inputs},
          {"channels", channels}};
}

std::string openmetrics_text(const DaemonFacts& facts, const Counters& counters, const engine::Engine& engine) {
  std::ostringstream o;
  auto family = [&o](const char* name, const char* type, const char* help) {
    o << "# TYPE " << name << " " << type << "\n# HELP " << name << " " << help << "\n";
  };
  family("rigcald_lines", "counter", "Lines read from each input.");
  for (const auto& [n, c] : counters.inputs) o << "rigcald_lines_total{input=\"" << n << "\"} " << c.lines << "\n";
  family("rigcald_records", "counter", "Records taken from each input, by kind.");
  for (const auto& [n, c] : counters.inputs) {
    o << "rigcald_records_total{input=\"" << n << "\",kind=\"pair\"} " << c.pairs << "\n";
    o << "rigcald_records_total{input=\"" << n << "\",kind=\"reading\"} " << c.readings << "\n";
  }
  family("rigcald_duplicates", "counter", "Resent records already held, dropped.");
  for (const auto& [n, c] : counters.inputs) o << "rigcald_duplicates_total{input=\"" << n << "\"} " << c.duplicates << "\n";
  family("rigcald_rejects", "counter", "Rejected lines and records, by input and reason.");
  for (const auto& [n, c] : counters.inputs)
    for (std::size_t r = 0; r < protocol::reject_reason_count; ++r)
      if (c.rejects[r])
        o << "rigcald_rejects_total{input=\"" << n << "\",reason=\""
          << protocol::reject_reason_name(static_cast<protocol::RejectReason>(r)) << "\"} " << c.rejects[r] << "\n";
  family("rigcald_connections", "counter", "Accepted connections.");
  for (const auto& [n, c] : counters.inputs) o << "rigcald_connections_total{input=\"" << n << "\"} " << c.connections << "\n";
  family("rigcald_refused_connections", "counter", "Refused connections (allow list, connection cap).");
  for (const auto& [n, c] : counters.inputs)
    o << "rigcald_refused_connections_total{input=\"" << n << "\"} " << c.refused_connections << "\n";
  family("rigcald_journal_bytes", "counter", "Bytes appended to the journal.");
  o << "rigcald_journal_bytes_total " << counters.journal_bytes << "\n";
  family("rigcald_journal_write_errors", "counter", "Failed journal writes.");
  o << "rigcald_journal_write_errors_total " << counters.journal_write_errors << "\n";
  family("rigcald_journal_blocked", "gauge", "1 while the journal cannot be written and inputs are paused.");
  o << "rigcald_journal_blocked " << (facts.journal_blocked ? 1 : 0) << "\n";
  family("rigcald_checkpoints", "counter", "Checkpoints written.");
  o << "rigcald_checkpoints_total " << counters.checkpoints << "\n";
  family("rigcald_historian_records", "counter", "Corrected averages produced.");
  o << "rigcald_historian_records_total " << counters.historian_records << "\n";
  family("rigcald_historian_dropped", "counter", "Records dropped for slow historian subscribers.");
  o << "rigcald_historian_dropped_total " << counters.historian_dropped << "\n";
  family("rigcald_historian_subscribers", "gauge", "Connected historian subscribers.");
  o << "rigcald_historian_subscribers " << facts.historian_subscribers << "\n";
  family("rigcald_alert_events", "counter", "Alert events (raised and cleared).");
  o << "rigcald_alert_events_total " << counters.alerts << "\n";
  family("rigcald_hook_failures", "counter", "Alert hook runs that failed or timed out.");
  o << "rigcald_hook_failures_total " << counters.hook_failures << "\n";
  std::size_t in_alert = 0;
  for (std::size_t i = 0; i < engine.size(); ++i) in_alert += engine.channel(i).alert_raised() ? 1 : 0;
  family("rigcald_channels", "gauge", "Configured channels.");
  o << "rigcald_channels " << engine.size() << "\n";
  family("rigcald_channels_in_alert", "gauge", "Channels with a drift alert raised.");
  o << "rigcald_channels_in_alert " << in_alert << "\n";
  o << "# EOF\n";
  return o.str();
}

}  // namespace rigcal::service
