#pragma once
// Private to the York fit sources: the part of a YorkFit that both the batch iteration and the closed
// form from moments derive the same way once slope, intercept and the sums are known.
#include <cstdint>

#include "rigcal/result.hpp"
#include "rigcal/stats/york_fit.hpp"

namespace rigcal::stats::detail {

struct YorkSolution {
  std::uint64_t count = 0;
  double dof = 0;
  double a = 0;
  double b = 0;
  double var_b = 0;            // 1 / sum W_i u_i^2
  double sum_weights = 0;      // sum W_i
  double mean_x_adjusted = 0;  // xbar of the adjusted points
  double mean_y_adjusted = 0;  // a + b xbar
  double chi_square = 0;       // S
  int iterations = 0;
};

// Adds York's u_a and cov_ab, the chi-square test and the scaled uncertainties. Fails when a value
// does not fit in a double.
Result<YorkFit> complete_york_fit(const YorkSolution& s);

}  // namespace rigcal::stats::detail
