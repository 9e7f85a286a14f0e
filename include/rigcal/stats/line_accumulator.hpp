#pragma once
// One-pass weighted least-squares state for the straight line y = b0 + b1 x.
//
// Holds weighted means and centred co-moments (never raw sums of squares, which lose every digit
// when the readings sit at a large offset), plus the residual sum of squares about the current
// least-squares line, updated by the recursive least-squares identity so that it stays accurate
// when R^2 is close to 1 (where Cyy - Cxy^2/Cxx cancels catastrophically).
//
// Offsets: the first pair after a reset becomes the origin of a shifted frame (shift_x, shift_y), and
// the running means are kept relative to it. Readings that sit at 1e9 with a spread of 10 then carry
// rounding of the spread, not of the offset, through a million updates.
//
// Weights: each pair carries a precision weight w > 0 (1 for ordinary least squares). Exponential
// forgetting multiplies the weight of everything already held by lambda; the forgetting factors
// alone are summed in a1 (sum of a_i) and a2 (sum of a_i^2) so that the Kish effective sample size
// a1^2 / a2 can replace n in the degrees of freedom (see fit_summary.hpp).
//
// Not thread-safe; a channel owns one accumulator.
#include <cstdint>

namespace rigcal::stats {

struct LineMoments {
  std::uint64_t count = 0;  // pairs currently held
  double sum_w = 0;         // sum of weights (precision weight x forgetting factor)
  double shift_x = 0;       // origin of the shifted frame (the first pair after a reset)
  double shift_y = 0;
  double dmean_x = 0;  // weighted means in the shifted frame: mean_x = shift_x + dmean_x
  double dmean_y = 0;
  double cxx = 0;  // sum w (x - mean_x)^2
  double cxy = 0;  // sum w (x - mean_x)(y - mean_y)
  double cyy = 0;  // sum w (y - mean_y)^2
  // Weighted residual sum of squares about the least-squares line. While cxx == 0 (all x equal)
  // the line is undetermined and this equals cyy (the scatter about the mean).
  double ssr = 0;
  double a1 = 0;  // sum of forgetting factors a_i (= count without forgetting)
  double a2 = 0;  // sum of a_i^2 (= count without forgetting)

  friend bool operator==(const LineMoments&, const LineMoments&) = default;
};

class LineAccumulator {
 public:
  // Adds one pair. REQUIRES: x, y finite; w finite and > 0.
  void add(double x, double y, double w = 1.0);
  // Exactly undoes add(x, y, w) of a pair that is held (sliding windows). Removing the last pair
  // resets the state. REQUIRES: the pair was added with the same weight and has not been forgotten.
  void remove(double x, double y, double w = 1.0);
  // Multiplies the weight of everything held by lambda (exponential forgetting), REQUIRES 0<lambda<=1.
  void forget(double lambda);
  // Folds another state in, as if its pairs had been added here (Chan, Golub & LeVeque pairwise update).
  void merge(const LineAccumulator& other);
  void reset() { m_ = LineMoments{}; }

  double mean_x() const { return m_.shift_x + m_.dmean_x; }
  double mean_y() const { return m_.shift_y + m_.dmean_y; }

  const LineMoments& moments() const { return m_; }
  // Restores a state saved from moments() (checkpoints).
  static LineAccumulator from_moments(const LineMoments& m);

 private:
  LineMoments m_;
};

}  // namespace rigcal::stats
