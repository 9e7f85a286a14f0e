#pragma once
// What the channel engine tells the outside world. The engine never does I/O: it hands these to an
// EventSink, which the daemon wires to the log, files, sockets and the hook program. Views point into
// the engine's own data and are valid only during the call.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "rigcal/protocol/reject_reason.hpp"
#include "rigcal/protocol/timestamp.hpp"

namespace rigcal::engine {

// The fitted calibration a result was computed with.
struct CalibrationSnapshot {
  std::uint64_t version = 0;  // increases at every reset (as-left) or configuration change
  std::uint64_t n = 0;        // pairs in the fit
  double b0 = 0, b1 = 0;
  double var_b0 = 0, var_b1 = 0, cov_b0_b1 = 0;
  double s = 0;
  double dof = 0;
  bool valid = false;  // false: too few pairs or no spread yet
};

enum class AlertKind { drift, calibration_due, tolerance };
enum class Transition { raised, cleared };
std::string_view alert_kind_name(AlertKind k);

struct AlertEvent {
  std::string_view channel;
  protocol::TimeNs time = 0;
  AlertKind kind = AlertKind::drift;
  Transition transition = Transition::raised;
  std::string_view detector;  // interval, cusum, ewma, anytime, forecast, tolerance
  std::string_view test;      // slope, intercept, joint, offset, ...
  double statistic = 0;       // the detector's statistic when it decided
  double threshold = 0;
  CalibrationSnapshot fit;
  double ci_b0_lo = 0, ci_b0_hi = 0, ci_b1_lo = 0, ci_b1_hi = 0;  // at the channel's confidence
  double certified_b0 = 0, certified_b1 = 0;
  std::optional<protocol::TimeNs> due_by;  // calibration_due: forecast earliest crossing
  // The tolerance verdict when the event was made (empty when the channel has no tolerance).
  std::string tolerance_verdict;  // pass, indeterminate, fail
  std::string tolerance_rule;     // simple acceptance, guarded acceptance
  double worst_x = 0, worst_error = 0, worst_expanded = 0, worst_mpe = 0;
  std::string_view ne107;                  // NAMUR NE 107 status: maintenance_required, out_of_specification
  std::string message;                     // plain language, for maintenance
};

enum class Quality { good, uncertain, bad };
std::string_view quality_name(Quality q);
// OPC UA StatusCode severity (IEC 62541-4): Good 0x00000000, Uncertain 0x40000000, Bad 0x80000000.
std::uint32_t opc_ua_severity(Quality q);

// A historian record but for the texts that name its channel (they are the channel's configuration):
// the form in which a channel keeps its latest record.
struct HistorianValues {
  std::uint64_t seq = 0;  // per channel, increases by one per record (gaps mean lost records)
  protocol::TimeNs window_start = 0, window_end = 0;
  std::uint64_t m = 0;      // readings averaged
  double raw_mean = 0;      // mean raw signal as received
  double indication = 0;    // mean indication in channel units (after linearisation)
  std::optional<double> corrected;  // reference-scale value through the current fit
  double u = 0;             // combined standard uncertainty of `corrected`
  double expanded = 0;      // U = k u
  double k = 0;
  double nu_eff = 0;        // Welch-Satterthwaite effective degrees of freedom (inf as a large number)
  double coverage_probability = 0;
  double u_repeatability = 0, u_calibration = 0, u_reference = 0, u_resolution = 0;
  Quality quality = Quality::bad;
  bool drift_alert = false;
  std::string_view quality_reason;  // a fixed text
  CalibrationSnapshot calibration;
};

struct HistorianRecord : HistorianValues {
  std::string_view channel;
  std::string_view units;
  std::string_view reference_id, certificate_id;
};

// A record the engine refused after the protocol layer had accepted it.
struct EngineReject {
  std::string_view channel;
  protocol::TimeNs time = 0;
  protocol::RejectReason reason{};
  std::string detail;
  double reference_raw = 0, sensor_raw = 0;
  bool is_pair = true;
};

// Something a person running the daemon should know that is neither an alert nor a reject: a
// detector finished learning and was designed, or could not be designed.
enum class NoticeLevel { info, warning };
struct Notice {
  std::string_view channel;
  protocol::TimeNs time = 0;
  NoticeLevel level = NoticeLevel::info;
  std::string message;
};

class EventSink {
 public:
  virtual ~EventSink() = default;
  virtual void on_alert(const AlertEvent& e) = 0;
  virtual void on_historian(const HistorianRecord& r) = 0;
  virtual void on_reject(const EngineReject& r) = 0;
  virtual void on_notice(const Notice& n) = 0;
};

// Discards everything (journal replay: outputs were produced before the restart).
class NullSink final : public EventSink {
 public:
  void on_alert(const AlertEvent&) override {}
  void on_historian(const HistorianRecord&) override {}
  void on_reject(const EngineReject&) override {}
  void on_notice(const Notice&) override {}
};

}  // namespace rigcal::engine
