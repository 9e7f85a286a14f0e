#include "records_json.hpp"

#include <charconv>
#include <cmath>
#include <cstdio>

#include "json_line.hpp"
#include "rigcal/protocol/record.hpp"

namespace rigcal::service {

using nlohmann::ordered_json;

ordered_json number_or_null(double v) { return std::isfinite(v) ? ordered_json(v) : ordered_json(); }

namespace {
ordered_json calibration_json(const engine::CalibrationSnapshot& c) {
  return {{"version", c.version}, {"n", c.n},           {"valid", c.valid},        {"b0", c.b0},
          {"b1", c.b1},           {"var_b0", c.var_b0}, {"var_b1", c.var_b1},      {"cov_b0_b1", c.cov_b0_b1},
          {"s", c.s},             {"dof", c.dof}};
}

// %.10g; std::to_chars with a precision is specified as printf's, and is several times faster.
std::string csv_number(double v) {
  if (!std::isfinite(v)) return "";
  char buf[32];
  return std::string(buf, std::to_chars(buf, buf + sizeof buf, v, std::chars_format::general, 10).ptr);
}
}  // namespace

ordered_json historian_json(const engine::HistorianRecord& r) {
  return {{"type", "average"},
          {"channel", r.channel},
          {"seq", r.seq},
          {"window_start", protocol::format_rfc3339(r.window_start)},
          {"window_end", protocol::format_rfc3339(r.window_end)},
          {"m", r.m},
          {"units", r.units},
          {"raw_mean", number_or_null(r.raw_mean)},
          {"indication", number_or_null(r.indication)},
          {"corrected", r.corrected ? number_or_null(*r.corrected) : ordered_json()},
          {"u", number_or_null(r.u)},
          {"U", number_or_null(r.expanded)},
          {"k", number_or_null(r.k)},
          {"nu_eff", number_or_null(r.nu_eff)},
          {"coverage_probability", r.coverage_probability},
          {"budget",
           {{"repeatability", number_or_null(r.u_repeatability)},
            {"calibration", number_or_null(r.u_calibration)},
            {"reference", number_or_null(r.u_reference)},
            {"resolution", number_or_null(r.u_resolution)}}},
          {"quality", engine::quality_name(r.quality)},
          {"opc_ua_status", engine::opc_ua_severity(r.quality)},
          {"quality_reason", r.quality_reason},
          {"calibration", calibration_json(r.calibration)},
          {"reference_id", r.reference_id},
          {"certificate_id", r.certificate_id},
          {"drift_alert", r.drift_alert},
          {"derived", true}};
}

// The same object as historian_json(r).dump(-1), written directly (see json_line.hpp).
std::string historian_json_line(const engine::HistorianRecord& r) {
  std::string out;
  out.reserve(900);
  JsonLine j(out);
  j.open().text("type", "average").text("channel", r.channel).unsigned_number("seq", r.seq);
  j.text("window_start", protocol::format_rfc3339(r.window_start));
  j.text("window_end", protocol::format_rfc3339(r.window_end));
  j.unsigned_number("m", r.m).text("units", r.units).number("raw_mean", r.raw_mean).number("indication", r.indication);
  if (r.corrected)
    j.number("corrected", *r.corrected);
  else
    j.null("corrected");
  j.number("u", r.u).number("U", r.expanded).number("k", r.k).number("nu_eff", r.nu_eff);
  j.number("coverage_probability", r.coverage_probability);
  j.open("budget").number("repeatability", r.u_repeatability).number("calibration", r.u_calibration);
  j.number("reference", r.u_reference).number("resolution", r.u_resolution).close();
  j.text("quality", engine::quality_name(r.quality)).unsigned_number("opc_ua_status", engine::opc_ua_severity(r.quality));
  j.text("quality_reason", r.quality_reason);
  const auto& c = r.calibration;
  j.open("calibration").unsigned_number("version", c.version).unsigned_number("n", c.n).boolean("valid", c.valid);
  j.number("b0", c.b0).number("b1", c.b1).number("var_b0", c.var_b0).number("var_b1", c.var_b1);
  j.number("cov_b0_b1", c.cov_b0_b1).number("s", c.s).number("dof", c.dof).close();
  j.text("reference_id", r.reference_id).text("certificate_id", r.certificate_id).boolean("drift_alert", r.drift_alert);
  j.boolean("derived", true).close();
  return out;
}

std::string historian_csv_header() {
  return "channel,seq,window_start,window_end,m,units,raw_mean,indication,corrected,u,U,k,nu_eff,"
         "coverage_probability,quality,opc_ua_status,quality_reason,calibration_version,n,b0,b1,var_b0,var_b1,"
         "cov_b0_b1,s,reference_id,certificate_id,drift_alert\n";
}

std::string historian_csv_row(const engine::HistorianRecord& r) {
  auto text = [](std::string_view s) {  // quote when needed (RFC 4180)
    if (s.find_first_of(",\"\n") == std::string_view::npos) return std::string(s);
    std::string q = "\"";
    for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
    return q + "\"";
  };
  char status[16];
  std::snprintf(status, sizeof status, "0x%08X", engine::opc_ua_severity(r.quality));
  std::string row;
  row += text(r.channel) + "," + std::to_string(r.seq) + "," + protocol::format_rfc3339(r.window_start) + "," +
         protocol::format_rfc3339(r.window_end) + "," + std::to_string(r.m) + "," + text(r.units) + ",";
  row += csv_number(r.raw_mean) + "," + csv_number(r.indication) + "," + (r.corrected ? csv_number(*r.corrected) : "") +
         "," + csv_number(r.u) + "," + csv_number(r.expanded) + "," + csv_number(r.k) + "," + csv_number(r.nu_eff) +
         "," + csv_number(r.coverage_probability) + ",";
  row += std::string(engine::quality_name(r.quality)) + "," + status + "," + text(r.quality_reason) + ",";
  const auto& c = r.calibration;
  row += std::to_string(c.version) + "," + std::to_string(c.n) + "," + csv_number(c.b0) + "," + csv_number(c.b1) + "," +
         csv_number(c.var_b0) + "," + csv_number(c.var_b1) + "," + csv_number(c.cov_b0_b1) + "," + csv_number(c.s) + ",";
  row += text(r.reference_id) + "," + text(r.certificate_id) + "," + (r.drift_alert ? "true" : "false") + "\n";
  return row;
}

ordered_json alert_json(const engine::AlertEvent& e) {
  ordered_json j = {{"type", "alert"},
                    {"kind", engine::alert_kind_name(e.kind)},
                    {"event", e.transition == engine::Transition::raised ? "raised" : "cleared"},
                    {"channel", e.channel},
                    {"time", protocol::format_rfc3339(e.time)},
                    {"detector", e.detector},
                    {"test", e.test},
                    {"statistic", number_or_null(e.statistic)},
                    {"threshold", number_or_null(e.threshold)},
                    {"fit", calibration_json(e.fit)},
                    {"ci_b0", {number_or_null(e.ci_b0_lo), number_or_null(e.ci_b0_hi)}},
                    {"ci_b1", {number_or_null(e.ci_b1_lo), number_or_null(e.ci_b1_hi)}},
                    {"certified", {{"b0", e.certified_b0}, {"b1", e.certified_b1}}},
                    {"ne107", e.ne107},
                    {"message", e.message}};
  if (e.due_by) j["due_by"] = protocol::format_rfc3339(*e.due_by);
  if (!e.tolerance_verdict.empty())
    j["tolerance"] = {{"verdict", e.tolerance_verdict},
                      {"rule", e.tolerance_rule},
                      {"worst_x", e.worst_x},
                      {"worst_error", e.worst_error},
                      {"worst_U", e.worst_expanded},
                      {"mpe", e.worst_mpe}};
  return j;
}

ordered_json reject_json(protocol::TimeNs arrival, const std::string& source, std::uint64_t line,
                         protocol::RejectReason reason, const std::string& detail, std::string_view raw) {
  ordered_json j = {{"time", protocol::format_rfc3339(arrival)},
                    {"source", source},
                    {"line", line},
                    {"reason", protocol::reject_reason_name(reason)},
                    {"detail", detail}};
  if (protocol::is_valid_utf8(raw)) {
    j["raw"] = std::string(raw);
  } else {
    static const char* digits = "0123456789abcdef";
    std::string hex;
    for (unsigned char c : raw) {
      hex += digits[c >> 4];
      hex += digits[c & 15];
    }
    j["raw"] = nullptr;
    j["raw_hex"] = hex;
  }
  return j;
}

}  // namespace rigcal::service
