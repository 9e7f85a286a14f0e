#pragma once
// Batch weighted least-squares straight-line fit by Householder QR (Eigen) in extended precision, on
// data centred by a two-pass mean. It exists to cross-check the streaming estimator in tests and
// benchmarks: an independent algorithm, never used on the per-pair path.
#include <span>

#include "rigcal/result.hpp"
#include "rigcal/stats/line_fit.hpp"

namespace rigcal::stats {

// w empty means unit weights. REQUIRES: x.size() == y.size() (== w.size() when given).
Result<LineFit> batch_fit(std::span<const double> x, std::span<const double> y, std::span<const double> w,
                          Model model);

}  // namespace rigcal::stats
