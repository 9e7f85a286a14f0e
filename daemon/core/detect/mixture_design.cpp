// The mixture's prior scale rho for a design shift (see design_mixture in mixture.hpp).
#include <boost/math/tools/minima.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>

#include "format_number.hpp"
#include "rigcal/detect/mixture.hpp"

namespace rigcal::detect {
namespace {

// In eta = (rho / delta)^2 and m = t delta^2: log M along the drift minus the threshold,
//   g(m) = eta m^2 / (2 (1 + eta m)) - log(1 + eta m) - log(1/alpha).
// g(0) < 0; g first falls (the log term) and then grows without bound, so it has one root.
double drift_gap(double eta, double m, double log_threshold) {
  return 0.5 * eta * m * m / (1 + eta * m) - std::log1p(eta * m) - log_threshold;
}

double crossing(double eta, double log_threshold) {
  auto g = [&](double m) { return drift_gap(eta, m, log_threshold); };
  double hi = 1;
  while (g(hi) <= 0) hi *= 2;
  std::uintmax_t iterations = 200;
  const auto r = boost::math::tools::toms748_solve(g, 0.0, hi, g(0.0), g(hi),
                                                   boost::math::tools::eps_tolerance<double>(45), iterations);
  return 0.5 * (r.first + r.second);
}

}  // namespace

Result<MixtureDesign> design_mixture(double alpha, double shift_sigma) {
  if (!std::isfinite(alpha) || alpha <= 0 || alpha >= 1) {
    return Error{"mixture test alpha must be in (0, 1), got " + detail::format_number(alpha)};
  }
  if (!std::isfinite(shift_sigma) || shift_sigma <= 0) {
    return Error{"design shift must be finite and > 0 (noise standard deviations), got " +
                 detail::format_number(shift_sigma)};
  }
  const double log_threshold = -std::log(alpha);
  // Minimise the crossing over log eta; the optimum sits well inside [1e-6, 1e6] for any alpha.
  auto f = [&](double log_eta) { return crossing(std::exp(log_eta), log_threshold); };
  const auto best = boost::math::tools::brent_find_minima(f, std::log(1e-6), std::log(1e6), 40);
  MixtureDesign d;
  d.rho = shift_sigma * std::exp(0.5 * best.first);
  d.detection_pairs = best.second / (shift_sigma * shift_sigma);
  return d;
}

}  // namespace rigcal::detect
