// 4-20 mA scaling and the NAMUR NE 43 signal levels (limits as remembered, see current_loop.hpp).
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "rigcal/metrology/current_loop.hpp"

using namespace rigcal::metrology;

namespace {
bool mentions(const rigcal::Result<double>& r, const std::string& text) {
  return !r.ok() && r.error().message.find(text) != std::string::npos;
}
}  // namespace

TEST_CASE("4-20 mA maps linearly onto the engineering range, exactly at the ends") {
  const CurrentLoopRange bar{0.0, 10.0};
  CHECK(current_loop_value(bar, 4.0).value() == 0.0);
  CHECK(current_loop_value(bar, 20.0).value() == 10.0);
  CHECK(current_loop_value(bar, 12.0).value() == 5.0);
  CHECK(current_loop_value(bar, 8.0).value() == Approx(2.5).epsilon(1e-15));
  CHECK(current_loop_sensitivity_per_ma(bar) == 0.625);
  // A range that does not start at zero; ends exact for awkward decimals too.
  const CurrentLoopRange degc{-50.0, 150.0};
  CHECK(current_loop_value(degc, 12.0).value() == 50.0);
  const CurrentLoopRange odd{0.1, 0.3};
  CHECK(current_loop_value(odd, 4.0).value() == 0.1);
  CHECK(current_loop_value(odd, 20.0).value() == 0.3);
}

TEST_CASE("reverse-acting range: value at 4 mA above the value at 20 mA") {
  const CurrentLoopRange level{100.0, 0.0};
  CHECK(current_loop_value(level, 4.0).value() == 100.0);
  CHECK(current_loop_value(level, 20.0).value() == 0.0);
  CHECK(current_loop_value(level, 8.0).value() == Approx(75.0).epsilon(1e-15));
  CHECK(current_loop_sensitivity_per_ma(level) == -6.25);
}

TEST_CASE("NE 43 measurement signals 3.8..4 and 20..20.5 mA extend the line beyond the range") {
  const CurrentLoopRange bar{0.0, 16.0};  // 1 bar per mA
  CHECK(current_loop_value(bar, 3.8).value() == Approx(-0.2).epsilon(1e-12));
  CHECK(current_loop_value(bar, 20.5).value() == Approx(16.5).epsilon(1e-15));
  CHECK(current_loop_value(bar, ne43::measuring_low_ma).ok());
  CHECK(current_loop_value(bar, ne43::measuring_high_ma).ok());
}

TEST_CASE("NE 43 failure signals and the gaps before them give distinct errors") {
  const CurrentLoopRange bar{0.0, 10.0};
  for (double ma : {3.6, 3.0, 0.0, -1.0, 21.0, 22.0, 1e9}) {
    INFO(ma << " mA");
    CHECK(mentions(current_loop_value(bar, ma), "is a device failure signal (NAMUR NE 43"));
  }
  for (double ma : {3.61, 3.7, 3.79, 20.51, 20.75, 20.99}) {
    INFO(ma << " mA");
    const auto r = current_loop_value(bar, ma);
    CHECK(mentions(
        r, "is outside the measuring range 3.8 .. 20.5 mA (NAMUR NE 43), though not a failure signal"));
    CHECK_FALSE(mentions(r, "device failure"));
  }
  CHECK(mentions(current_loop_value(bar, 3.5), "4-20 mA signal 3.5 mA is a device failure signal"));
  CHECK(mentions(current_loop_value(bar, 20.7), "4-20 mA signal 20.7 mA is outside the measuring range"));
}

TEST_CASE("non-finite currents and unusable ranges are errors, never NaN") {
  const CurrentLoopRange bar{0.0, 10.0};
  for (double ma : {std::numeric_limits<double>::quiet_NaN(), std::numeric_limits<double>::infinity(),
                    -std::numeric_limits<double>::infinity()}) {
    CHECK(mentions(current_loop_value(bar, ma), "is not a finite number"));
  }
  CHECK(mentions(current_loop_value({5.0, 5.0}, 12.0), "are equal (5)"));
  CHECK(mentions(current_loop_value({0.0, std::nan("")}, 12.0), "must be finite numbers"));
  CHECK(
      mentions(current_loop_value({-std::numeric_limits<double>::infinity(), 1.0}, 12.0), "must be finite"));
  CHECK(std::isnan(current_loop_sensitivity_per_ma({5.0, 5.0})));
  CHECK_FALSE(check_current_loop_range({}).ok());  // the default {0, 0} is deliberately unusable
  // The largest finite ranges still convert to finite values.
  const CurrentLoopRange huge{-1e308, 1e308};
  CHECK(std::isfinite(current_loop_value(huge, 20.5).value()));
  CHECK(current_loop_sensitivity_per_ma(huge) == Approx(1.25e307).epsilon(1e-15));
}
