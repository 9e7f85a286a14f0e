#pragma once
// The run-length study: what is simulated, in which order, and what comes out.
//
// Roadmap of run_study():
//   1. match the detectors without an ARL design to the target ARL0 (calibration.hpp): the interval
//      rule's persistence at 95 % and 99 % confidence, the anytime test's alpha;
//   2. in-control run lengths of every detector column under every noise condition;
//   3. detection delays of steps and ramps after a burn-in, i.i.d. noise, and of two steps after a long
//      time in control and under each other noise condition;
//   4. the realistic setting (one false alert a year at 1 pair/s): designs read back from the engine,
//      their analytic ARL1 for offset steps, and simulated delays;
//   5. the simulator check: bare CUSUM and EWMA against published ARLs;
//   6. engine behaviours seen on the way (the slope pairing's innovation rate).
// Every figure is computed here from fixed seeds; nothing is carried over from an earlier run.
#include <cstdint>
#include <string>
#include <vector>

#include "calibration.hpp"
#include "diagnostics.hpp"
#include "pair_simulator.hpp"
#include "rigcal/engine/drift_monitor.hpp"
#include "run_length_stats.hpp"
#include "study_channel.hpp"
#include "study_runs.hpp"

namespace rigcal::study {

struct StudyOptions {
  bool quick = false;             // CI smoke run: fewer replicates, conditions and changes
  std::uint64_t seed = 20240601;  // base of every stream seed
  double target_arl0 = 20000;     // pairs; measurable by Monte Carlo in bounded time
  double realistic_arl0 = 365.0 * 86400.0;  // one false alert a year at one pair per second
  std::uint64_t burn_in_pairs = 2000;       // before a change: learning, a full fit window, steady state
  std::uint64_t late_burn_in_pairs = 20000;
  bool progress = true;  // one line per step on stderr
};

struct Condition {
  std::string label;
  NoiseModel noise;
  double configured_sigma_factor = 1;
  bool screening = true;
};

struct ChangeSpec {
  std::string label;
  ChangeKind kind = ChangeKind::none;
  double size = 0;
};

struct Column {
  std::string label;
  DetectorSetting setting;
};

struct Arl0Cell {
  ArlEstimate arl0;
  Proportion false_alert_by_target;  // P(alert within target_arl0 pairs)
};

struct RawCheck {
  std::string detector;  // e.g. "CUSUM k = 0.5, h = 4"
  double mu = 0;
  double published = 0;
  std::string source;
  ArlEstimate simulated;
};

struct RealisticDesign {
  std::string label;
  engine::DriftDesign design;
  std::vector<double> analytic_offset_arl1;  // per offset step of the study, zero-state, i.i.d.
  std::vector<double> arl0_by_sigma_factor;  // cusum / ewma: channel ARL0 when sigma is misconfigured
};

// Configured noise SD over the true one, for the sensitivity of the designed ARL0: one and two standard
// errors (13 %) of a sigma learned from 30 pairs (28 degrees of freedom: relative SE 1 / sqrt(56)).
inline constexpr double sigma_factors[] = {0.75, 0.87, 0.93, 1.0, 1.07, 1.13};

struct StudyResults {
  StudyOptions options;
  StudyChannel channel;
  double seconds = 0;      // wall clock
  double cpu_seconds = 0;  // processor time of this (single-threaded) process
  std::uint64_t pairs_simulated = 0;

  // 1. calibration
  std::vector<PersistencePoint> interval95_curve, interval99_curve;
  int persistence95 = 0, persistence99 = 0;
  std::uint64_t merged_evaluations = 0;
  std::vector<AlphaPoint> alpha_curve;
  double matched_alpha = 0;
  double matched_probability = 0;  // 1 - exp(-1): P(false alert within ARL0 pairs) of a geometric run length

  // 2-3. the columns, conditions and changes, and their cells
  std::vector<Column> columns;
  std::vector<Condition> conditions;  // conditions[0] is i.i.d. normal noise
  std::vector<ChangeSpec> changes;    // under conditions[0]
  std::vector<ChangeSpec> probe_changes;  // late changes and the other conditions
  std::vector<std::vector<Arl0Cell>> arl0;                        // [condition][column]
  std::vector<ScreenTotals> screen_totals;                        // [condition], over the cusum column's runs
  std::vector<std::vector<DelayEstimate>> delays;                 // [change][column]
  std::vector<std::vector<DelayEstimate>> late_delays;            // [probe change][column]
  std::vector<std::vector<std::vector<DelayEstimate>>> condition_delays;  // [condition][probe][column]

  // 4. realistic setting
  std::vector<Column> realistic_columns;
  std::vector<RealisticDesign> realistic_designs;
  std::vector<std::vector<DelayEstimate>> realistic_delays;  // [change][realistic column]

  // 5. simulator check
  std::vector<RawCheck> raw_checks;

  // 6. engine behaviours
  std::vector<PairingRate> pairing_rates;  // learned from 30 (the default) and 300 pairs, and exact
};

StudyResults run_study(const StudyOptions& options);

// The parts of the plan, exposed for tests and the report.
std::vector<Condition> study_conditions(bool quick);
std::vector<ChangeSpec> study_changes(bool quick);
std::vector<ChangeSpec> probe_changes();
Change make_change(const ChangeSpec& spec, std::uint64_t start_pair);

}  // namespace rigcal::study
