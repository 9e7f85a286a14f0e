#pragma once
// Safeguarded Newton iteration for the root of an increasing function on a bracket, shared by the
// thermocouple and RTD inverses. Newton converges quadratically from the good starting values those
// callers have (published inverse polynomials, the quadratic CVD root); the bracket and the fall-back
// to bisection guarantee termination for any starting value and keep the answer inside the range.
#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>

namespace rigcal::metrology::detail {

// Stop as soon as |f(t)| <= residual or |Newton step| <= step (either may be 0 to disable it).
struct RootStop {
  double residual;
  double step;
};

// REQUIRES: f increasing on [lo, hi] with f(lo) <= 0 <= f(hi); df its derivative.
// Returns the root after the last Newton correction. If f jumps over zero (the published thermocouple
// subranges do not meet exactly at their boundaries), no point meets `stop`; the bracket then shrinks
// onto the jump and that point is returned, the smallest t with f(t) >= 0 to rounding.
// nullopt if 200 iterations did not end (not reached: bisection alone needs under 70 for doubles).
template <class F, class DF>
std::optional<double> increasing_root(F f, DF df, double lo, double hi, double guess, RootStop stop) {
  double t = std::clamp(guess, lo, hi);
  for (int iteration = 0; iteration < 200; ++iteration) {
    const double r = f(t);
    if (r < 0) {
      lo = t;
    } else {
      hi = t;
    }
    if (!(hi - lo > 4 * std::numeric_limits<double>::epsilon() * std::max(1.0, std::abs(t)))) return t;
    const double slope = df(t);
    const bool newton_ok = slope > 0 && std::isfinite(slope);
    const double step = newton_ok ? r / slope : 0.0;
    // The residual test passes one step before the answer is final: that step is still applied, so
    // the result is closer than the tolerance promises.
    if (newton_ok && (std::abs(r) <= stop.residual || std::abs(step) <= stop.step)) {
      return std::clamp(t - step, lo, hi);
    }
    const double next = t - step;
    t = (newton_ok && next > lo && next < hi) ? next : 0.5 * (lo + hi);
  }
  return std::nullopt;
}

}  // namespace rigcal::metrology::detail
