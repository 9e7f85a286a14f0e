#include "rigcal/metrology/current_loop.hpp"

#include <cmath>
#include <string>

#include "number_text.hpp"

namespace rigcal::metrology {

namespace {
constexpr double zero_ma = 4.0;
constexpr double span_ma = 16.0;

std::string signal_text(double current_ma) {
  return "4-20 mA signal " + detail::number_text(current_ma) + " mA";
}
}  // namespace

Status check_current_loop_range(const CurrentLoopRange& range) {
  if (!(std::isfinite(range.value_at_4ma) && std::isfinite(range.value_at_20ma))) {
    return Error{"4-20 mA range: the values at 4 mA and 20 mA must be finite numbers"};
  }
  if (range.value_at_4ma == range.value_at_20ma) {
    return Error{"4-20 mA range: the values at 4 mA and 20 mA are equal (" +
                 detail::number_text(range.value_at_4ma) + "), so the signal carries no information"};
  }
  return ok_status();
}

Result<double> current_loop_value(const CurrentLoopRange& range, double current_ma) {
  if (auto s = check_current_loop_range(range); !s) return s.error();
  if (!std::isfinite(current_ma)) return Error{signal_text(current_ma) + " is not a finite number"};
  if (current_ma <= ne43::failure_low_ma || current_ma >= ne43::failure_high_ma) {
    return Error{signal_text(current_ma) +
                 " is a device failure signal (NAMUR NE 43: <= 3.6 mA or >= 21 mA)"};
  }
  if (current_ma < ne43::measuring_low_ma || current_ma > ne43::measuring_high_ma) {
    return Error{signal_text(current_ma) +
                 " is outside the measuring range 3.8 .. 20.5 mA (NAMUR NE 43), though not a failure signal"};
  }
  // std::lerp is exact at 4 and 20 mA and monotonic, and extrapolates for the NE 43 margins.
  return std::lerp(range.value_at_4ma, range.value_at_20ma, (current_ma - zero_ma) / span_ma);
}

double current_loop_sensitivity_per_ma(const CurrentLoopRange& range) {
  if (!check_current_loop_range(range)) return std::nan("");
  // Dividing first keeps the span of a range near the limits of double from overflowing.
  return range.value_at_20ma / span_ma - range.value_at_4ma / span_ma;
}

}  // namespace rigcal::metrology
