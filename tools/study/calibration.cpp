#include "calibration.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "engine_run.hpp"
#include "rigcal/detect/innovations.hpp"
#include "rigcal/detect/mixture.hpp"

namespace rigcal::study {

namespace {

// First-alert pair of each persistence on one stream; entries stay 0 until reached.
std::vector<std::uint64_t> first_alerts(EngineRunner& runner, PairSimulator& sim, const std::vector<int>& grid,
                                        std::uint64_t limit, std::uint64_t& merged) {
  std::vector<std::uint64_t> alert_at(grid.size(), 0);
  std::size_t next = 0;  // grid index of the smallest persistence not reached yet
  std::uint64_t run = 0;
  for (std::uint64_t i = 1; i <= limit && next < grid.size(); ++i) {
    const PairObservation o = runner.feed(sim.next());
    if (o.evaluations == 0) continue;
    if (o.evaluations > 1) ++merged;
    run = o.present ? run + o.evaluations : 0;
    while (next < grid.size() && run >= static_cast<std::uint64_t>(grid[next])) alert_at[next++] = i;
  }
  return alert_at;
}

}  // namespace

std::vector<PersistencePoint> interval_persistence_curve(const StudyChannel& channel, DetectorSetting setting,
                                                         const std::vector<int>& grid, NoiseModel noise,
                                                         const McPlan& plan, engine::EngineTables& tables,
                                                         std::uint64_t* merged) {
  setting.kind = config::DetectorKind::interval;
  setting.raise_after = std::numeric_limits<int>::max();
  const auto cfg = make_channel_config(channel, setting);
  std::vector<PersistencePoint> curve(grid.size());
  for (std::size_t g = 0; g < grid.size(); ++g) curve[g].raise_after = grid[g];
  std::uint64_t merged_count = 0;
  for (int r = 0; r < plan.runs; ++r) {
    EngineRunner runner(cfg, tables);
    PairSimulator sim = make_simulator(channel, noise, {}, stream_seed(plan.seed, plan.family, static_cast<std::uint64_t>(r)));
    const auto alert_at = first_alerts(runner, sim, grid, plan.limit_pairs, merged_count);
    for (std::size_t g = 0; g < grid.size(); ++g)
      curve[g].runs.push_back(alert_at[g] ? RunLength{alert_at[g], true} : RunLength{plan.limit_pairs, false});
  }
  for (auto& p : curve) p.arl0 = estimate_arl(p.runs);
  if (merged) *merged = merged_count;
  return curve;
}

int matching_persistence(const std::vector<PersistencePoint>& curve, double target, int step) {
  for (std::size_t g = 0; g < curve.size(); ++g) {
    if (curve[g].arl0.arl < target) continue;
    if (g == 0) return curve[0].raise_after;
    const double r0 = curve[g - 1].raise_after, r1 = curve[g].raise_after;
    const double a0 = std::log(curve[g - 1].arl0.arl), a1 = std::log(std::min(curve[g].arl0.arl, 1e300));
    const double r = a1 > a0 ? r0 + (std::log(target) - a0) / (a1 - a0) * (r1 - r0) : r1;
    return static_cast<int>(std::ceil(r / step)) * step;
  }
  return 0;
}

std::vector<AlphaPoint> anytime_alpha_curve(const StudyChannel& channel, const std::vector<double>& grid,
                                            std::uint64_t horizon, const McPlan& plan,
                                            engine::EngineTables& tables) {
  DetectorSetting setting;
  setting.kind = config::DetectorKind::anytime;
  const auto cfg = make_channel_config(channel, setting);
  // DriftMonitor's learning length (detector.learn_pairs, else min_pairs, at least 3).
  const std::size_t learn = static_cast<std::size_t>(std::max(cfg->learn_pairs(), 3));
  const stats::CertifiedLine line{cfg->certificate.intercept, cfg->certificate.slope, 0, 0, 0};
  const double sigma = *cfg->sensor.noise_sd;
  std::vector<AlphaPoint> curve(grid.size());
  std::vector<std::uint64_t> hits(grid.size(), 0);
  for (int r = 0; r < plan.runs; ++r) {
    PairSimulator sim = make_simulator(channel, {}, {}, stream_seed(plan.seed, plan.family, static_cast<std::uint64_t>(r)));
    std::vector<double> xs;
    for (std::size_t i = 0; i < learn; ++i) xs.push_back(sim.next().x);
    const detect::ReferenceCentre centre = detect::reference_centre(xs).value();
    // The engine's offset-change default (a quarter of the tolerance), as drift_monitor designs it.
    const double shift = detect::line_shift_sigma(0.25 * channel.tolerance_absolute, 0.0, centre, sigma);
    std::vector<detect::NormalMixtureTest> tests;
    for (std::size_t g = 0; g < grid.size(); ++g) {
      const auto& d = tables.mixture(grid[g], shift);
      curve[g].alpha = grid[g];
      curve[g].rho = d->rho;
      tests.emplace_back(grid[g], d->rho);
    }
    for (std::uint64_t i = learn; i < horizon; ++i) {
      const Pair p = sim.next();
      const double e = detect::offset_innovation(p.x, p.y, line, sigma);
      const double d = (p.x - centre.x_centre) / centre.x_spread;
      for (auto& t : tests)
        if (!t.rejected()) t.update(e, d);
    }
    for (std::size_t g = 0; g < grid.size(); ++g) hits[g] += tests[g].rejected();
  }
  const double n = plan.runs;
  for (std::size_t g = 0; g < grid.size(); ++g) {
    auto& f = curve[g].false_alert_by_horizon;
    f.runs = static_cast<std::uint64_t>(plan.runs);
    f.p = static_cast<double>(hits[g]) / n;
    f.standard_error = std::sqrt(f.p * (1 - f.p) / n);
  }
  return curve;
}

double matching_alpha(const std::vector<AlphaPoint>& curve, double probability) {
  for (std::size_t g = 1; g < curve.size(); ++g) {
    const double p0 = curve[g - 1].false_alert_by_horizon.p, p1 = curve[g].false_alert_by_horizon.p;
    if (!(p0 <= probability && probability <= p1) || !(p1 > p0)) continue;
    const double l0 = std::log(curve[g - 1].alpha), l1 = std::log(curve[g].alpha);
    return std::exp(l0 + (probability - p0) / (p1 - p0) * (l1 - l0));
  }
  return 0;
}

}  // namespace rigcal::study
