#pragma once
// The two kinds of Monte Carlo run the study makes through the engine.
#include <cstdint>
#include <vector>

#include "calibration.hpp"
#include "pair_simulator.hpp"
#include "rigcal/engine/engine_tables.hpp"
#include "run_length_stats.hpp"
#include "study_channel.hpp"

namespace rigcal::study {

// What the outlier screen did over a set of runs (engine counters summed).
struct ScreenTotals {
  std::uint64_t pairs = 0;
  std::uint64_t outliers = 0;  // pairs rejected as isolated spikes
  std::uint64_t released = 0;  // held pairs released into the fit as a real change
};

// In-control run lengths: from a fresh channel (learning included) to the first drift alert, censored
// at plan.limit_pairs. Replicate r uses stream stream_seed(plan.seed, plan.family, r).
std::vector<RunLength> in_control_runs(const StudyChannel& channel, const DetectorSetting& setting, NoiseModel noise,
                                       const McPlan& plan, engine::EngineTables& tables,
                                       ScreenTotals* screen = nullptr);

// Detection delays of `change` (its start_pair is the burn-in): replicates with an alert before the
// change are counted in `false_alerts` and dropped; the others give the pairs from the change to the
// alert (1 = the first changed pair raised it), censored at plan.limit_pairs after the change.
struct DelayRuns {
  std::vector<RunLength> delays;
  std::uint64_t false_alerts = 0;
};
DelayRuns delay_runs(const StudyChannel& channel, const DetectorSetting& setting, NoiseModel noise, Change change,
                     const McPlan& plan, engine::EngineTables& tables);

}  // namespace rigcal::study
