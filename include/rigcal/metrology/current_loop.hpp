#pragma once
// 4-20 mA current-loop scaling with the signal levels of NAMUR NE 43.
//
// value = value_at_4ma + (I - 4 mA) / 16 mA * (value_at_20ma - value_at_4ma). value_at_4ma may exceed
// value_at_20ma (a reverse-acting transmitter). The conversion is exact up to rounding, and exactly
// value_at_4ma / value_at_20ma at 4 / 20 mA.
//
// NAMUR NE 43 signal levels (written from memory of the recommendation, not from a copy of it):
//   3.8 mA <= I <= 20.5 mA   measurement information. The parts 3.8..4 and 20..20.5 mA are a
//                            transmitter reporting a value just beyond its range; they are converted
//                            by the same straight line, so the result lies slightly outside
//                            [value_at_4ma, value_at_20ma].
//   I <= 3.6 mA or I >= 21.0 mA   failure information: the device signals a fault (or the loop is
//                            open: 0 mA). Error "device failure signal".
//   3.6 < I < 3.8 mA or 20.5 < I < 21.0 mA   neither a measurement nor a failure signal under NE 43.
//                            Error "outside the measuring range", distinct from a failure.
// Limits are inclusive as written; a non-finite current is an Error of its own.
#include "rigcal/result.hpp"

namespace rigcal::metrology {

namespace ne43 {
inline constexpr double failure_low_ma = 3.6;      // at or below: failure signal
inline constexpr double measuring_low_ma = 3.8;    // lowest measurement signal
inline constexpr double measuring_high_ma = 20.5;  // highest measurement signal
inline constexpr double failure_high_ma = 21.0;    // at or above: failure signal
}  // namespace ne43

// Engineering values (any unit, e.g. bar or degC) that the transmitter maps to 4 mA and 20 mA.
struct CurrentLoopRange {
  double value_at_4ma = 0.0;
  double value_at_20ma = 0.0;
};

// Ok if both values are finite and differ.
Status check_current_loop_range(const CurrentLoopRange& range);

// Engineering value for a loop current in mA, per the rules above. Error for an invalid range too.
Result<double> current_loop_value(const CurrentLoopRange& range, double current_ma);

// d value / d current in engineering units per mA: (value_at_20ma - value_at_4ma) / 16, the same at
// every current (negative for a reverse-acting range). REQUIRES: check_current_loop_range ok;
// otherwise NaN, so that it cannot enter an uncertainty budget looking like a valid coefficient.
double current_loop_sensitivity_per_ma(const CurrentLoopRange& range);

}  // namespace rigcal::metrology
