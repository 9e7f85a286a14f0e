#pragma once
// Standard normal probabilities for the ARL solvers (private to rigcal_core). Every probability is taken
// from the thinner tail, so that the small exit probabilities that set a large ARL keep their digits.
#include <cmath>
#include <numbers>

namespace rigcal::detect::detail {

inline double normal_pdf(double x) {
  return std::exp(-0.5 * x * x) * (std::numbers::inv_sqrtpi / std::numbers::sqrt2);
}

// P(Z <= x) and P(Z > x) from one erfc call, each accurate to relative precision in its own tail.
struct NormalTails {
  double lower = 0.5;
  double upper = 0.5;
};
inline NormalTails normal_tails(double x) {
  const double thin = 0.5 * std::erfc(std::abs(x) / std::numbers::sqrt2);
  return x < 0 ? NormalTails{thin, 1.0 - thin} : NormalTails{1.0 - thin, thin};
}

inline double normal_cdf(double x) { return 0.5 * std::erfc(-x / std::numbers::sqrt2); }

// P(a < Z <= b) for a <= b given the tails at a and b: the difference is formed where it does not cancel.
inline double normal_interval(double a, const NormalTails& ta, double b, const NormalTails& tb) {
  if (a >= 0) return ta.upper - tb.upper;
  if (b <= 0) return tb.lower - ta.lower;
  return 1.0 - ta.lower - tb.upper;
}

}  // namespace rigcal::detect::detail
