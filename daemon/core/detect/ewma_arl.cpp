// EWMA average run lengths by the Markov chain of Lucas & Saccucci (1990), Richardson-extrapolated in
// the number of cells (see arl.hpp).
#include <cmath>

#include "ewma_chain.hpp"
#include "format_number.hpp"
#include "rigcal/detect/arl.hpp"

namespace rigcal::detect {

Result<double> ewma_arl(double lambda, double L, double mu) {
  if (!std::isfinite(lambda) || lambda < 0.01 || lambda > 1) {
    return Error{"EWMA weight lambda must be in [0.01, 1], got " + detail::format_number(lambda)};
  }
  if (!std::isfinite(L) || L <= 0) {
    return Error{"EWMA limit multiplier L must be finite and > 0, got " + detail::format_number(L)};
  }
  if (!std::isfinite(mu)) return Error{"the mean shift mu must be finite"};
  const double limit = L * std::sqrt(lambda / (2.0 - lambda));
  return detail::ewma_extrapolated_arl(lambda, limit, mu, detail::ewma_coarse_cells(lambda, limit));
}

}  // namespace rigcal::detect
