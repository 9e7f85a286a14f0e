#include "study.hpp"

#include <chrono>
#include <cmath>
#include <ctime>
#include <cstdio>
#include <stdexcept>

#include "engine_run.hpp"
#include "raw_run_lengths.hpp"
#include "realistic.hpp"
#include "rigcal/detect/cusum.hpp"
#include "rigcal/detect/ewma.hpp"
#include "study_runs.hpp"

namespace rigcal::study {

namespace {

using Clock = std::chrono::steady_clock;

// Replicates and limits of one mode. Full: about 5 minutes on one core; quick: about 20 s.
struct Sizes {
  int calibration_runs, long_persistence_runs, alpha_runs, arl0_runs, arl0_runs_other, arl0_runs_anytime,
      delay_runs, late_runs, condition_runs, realistic_runs, raw_runs;
};
Sizes sizes_of(bool quick) {
  if (quick) return {40, 0, 300, 80, 40, 20, 50, 40, 30, 50, 2000};
  return {500, 50, 2000, 1000, 200, 100, 500, 300, 300, 500, 20000};
}

// Stream families (see stream_seed): the same family for every column of a cell row, so the detectors
// are compared on identical streams.
constexpr std::uint64_t family_calibration = 1, family_alpha = 2, family_long_persistence = 3;
std::uint64_t family_arl0(std::size_t condition) { return 1000 + 100 * condition; }
std::uint64_t family_delay(std::size_t condition, std::size_t change) { return 1001 + 100 * condition + change; }
std::uint64_t family_late(std::size_t change) { return 50000 + change; }
std::uint64_t family_realistic(std::size_t change) { return 60000 + change; }

class Progress {
 public:
  explicit Progress(bool on) : on_(on), start_(Clock::now()) {}
  void say(const std::string& what) const {
    if (!on_) return;
    std::fprintf(stderr, "[%7.1f s] %s\n", seconds(), what.c_str());
  }
  double seconds() const { return std::chrono::duration<double>(Clock::now() - start_).count(); }

 private:
  bool on_;
  Clock::time_point start_;
};

std::uint64_t exposure(const std::vector<RunLength>& runs) {
  std::uint64_t n = 0;
  for (const auto& r : runs) n += r.pairs;
  return n;
}

void calibrate(StudyResults& res, const Sizes& z, engine::EngineTables& tables, const Progress& progress) {
  const auto& o = res.options;
  const McPlan plan{z.calibration_runs, static_cast<std::uint64_t>(5 * o.target_arl0), o.seed, family_calibration};
  DetectorSetting interval;
  interval.kind = config::DetectorKind::interval;
  progress.say("calibrating the interval rule's persistence (95 %)");
  res.interval95_curve = interval_persistence_curve(res.channel, interval, {25, 50, 100, 150, 200, 250, 300, 350, 400, 450, 500, 600},
                                                    {}, plan, tables, &res.merged_evaluations);
  progress.say("calibrating the interval rule's persistence (99 %)");
  interval.confidence = 0.99;
  std::uint64_t merged99 = 0;
  res.interval99_curve = interval_persistence_curve(res.channel, interval, {25, 50, 75, 100, 125, 150, 200}, {}, plan,
                                                    tables, &merged99);
  res.merged_evaluations += merged99;
  // All persistences of a curve share its streams, which run until the largest one alerts.
  res.pairs_simulated += exposure(res.interval95_curve.back().runs) + exposure(res.interval99_curve.back().runs);
  if (z.long_persistence_runs > 0) {
    progress.say("interval rule: long persistences (95 %)");
    interval.confidence = 0.95;
    const McPlan long_plan{z.long_persistence_runs, 1000000, o.seed, family_long_persistence};
    auto long_curve = interval_persistence_curve(res.channel, interval, {1000, 1500, 2000}, {}, long_plan, tables);
    res.pairs_simulated += exposure(long_curve.back().runs);
    for (auto& p : long_curve) res.interval95_curve.push_back(std::move(p));
  }
  res.persistence95 = matching_persistence(res.interval95_curve, o.target_arl0, 5);
  res.persistence99 = matching_persistence(res.interval99_curve, o.target_arl0, 5);
  if (res.persistence95 == 0 || res.persistence99 == 0)
    throw std::runtime_error("the persistence grid does not reach the target ARL0; widen it");

  progress.say("calibrating the anytime test's alpha");
  res.matched_probability = 1 - std::exp(-1.0);
  const McPlan alpha_plan{z.alpha_runs, 0, o.seed, family_alpha};
  res.alpha_curve = anytime_alpha_curve(res.channel, {0.001, 0.01, 0.1, 0.3, 0.5, 0.6, 0.65, 0.7, 0.75, 0.8, 0.9},
                                        static_cast<std::uint64_t>(o.target_arl0), alpha_plan, tables);
  res.matched_alpha = matching_alpha(res.alpha_curve, res.matched_probability);
  if (res.matched_alpha == 0) throw std::runtime_error("the alpha grid does not bracket the matched probability");
  // Rounded to two significant digits, as an operator would configure it.
  res.matched_alpha = std::round(res.matched_alpha * 100) / 100;
}

std::vector<Column> study_columns(const StudyResults& res) {
  const double target = res.options.target_arl0;
  auto setting = [target](config::DetectorKind k) {
    DetectorSetting s;
    s.kind = k;
    s.target_arl0_pairs = target;
    return s;
  };
  Column i95{"interval 95 %, raise_after " + std::to_string(res.persistence95), setting(config::DetectorKind::interval)};
  i95.setting.raise_after = res.persistence95;
  Column i99{"interval 99 %, raise_after " + std::to_string(res.persistence99), setting(config::DetectorKind::interval)};
  i99.setting.raise_after = res.persistence99;
  i99.setting.confidence = 0.99;
  Column cusum{"cusum", setting(config::DetectorKind::cusum)};
  Column ewma{"ewma", setting(config::DetectorKind::ewma)};
  char alpha[32];
  std::snprintf(alpha, sizeof alpha, "%.2g", res.matched_alpha);
  Column any{std::string("anytime, alpha ") + alpha + " (matched)", setting(config::DetectorKind::anytime)};
  any.setting.alpha = res.matched_alpha;
  Column any_default{"anytime, alpha 0.001 (default)", setting(config::DetectorKind::anytime)};
  return {i95, i99, cusum, ewma, any, any_default};
}

DetectorSetting under(const DetectorSetting& s, const Condition& c) {
  DetectorSetting out = s;
  out.configured_sigma_factor = c.configured_sigma_factor;
  out.screening = c.screening;
  return out;
}

void in_control(StudyResults& res, const Sizes& z, engine::EngineTables& tables, const Progress& progress) {
  const auto& o = res.options;
  res.arl0.assign(res.conditions.size(), {});
  res.screen_totals.assign(res.conditions.size(), {});
  for (std::size_t c = 0; c < res.conditions.size(); ++c) {
    progress.say("in-control run lengths: " + res.conditions[c].label);
    for (const Column& col : res.columns) {
      const bool anytime_default = col.setting.kind == config::DetectorKind::anytime && col.setting.alpha < 0.01;
      int runs = c == 0 ? z.arl0_runs : z.arl0_runs_other;
      // The default anytime test almost never alerts, so its runs go to the limit: fewer of them.
      if (anytime_default) runs = c == 0 ? 2 * z.arl0_runs_anytime : z.arl0_runs_anytime;
      const McPlan plan{runs, static_cast<std::uint64_t>(5 * o.target_arl0), o.seed, family_arl0(c)};
      const bool count_screen = col.setting.kind == config::DetectorKind::cusum;
      const auto runs_out = in_control_runs(res.channel, under(col.setting, res.conditions[c]), res.conditions[c].noise,
                                            plan, tables, count_screen ? &res.screen_totals[c] : nullptr);
      res.pairs_simulated += exposure(runs_out);
      res.arl0[c].push_back({estimate_arl(runs_out),
                             alarm_fraction_by(runs_out, static_cast<std::uint64_t>(o.target_arl0))});
    }
  }
}

std::vector<DelayEstimate> delay_row(StudyResults& res, const std::vector<Column>& columns, const Condition& cond,
                                     const Change& change, const McPlan& plan, engine::EngineTables& tables) {
  std::vector<DelayEstimate> row;
  for (const Column& col : columns) {
    const DelayRuns d = delay_runs(res.channel, under(col.setting, cond), cond.noise, change, plan, tables);
    res.pairs_simulated += exposure(d.delays) + (d.delays.size() + d.false_alerts) * change.start_pair;
    row.push_back(estimate_delay(d.delays, d.false_alerts));
  }
  return row;
}

void detection(StudyResults& res, const Sizes& z, engine::EngineTables& tables, const Progress& progress) {
  const auto& o = res.options;
  const std::uint64_t limit = 100000;
  for (std::size_t k = 0; k < res.changes.size(); ++k) {
    progress.say("delays: " + res.changes[k].label);
    const McPlan plan{z.delay_runs, limit, o.seed, family_delay(0, k)};
    res.delays.push_back(delay_row(res, res.columns, res.conditions[0], make_change(res.changes[k], o.burn_in_pairs),
                                   plan, tables));
  }
  for (std::size_t k = 0; k < res.probe_changes.size(); ++k) {
    progress.say("delays after a long time in control: " + res.probe_changes[k].label);
    const McPlan plan{z.late_runs, limit, o.seed, family_late(k)};
    res.late_delays.push_back(delay_row(res, res.columns, res.conditions[0],
                                        make_change(res.probe_changes[k], o.late_burn_in_pairs), plan, tables));
  }
  res.condition_delays.assign(res.conditions.size(), {});
  for (std::size_t c = 1; c < res.conditions.size(); ++c) {
    progress.say("delays: " + res.conditions[c].label);
    for (std::size_t k = 0; k < res.probe_changes.size(); ++k) {
      const McPlan plan{z.condition_runs, limit, o.seed, family_delay(c, k)};
      res.condition_delays[c].push_back(delay_row(res, res.columns, res.conditions[c],
                                                  make_change(res.probe_changes[k], o.burn_in_pairs), plan, tables));
    }
  }
}

void realistic(StudyResults& res, const Sizes& z, engine::EngineTables& tables, const Progress& progress) {
  const auto& o = res.options;
  progress.say("realistic setting: designs");
  for (auto k : {config::DetectorKind::cusum, config::DetectorKind::ewma, config::DetectorKind::anytime}) {
    DetectorSetting s;
    s.kind = k;
    s.target_arl0_pairs = o.realistic_arl0;
    res.realistic_columns.push_back({std::string(kind_label(k)) + (k == config::DetectorKind::anytime ? ", alpha 0.001" : ""), s});
  }
  std::vector<double> offsets;
  for (const auto& c : res.changes)
    if (c.kind == ChangeKind::offset_step) offsets.push_back(c.size);
  for (const Column& col : res.realistic_columns)
    res.realistic_designs.push_back(realistic_design(res.channel, col.label, col.setting, offsets, o.seed, tables));
  for (std::size_t k = 0; k < res.changes.size(); ++k) {
    if (res.changes[k].kind != ChangeKind::gain_step && res.changes[k].kind != ChangeKind::offset_step) continue;
    progress.say("realistic setting: delays, " + res.changes[k].label);
    const McPlan plan{z.realistic_runs, 200000, o.seed, family_realistic(k)};
    res.realistic_delays.push_back(delay_row(res, res.realistic_columns, res.conditions[0],
                                             make_change(res.changes[k], o.burn_in_pairs), plan, tables));
  }
}

void raw_checks(StudyResults& res, const Sizes& z) {
  // Published two-sided ARLs: Montgomery & Runger, Table 16-9 (= Lucas & Crosier 1982, Table 1) for the
  // CUSUM; Lucas & Saccucci (1990), Table 3, for the EWMA. Copies of both are in tests/data
  // (cusum_arl_two_sided_k05.dat, ewma_arl_literature.dat), with their provenance.
  struct Spec {
    const char* detector;
    bool cusum;
    double a, b, mu, published;
    const char* source;
  };
  const Spec specs[] = {
      {"CUSUM k = 0.5, h = 4", true, 0.5, 4, 0, 168, "Montgomery & Runger Table 16-9; Lucas & Crosier (1982)"},
      {"CUSUM k = 0.5, h = 5", true, 0.5, 5, 0, 465, "Montgomery & Runger Table 16-9"},
      {"CUSUM k = 0.5, h = 4", true, 0.5, 4, 1, 8.38, "Montgomery & Runger Table 16-9; Lucas & Crosier (1982)"},
      {"EWMA lambda = 0.5, L = 3.071", false, 0.5, 3.071, 0, 500, "Lucas & Saccucci (1990) Table 3"},
      {"EWMA lambda = 0.03, L = 2.437", false, 0.03, 2.437, 0, 500, "Lucas & Saccucci (1990) Table 3"},
      {"EWMA lambda = 0.03, L = 2.437", false, 0.03, 2.437, 1, 12.6, "Lucas & Saccucci (1990) Table 3"},
  };
  std::uint64_t seed = res.options.seed;
  for (const Spec& s : specs) {
    const int runs = s.mu == 0 ? z.raw_runs : z.raw_runs / 4;
    const auto rl = s.cusum ? raw_run_lengths(detect::Cusum(s.a, s.b), s.mu, runs, 1000000, ++seed)
                            : raw_run_lengths(detect::Ewma(s.a, s.b), s.mu, runs, 1000000, ++seed);
    res.raw_checks.push_back({s.detector, s.mu, s.published, s.source, estimate_arl(rl)});
  }
}

}  // namespace

std::vector<Condition> study_conditions(bool quick) {
  std::vector<Condition> c;
  c.push_back({"i.i.d. normal noise", {}, 1, true});
  c.push_back({"AR(1) noise, phi = 0.5", {1, 0.5, 0, 20}, 1, true});
  if (!quick) c.push_back({"AR(1) noise, phi = 0.8", {1, 0.8, 0, 20}, 1, true});
  if (!quick) c.push_back({"AR(1) phi = 0.5, sigma configured x sqrt(3)", {1, 0.5, 0, 20}, std::sqrt(3.0), true});
  if (!quick) c.push_back({"AR(1) phi = 0.8, sigma configured x 3", {1, 0.8, 0, 20}, 3.0, true});
  c.push_back({"0.5 % spikes of 20 sigma, screening on", {1, 0, 0.005, 20}, 1, true});
  if (!quick) c.push_back({"0.5 % spikes of 20 sigma, screening off", {1, 0, 0.005, 20}, 1, false});
  return c;
}

std::vector<ChangeSpec> study_changes(bool quick) {
  if (quick)
    return {{"gain step 1 %", ChangeKind::gain_step, 0.01}, {"offset step 1 sigma", ChangeKind::offset_step, 1.0}};
  return {
      {"gain step 0.5 %", ChangeKind::gain_step, 0.005},
      {"gain step 1 %", ChangeKind::gain_step, 0.01},
      {"gain step 2 %", ChangeKind::gain_step, 0.02},
      {"gain step 5 %", ChangeKind::gain_step, 0.05},
      {"offset step 0.5 sigma", ChangeKind::offset_step, 0.5},
      {"offset step 1 sigma", ChangeKind::offset_step, 1.0},
      {"offset step 2 sigma", ChangeKind::offset_step, 2.0},
      {"gain ramp 0.1 % per 1000 pairs", ChangeKind::gain_ramp, 0.001},
      {"gain ramp 1 % per 1000 pairs", ChangeKind::gain_ramp, 0.01},
      {"offset ramp 0.1 sigma per 1000 pairs", ChangeKind::offset_ramp, 0.1},
      {"offset ramp 1 sigma per 1000 pairs", ChangeKind::offset_ramp, 1.0},
  };
}

std::vector<ChangeSpec> probe_changes() {
  return {{"gain step 1 %", ChangeKind::gain_step, 0.01}, {"offset step 1 sigma", ChangeKind::offset_step, 1.0}};
}

Change make_change(const ChangeSpec& spec, std::uint64_t start_pair) { return {spec.kind, spec.size, start_pair}; }

StudyResults run_study(const StudyOptions& options) {
  const Progress progress(options.progress);
  const std::clock_t cpu_start = std::clock();
  const Sizes z = sizes_of(options.quick);
  engine::EngineTables tables;
  StudyResults res;
  res.options = options;
  res.conditions = study_conditions(options.quick);
  res.changes = study_changes(options.quick);
  res.probe_changes = probe_changes();
  calibrate(res, z, tables, progress);
  res.columns = study_columns(res);
  in_control(res, z, tables, progress);
  detection(res, z, tables, progress);
  realistic(res, z, tables, progress);
  progress.say("simulator check against published ARLs");
  raw_checks(res, z);
  progress.say("slope pairing rate");
  const int channels = options.quick ? 200 : 2000;
  for (const int learn : {30, 300, 0}) res.pairing_rates.push_back(slope_pairing_rate(res.channel, learn, channels, 20000, options.seed));
  res.seconds = progress.seconds();
  res.cpu_seconds = static_cast<double>(std::clock() - cpu_start) / static_cast<double>(CLOCKS_PER_SEC);
  progress.say("done");
  return res;
}

}  // namespace rigcal::study
