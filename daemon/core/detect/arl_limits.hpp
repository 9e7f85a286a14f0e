#pragma once
// What the ARL solvers return when the answer is beyond what they can resolve (private to rigcal_core).
#include <algorithm>
#include <cmath>
#include <limits>

namespace rigcal::detect::detail {

// Above this the exit probabilities behind an ARL are below the rounding of the transition matrix
// (~1e-16 per entry times the number of states), so a computed value is noise: report +infinity.
inline constexpr double max_resolvable_arl = 1e12;

inline double finite_arl_or_infinity(double arl) {
  // A value well below 1 is impossible (the first innovation is one step): like an enormous or
  // non-finite one it only comes out of a near-singular system, whose true ARL is enormous.
  if (!std::isfinite(arl) || arl > max_resolvable_arl || arl < 1.0 - 1e-6) {
    return std::numeric_limits<double>::infinity();
  }
  return std::max(arl, 1.0);  // a huge shift: ARL 1 up to rounding
}

// 1/ARL = 1/ARL+ + 1/ARL-; an unresolvable side contributes no alarms.
inline double combine_two_sided(double up, double down) {
  const double rate = (std::isinf(up) ? 0.0 : 1.0 / up) + (std::isinf(down) ? 0.0 : 1.0 / down);
  return rate == 0 ? std::numeric_limits<double>::infinity() : 1.0 / rate;
}

}  // namespace rigcal::detect::detail
