// The Linearisation value a channel's configuration holds: each kind converts like its underlying
// function, and its sensitivity is the derivative of that conversion with respect to the raw signal.
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "rigcal/metrology/linearisation.hpp"

using namespace rigcal::metrology;

namespace {
// Central difference of linearise() about raw, for comparison with sensitivity().
double numeric_derivative(const Linearisation& lin, double raw, double h) {
  return (linearise(lin, raw + h).value() - linearise(lin, raw - h).value()) / (2 * h);
}
}  // namespace

TEST_CASE("none passes readings through unchanged") {
  const Linearisation lin = Linearisation::none();
  CHECK(lin.kind == Linearisation::Kind::none);
  CHECK(linearise(lin, 12.345).value() == 12.345);
  CHECK(sensitivity(lin, 12.345) == 1.0);
  CHECK(check_linearisation(lin).ok());
}

TEST_CASE("each kind converts as its underlying function") {
  const auto tc = Linearisation::thermocouple(ThermocoupleType::J, 22.0);
  CHECK(linearise(tc, 10.0).value() == thermocouple_temperature_c(ThermocoupleType::J, 10.0, 22.0).value());
  const auto pt = Linearisation::rtd(pt1000_r0_ohm);
  CHECK(linearise(pt, 1385.055).value() == rtd_temperature_c(pt1000_r0_ohm, 1385.055).value());
  const CvdCoefficients own{3.9092e-3, -5.81e-7, -4.0e-12};
  const auto pt_own = Linearisation::rtd(pt100_r0_ohm, own);
  CHECK(linearise(pt_own, 80.0).value() == rtd_temperature_c(pt100_r0_ohm, 80.0, own).value());
  const auto loop = Linearisation::current_loop({0.0, 250.0});
  CHECK(linearise(loop, 12.0).value() == 125.0);
}

TEST_CASE("sensitivity is d engineering / d raw, the GUM sensitivity coefficient") {
  SECTION("thermocouple: 1/S in degC per mV") {
    const auto tc = Linearisation::thermocouple(ThermocoupleType::K, 25.0);
    for (double mv : {-5.0, 0.0, 3.0, 20.0, 50.0}) {
      CHECK(sensitivity(tc, mv) == Approx(numeric_derivative(tc, mv, 1e-4)).epsilon(1e-7));
    }
    // 0.001 mV emf resolution at 0.000 mV with a 25 degC junction is 0.001 / S(25 degC) in degC.
    CHECK(0.001 * sensitivity(tc, 0.0) ==
          Approx(0.001 / thermocouple_seebeck_mv_per_c(ThermocoupleType::K, 25.0)).epsilon(1e-9));
  }
  SECTION("RTD: 1/(dR/dt) in degC per ohm, both ranges") {
    const auto pt = Linearisation::rtd(pt100_r0_ohm);
    for (double ohm : {20.0, 60.0, 99.9, 100.0, 138.5, 390.0}) {
      CHECK(sensitivity(pt, ohm) == Approx(numeric_derivative(pt, ohm, 1e-4)).epsilon(1e-7));
    }
  }
  SECTION("current loop: units per mA, negative when reverse-acting") {
    CHECK(sensitivity(Linearisation::current_loop({0.0, 16.0}), 7.0) == 1.0);
    CHECK(sensitivity(Linearisation::current_loop({16.0, 0.0}), 7.0) == -1.0);
  }
  SECTION("NaN where the conversion fails, so it cannot pass for a coefficient") {
    CHECK(std::isnan(sensitivity(Linearisation::current_loop({0.0, 16.0}), 2.0)));
    CHECK(std::isnan(sensitivity(Linearisation::rtd(pt100_r0_ohm), 500.0)));
    CHECK(std::isnan(sensitivity(Linearisation::thermocouple(ThermocoupleType::T, 0.0), 30.0)));
    CHECK(std::isnan(sensitivity(Linearisation::none(), std::nan(""))));
  }
}

TEST_CASE("check_linearisation reports unusable parameters of the chosen kind only") {
  auto tc = Linearisation::thermocouple(ThermocoupleType::T, 450.0);
  auto r = check_linearisation(tc);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().message.find("type T thermocouple: cold-junction temperature 450 degC is outside") !=
        std::string::npos);
  CHECK_FALSE(check_linearisation(Linearisation::thermocouple(ThermocoupleType::K, std::nan(""))).ok());
  CHECK_FALSE(check_linearisation(Linearisation::rtd(0.0)).ok());
  CHECK_FALSE(check_linearisation(Linearisation::rtd(pt100_r0_ohm, {3.9e-3, -3e-6, 0.0})).ok());
  CHECK_FALSE(check_linearisation(Linearisation::current_loop({})).ok());
  // A struct filled in field by field: only the chosen kind's fields count.
  Linearisation loop;
  loop.kind = Linearisation::Kind::current_loop;
  loop.r0_ohm = -1.0;  // ignored
  loop.loop_range = {0.0, 6.0};
  CHECK(check_linearisation(loop).ok());
  CHECK(linearise(loop, 20.0).value() == 6.0);
}

TEST_CASE("non-finite raw readings are errors for every kind") {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  for (const Linearisation& lin :
       {Linearisation::none(), Linearisation::thermocouple(ThermocoupleType::K, 20.0),
        Linearisation::rtd(pt100_r0_ohm), Linearisation::current_loop({0.0, 1.0})}) {
    for (double raw : {nan, inf, -inf}) {
      const auto r = linearise(lin, raw);
      REQUIRE_FALSE(r.ok());
      CHECK(r.error().message.find("is not a finite number") != std::string::npos);
    }
  }
}
