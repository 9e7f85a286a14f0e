#include "engine_run.hpp"

namespace rigcal::study {

namespace {
constexpr protocol::TimeNs start_time_ns = 1704067200LL * 1000000000LL;  // 2024-01-01T00:00:00Z
constexpr protocol::TimeNs pair_interval_ns = 1000000000LL;              // one pair per second
}  // namespace

void EngineRunner::FirstAlertSink::on_alert(const engine::AlertEvent& e) {
  if (e.kind == engine::AlertKind::drift && e.transition == engine::Transition::raised) drift_raised = true;
}

EngineRunner::EngineRunner(std::shared_ptr<const config::ChannelConfig> cfg, engine::EngineTables& tables)
    : engine_(std::move(cfg), config::TimeRules{}, tables) {}

PairObservation EngineRunner::feed(const Pair& p) {
  const std::uint64_t before = engine_.counters().pairs_in_fit;
  engine_.on_pair(start_time_ns + static_cast<protocol::TimeNs>(fed_) * pair_interval_ns, p.x, p.y, sink_);
  ++fed_;
  PairObservation o;
  o.evaluations = engine_.last_finding().evaluated ? engine_.counters().pairs_in_fit - before : 0;
  o.present = o.evaluations > 0 && engine_.last_finding().present;
  o.statistic = engine_.last_finding().statistic;
  return o;
}

RunOutcome EngineRunner::run_to_first_alert(PairSimulator& sim, std::uint64_t max_pairs) {
  RunOutcome out;
  for (std::uint64_t i = 0; i < max_pairs; ++i) {
    feed(sim.next());
    ++out.pairs;
    if (sink_.drift_raised) {
      out.alerted = true;
      break;
    }
  }
  return out;
}

}  // namespace rigcal::study
