#pragma once
// A sensor's tolerance as a maximum permissible error (MPE) over the range it is used in:
//   MPE(x) = absolute + percent_of_reading |x| / 100 + percent_of_span (hi - lo) / 100,
// x a reference value in [lo, hi], all in reference units. The tolerance is symmetric: the error may
// lie in [-MPE(x), +MPE(x)].
#include "rigcal/result.hpp"

namespace rigcal::metrology {

struct MaximumPermissibleError {
  double absolute = 0;            // reference units, >= 0
  double percent_of_reading = 0;  // % of |x|, >= 0
  double percent_of_span = 0;     // % of (hi - lo), >= 0
};

struct SensorRange {
  double lo = 0;  // reference units; lo < hi
  double hi = 0;
  bool contains(double x) const { return lo <= x && x <= hi; }
};

// Ok if every term is finite and >= 0, at least one is > 0 (an MPE of zero admits no error at all),
// and the range is finite with lo < hi.
Status check_tolerance(const MaximumPermissibleError& mpe, const SensorRange& range);

// MPE(x). REQUIRES: check_tolerance(mpe, range) ok. Defined for any x, not only inside the range.
double mpe_at(const MaximumPermissibleError& mpe, const SensorRange& range, double x);

}  // namespace rigcal::metrology
