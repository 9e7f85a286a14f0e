#include "study_runs.hpp"

#include "engine_run.hpp"

namespace rigcal::study {

std::vector<RunLength> in_control_runs(const StudyChannel& channel, const DetectorSetting& setting, NoiseModel noise,
                                       const McPlan& plan, engine::EngineTables& tables, ScreenTotals* screen) {
  const auto cfg = make_channel_config(channel, setting);
  std::vector<RunLength> out;
  out.reserve(static_cast<std::size_t>(plan.runs));
  for (int r = 0; r < plan.runs; ++r) {
    EngineRunner runner(cfg, tables);
    PairSimulator sim = make_simulator(channel, noise, {}, stream_seed(plan.seed, plan.family, static_cast<std::uint64_t>(r)));
    const RunOutcome o = runner.run_to_first_alert(sim, plan.limit_pairs);
    out.push_back({o.pairs, o.alerted});
    if (screen) {
      const auto& n = runner.engine().counters();
      screen->pairs += n.pairs;
      screen->outliers += n.outliers;
      screen->released += n.released;
    }
  }
  return out;
}

DelayRuns delay_runs(const StudyChannel& channel, const DetectorSetting& setting, NoiseModel noise, Change change,
                     const McPlan& plan, engine::EngineTables& tables) {
  const auto cfg = make_channel_config(channel, setting);
  DelayRuns out;
  for (int r = 0; r < plan.runs; ++r) {
    EngineRunner runner(cfg, tables);
    PairSimulator sim = make_simulator(channel, noise, change, stream_seed(plan.seed, plan.family, static_cast<std::uint64_t>(r)));
    if (runner.run_to_first_alert(sim, change.start_pair).alerted) {
      ++out.false_alerts;
      continue;
    }
    const RunOutcome o = runner.run_to_first_alert(sim, plan.limit_pairs);
    out.delays.push_back({o.pairs, o.alerted});
  }
  return out;
}

}  // namespace rigcal::study
