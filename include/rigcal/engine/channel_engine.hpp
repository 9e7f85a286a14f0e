#pragma once
// One channel's whole numerical pipeline, fed one record at a time:
//
//   pair    -> linearise -> clock rule -> outlier screen -> fit -> drift detector -> alert machine
//                                                              \-> (optionally) averaging
//   reading -> linearise -> clock rule -> averaging block -> corrected value + GUM budget -> historian
//   tick    -> closes due time buckets
//
// Pure and deterministic: the same records (and ticks) in the same order give the same state and
// the same events, which is what lets the daemon rebuild a channel from its journal after a crash.
// Events go to the EventSink passed with each call. Not thread-safe: one caller at a time.
#include <cstdint>
#include <memory>
#include <optional>

#include "rigcal/config/config.hpp"
#include "rigcal/engine/alert_machine.hpp"
#include "rigcal/engine/averager.hpp"
#include "rigcal/engine/drift_monitor.hpp"
#include "rigcal/engine/engine_tables.hpp"
#include "rigcal/engine/events.hpp"
#include "rigcal/engine/outlier_screen.hpp"
#include "rigcal/metrology/due_forecast.hpp"
#include "rigcal/metrology/tolerance_verdict.hpp"
#include "rigcal/state/binary_codec.hpp"
#include "rigcal/stats/streaming_fit.hpp"

namespace rigcal::engine {

struct ChannelCounters {
  std::uint64_t pairs = 0;           // pairs received by the engine
  std::uint64_t pairs_in_fit = 0;    // pairs that reached the fit since the last reset
  std::uint64_t readings = 0;        // readings received
  std::uint64_t outliers = 0;        // pairs rejected as isolated outliers
  std::uint64_t released = 0;        // held pairs released as a real change
  std::uint64_t signal_rejects = 0;  // raw signal outside its linearisation's range
  std::uint64_t clock_rejects = 0;   // timestamps too far backwards
  std::uint64_t historian_records = 0;
  std::uint64_t alerts_raised = 0;
  std::uint64_t alerts_cleared = 0;
};

class ChannelEngine {
 public:
  ChannelEngine(std::shared_ptr<const config::ChannelConfig> cfg, const config::TimeRules& time,
                EngineTables& tables);

  const config::ChannelConfig& config() const { return *cfg_; }
  const std::shared_ptr<const config::ChannelConfig>& config_ptr() const { return cfg_; }
  std::uint64_t fingerprint() const { return fingerprint_; }

  void on_pair(protocol::TimeNs t, double reference_raw, double sensor_raw, EventSink& sink);
  void on_reading(protocol::TimeNs t, double sensor_raw, EventSink& sink);
  void tick(protocol::TimeNs now, EventSink& sink);
  // As-left: the sensor was recalibrated (or the channel restarted by an operator). Clears the fit,
  // detectors, alert and averaging, and starts a new calibration version.
  void reset(protocol::TimeNs t, EventSink& sink);

  // Back to the state of a new channel (an unreadable checkpoint): everything but the version.
  void restart_fresh();

  const stats::StreamingLineFit& fit() const { return fit_; }
  // The calibration fit every verdict, tolerance judgement and correction uses: ordinary least
  // squares, or with fit.errors_in_variables the York fit (reference and sensor noise both counted)
  // in LineFit form (stats::line_fit_from_york).
  Result<stats::LineFit> fit_summary() const;
  // Ordinary least squares always: the outlier screen predicts the next pair from it.
  Result<stats::LineFit> ols_summary() const { return fit_.summary(cfg_->fit.model); }
  CalibrationSnapshot calibration() const;
  const DriftMonitor& drift() const { return drift_; }
  const DriftFinding& last_finding() const { return last_finding_; }
  bool alert_raised() const { return alert_.raised(); }
  protocol::TimeNs alert_since() const { return alert_.state().since; }
  const ChannelCounters& counters() const { return counters_; }
  std::optional<protocol::TimeNs> last_time() const { return has_time_ ? std::optional(last_time_) : std::nullopt; }
  std::optional<HistorianRecord> last_record() const;
  const OutlierScreen& screen() const { return screen_; }
  std::uint64_t calibration_version() const { return version_; }
  const stats::TwoSidedT& fit_t() const { return t_fit_; }
  const stats::TwoSidedT& coverage_t() const { return t_cov_; }

  // Tolerance verdict from the current fit (error when no tolerance is configured or no fit yet).
  Result<metrology::ToleranceVerdict> tolerance_verdict() const;
  bool tolerance_alert_raised() const { return tolerance_alert_; }
  // Calibration-due forecasts at the low and high end of the range (absent without a forecast).
  std::optional<metrology::DueForecast> due_forecast_low() const;
  std::optional<metrology::DueForecast> due_forecast_high() const;
  std::optional<protocol::TimeNs> due_by() const;
  bool due_alert_raised() const { return due_alert_; }
  void set_time_rules(const config::TimeRules& t);
  // A channel whose configuration changed starts over with the next calibration version.
  void set_calibration_version(std::uint64_t v) { version_ = v; }

  // Checkpoint: the complete state, so that load + the journal after it equals an uninterrupted run.
  void save(state::BinaryWriter& w) const;
  bool load(state::BinaryReader& r);

 private:
  bool convert(double raw, const metrology::Linearisation& lin, double& out, std::string& why) const;
  bool clock_ok(protocol::TimeNs t);
  void accept_pair(const HeldPair& p, EventSink& sink);
  void add_reading(protocol::TimeNs t, double value, double raw, EventSink& sink);
  void emit_historian(const Block& b, EventSink& sink);
  void name_record(HistorianRecord& r) const;
  void notify_phase(protocol::TimeNs t, EventSink& sink);
  void init_tolerance();
  Result<metrology::ToleranceVerdict> evaluate_tolerance(bool explain) const;
  void after_pair_checks(protocol::TimeNs t, EventSink& sink);
  void take_snapshot(protocol::TimeNs t, const stats::LineFit& fit, EventSink& sink);
  void check_tolerance(protocol::TimeNs t, EventSink& sink);
  void fill_tolerance(AlertEvent& e) const;
  AlertEvent base_event(protocol::TimeNs t, AlertKind kind, Transition tr) const;
  void emit_alert(Transition tr, const DriftFinding& f, protocol::TimeNs t, EventSink& sink);
  void reject(protocol::TimeNs t, protocol::RejectReason reason, std::string detail, double x_raw, double y_raw,
              bool pair, EventSink& sink);

  std::shared_ptr<const config::ChannelConfig> cfg_;
  std::uint64_t fingerprint_;
  double max_backwards_ns_;  // the clock rule, the only time rule a channel applies
  const stats::TwoSidedT& t_fit_;
  const stats::TwoSidedT& t_cov_;
  stats::StreamingLineFit fit_;
  OutlierScreen screen_;
  DriftMonitor drift_;
  AlertMachine alert_;
  Averager averager_;
  DriftFinding last_finding_;
  ChannelCounters counters_;
  protocol::TimeNs last_time_ = 0;
  std::uint64_t version_ = 1;
  std::uint64_t historian_seq_ = 0;
  // Quiet-channel rule for averaging: the first tick without a reading since the last one; the open
  // block closes once the ticks have run one bucket length past it.
  protocol::TimeNs quiet_since_ = 0;
  std::optional<HistorianValues> last_record_;
  // Tolerance and calibration-due forecast (only with a tolerance and a range).
  metrology::MaximumPermissibleError mpe_;
  metrology::SensorRange range_;
  metrology::ReferenceStandardUncertainty reference_u_;
  // The trackers at the low and high end of the range, on the heap and only for a channel that
  // forecasts (tolerance, range and forecast.enabled): two trackers inline would cost every channel.
  struct DueTrackers {
    metrology::DueForecastTracker low, high;
  };
  std::unique_ptr<DueTrackers> due_;
  protocol::TimeNs next_snapshot_ = 0;
  std::uint64_t pairs_since_tolerance_check_ = 0;
  // The flags together: each alone between 8-byte members would take 8 bytes, in every channel.
  bool has_time_ = false;
  bool reading_since_tick_ = false;
  bool has_tolerance_ = false;
  bool due_alert_ = false;
  bool tolerance_alert_ = false;
};

}  // namespace rigcal::engine
