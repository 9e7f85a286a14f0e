#pragma once
// Setting the two detectors that have no ARL design to the study's false-alert rate, by simulation.
//
//  - The interval rule re-tests overlapping windows after every pair, so its findings come in long runs
//    and only the persistence raise_after (consecutive findings before an alert) sets its ARL0. One
//    in-control stream gives the run length for every persistence at once: the alert for raise_after = r
//    comes at the first pair where the current run of findings reaches r. The engine is run with an
//    unreachable raise_after and the alert machine's counting repeated outside it.
//  - The anytime-valid test's run length is defective (with probability about 1 - alpha it never alarms),
//    so it has no finite ARL0. It is matched instead on the false-alert probability within a horizon H:
//    1 - exp(-H / ARL0), that of a geometric run length with the target ARL0. Each alpha has its own
//    design rho, so the grid runs one raw test per alpha on the engine's own innovations.
#include <cstdint>
#include <vector>

#include "pair_simulator.hpp"
#include "rigcal/engine/engine_tables.hpp"
#include "run_length_stats.hpp"
#include "study_channel.hpp"

namespace rigcal::study {

struct McPlan {
  int runs = 0;
  std::uint64_t limit_pairs = 0;  // censoring limit per run
  std::uint64_t seed = 0;
  std::uint64_t family = 0;  // stream family (see stream_seed)
};

struct PersistencePoint {
  int raise_after = 0;
  ArlEstimate arl0;
  std::vector<RunLength> runs;
};

// In-control run lengths of the interval rule (setting.kind must be interval; its raise_after is
// ignored) for each persistence of `grid` (ascending). Pairs that cause several evaluations at once
// (the screen releasing held pairs) are counted with the last pair's finding for all of them; `merged`
// reports how many there were (none without spikes).
std::vector<PersistencePoint> interval_persistence_curve(const StudyChannel& channel, DetectorSetting setting,
                                                         const std::vector<int>& grid, NoiseModel noise,
                                                         const McPlan& plan, engine::EngineTables& tables,
                                                         std::uint64_t* merged = nullptr);

// The persistence whose ARL0 matches `target`: log ARL0 interpolated linearly in raise_after between the
// grid points that bracket it, rounded up to a multiple of `step` (the alert machine takes integers; up
// keeps the false-alert rate at or below the target's). Returns 0 when the grid does not reach the target.
int matching_persistence(const std::vector<PersistencePoint>& curve, double target, int step);

struct AlphaPoint {
  double alpha = 0;
  double rho = 0;
  Proportion false_alert_by_horizon;
};

// False-alert probability within `horizon` pairs of the anytime-valid test for each alpha of `grid`,
// the innovations made exactly as the engine makes them (reference centre learned from the first
// learn pairs, configured sigma, no screening needed: in-control noise without spikes is never held).
std::vector<AlphaPoint> anytime_alpha_curve(const StudyChannel& channel, const std::vector<double>& grid,
                                            std::uint64_t horizon, const McPlan& plan,
                                            engine::EngineTables& tables);

// alpha with the given false-alert probability within the horizon: interpolated linearly in
// (log alpha, probability) between bracketing grid points; 0 when the grid does not bracket it.
double matching_alpha(const std::vector<AlphaPoint>& curve, double probability);

}  // namespace rigcal::study
