#include "realistic.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

#include "engine_run.hpp"
#include "rigcal/detect/arl.hpp"

namespace rigcal::study {

double anytime_detection_pairs(double alpha, double rho, double delta) {
  const double target = std::log(1 / alpha);
  auto log_m = [&](double t) {
    const double r2t = rho * rho * t;
    return 0.5 * r2t * t * delta * delta / (1 + r2t) - std::log(1 + r2t);
  };
  // log_m is negative near 0 and eventually increasing; find the first crossing on a doubling grid,
  // then bisect inside the bracket.
  double lo = 0, hi = 1;
  while (log_m(hi) < target) {
    lo = hi;
    hi *= 2;
    if (hi > 1e12) return std::numeric_limits<double>::infinity();
  }
  for (int i = 0; i < 200 && hi - lo > 1e-9 * hi; ++i) {
    const double mid = 0.5 * (lo + hi);
    (log_m(mid) < target ? lo : hi) = mid;
  }
  return hi;
}

double misconfigured_arl0(const engine::DriftDesign& d, double factor) {
  double offset = 0, slope = 0;
  if (d.kind == "cusum") {
    offset = detect::cusum_arl_two_sided(d.k_offset * factor, d.h_offset * factor, 0).value();
    slope = detect::cusum_arl_two_sided(d.k_slope * factor, d.h_slope * factor, 0).value();
  } else if (d.kind == "ewma") {
    offset = detect::ewma_arl(d.lambda_offset, d.L_offset * factor, 0).value();
    slope = detect::ewma_arl(d.lambda_slope, d.L_slope * factor, 0).value();
  } else {
    return std::numeric_limits<double>::quiet_NaN();
  }
  return 1 / (1 / offset + 1 / (2 * slope));
}

RealisticDesign realistic_design(const StudyChannel& channel, const std::string& label, const DetectorSetting& setting,
                                 const std::vector<double>& offset_steps_sigma, std::uint64_t seed,
                                 engine::EngineTables& tables) {
  EngineRunner runner(make_channel_config(channel, setting), tables);
  PairSimulator sim = make_simulator(channel, {}, {}, stream_seed(seed, 70000, 0));
  for (int i = 0; i < 1000 && runner.engine().drift().phase() != engine::DriftMonitor::Phase::monitoring; ++i)
    runner.feed(sim.next());
  if (runner.engine().drift().phase() != engine::DriftMonitor::Phase::monitoring)
    throw std::runtime_error("realistic design for " + label + ": the detector did not start: " +
                             runner.engine().drift().unavailable_reason());
  RealisticDesign out;
  out.label = label;
  out.design = runner.engine().drift().design();
  const auto& d = out.design;
  for (double delta : offset_steps_sigma) {
    double arl1 = std::numeric_limits<double>::quiet_NaN();
    if (setting.kind == config::DetectorKind::cusum) {
      arl1 = detect::cusum_arl_two_sided(d.k_offset, d.h_offset, delta).value();
    } else if (setting.kind == config::DetectorKind::ewma) {
      arl1 = detect::ewma_arl(d.lambda_offset, d.L_offset, delta).value();
    } else if (setting.kind == config::DetectorKind::anytime) {
      arl1 = anytime_detection_pairs(d.alpha, d.rho, delta);
    }
    out.analytic_offset_arl1.push_back(arl1);
  }
  if (setting.kind == config::DetectorKind::cusum || setting.kind == config::DetectorKind::ewma)
    for (double f : sigma_factors) out.arl0_by_sigma_factor.push_back(misconfigured_arl0(d, f));
  return out;
}

}  // namespace rigcal::study
