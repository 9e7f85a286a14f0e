#include "rigcal/metrology/max_permissible_error.hpp"

#include <cmath>
#include <string>

#include "number_text.hpp"

namespace rigcal::metrology {

namespace {
bool non_negative(double v) { return std::isfinite(v) && v >= 0; }
}  // namespace

Status check_tolerance(const MaximumPermissibleError& mpe, const SensorRange& range) {
  if (!(non_negative(mpe.absolute) && non_negative(mpe.percent_of_reading) &&
        non_negative(mpe.percent_of_span))) {
    return Error{
        "tolerance: absolute, percent-of-reading and percent-of-span terms must be finite numbers >= 0"};
  }
  if (mpe.absolute == 0 && mpe.percent_of_reading == 0 && mpe.percent_of_span == 0) {
    return Error{"tolerance: every term of the maximum permissible error is zero, so no error is permitted"};
  }
  if (!(std::isfinite(range.lo) && std::isfinite(range.hi) && range.lo < range.hi)) {
    return Error{"tolerance: sensor range must be finite with low < high, got [" +
                 detail::number_text(range.lo) + ", " + detail::number_text(range.hi) + "]"};
  }
  return ok_status();
}

double mpe_at(const MaximumPermissibleError& mpe, const SensorRange& range, double x) {
  return mpe.absolute + mpe.percent_of_reading * std::abs(x) / 100.0 +
         mpe.percent_of_span * (range.hi - range.lo) / 100.0;
}

}  // namespace rigcal::metrology
