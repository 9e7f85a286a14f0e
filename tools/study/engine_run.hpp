#pragma once
// Runs the daemon's ChannelEngine on simulated pairs until its first drift alert: the whole per-pair
// path (clock rule, outlier screening, window fit, learning, detector, alert persistence) exactly as
// rigcald runs it, one pair per second of record time.
#include <cstdint>
#include <memory>

#include "pair_simulator.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/engine/channel_engine.hpp"
#include "rigcal/engine/engine_tables.hpp"

namespace rigcal::study {

struct RunOutcome {
  std::uint64_t pairs = 0;  // pairs fed, up to and including the one that raised the alert
  bool alerted = false;     // false: stopped at the limit without an alert (a censored run)
};

// What the engine did with one pair, for studies that need every evaluation (the persistence
// calibration): `evaluations` is how many drift evaluations the pair caused (0 while learning or when
// the screen held it; more than 1 when the screen released held pairs), `present` the last one's finding.
struct PairObservation {
  std::uint64_t evaluations = 0;
  bool present = false;
  double statistic = 0;  // the deciding detector statistic of the last evaluation
};

class EngineRunner {
 public:
  EngineRunner(std::shared_ptr<const config::ChannelConfig> cfg, engine::EngineTables& tables);

  // Feeds pairs from `sim` until the drift alert is raised or `max_pairs` pairs have been fed in this call.
  RunOutcome run_to_first_alert(PairSimulator& sim, std::uint64_t max_pairs);
  // Feeds one pair; the observation says what the drift monitor made of it.
  PairObservation feed(const Pair& p);
  bool alerted() const { return sink_.drift_raised; }
  const engine::ChannelEngine& engine() const { return engine_; }

 private:
  struct FirstAlertSink final : engine::EventSink {
    bool drift_raised = false;
    void on_alert(const engine::AlertEvent& e) override;
    void on_historian(const engine::HistorianRecord&) override {}
    void on_reject(const engine::EngineReject&) override {}
    void on_notice(const engine::Notice&) override {}
  };

  engine::ChannelEngine engine_;
  FirstAlertSink sink_;
  std::uint64_t fed_ = 0;
};

}  // namespace rigcal::study
