// Platinum RTDs by the IEC 60751 Callendar-Van Dusen equation against the IEC 60751 coefficients and
// Pt100 table in tests/data (provenance in each file's header).
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "../support/reference_data.hpp"
#include "rigcal/metrology/rtd.hpp"

using namespace rigcal::metrology;
using rigcal::test::column;
using rigcal::test::read_named_values;

namespace {
long long in_table_digits(double r_ohm) { return std::llround(r_ohm * 100.0); }  // table resolution 0.01 ohm

bool mentions(const rigcal::Result<double>& r, const std::string& text) {
  return !r.ok() && r.error().message.find(text) != std::string::npos;
}
}  // namespace

TEST_CASE("default CVD coefficients are those of IEC 60751") {
  const auto iec = read_named_values("iec60751_pt100.coef");
  const CvdCoefficients cvd;
  CHECK(cvd.a_per_c == iec.at("A"));
  CHECK(cvd.b_per_c2 == iec.at("B"));
  CHECK(cvd.c_per_c4 == iec.at("C"));
  CHECK(pt100_r0_ohm == iec.at("R0_ohm"));
  // alpha = (R(100) - R(0)) / (100 R0) = 0.00385055 /degC (computed in the file; nominal 0.00385).
  const double r100 = rtd_resistance_ohm(pt100_r0_ohm, 100.0).value();
  CHECK(std::abs((r100 - pt100_r0_ohm) / (100.0 * pt100_r0_ohm) - iec.at("alpha_0_100")) <= 1e-15);
}

TEST_CASE("Pt100 resistance equals the IEC 60751 table at every check point, both ranges") {
  const auto t = column("iec60751_pt100_checkpoints.dat", 0);
  const auto r_table = column("iec60751_pt100_checkpoints.dat", 1);
  const auto r_cvd = column("iec60751_pt100_checkpoints.dat", 2);
  REQUIRE(t.size() == 10);
  for (std::size_t k = 0; k < t.size(); ++k) {
    const double r = rtd_resistance_ohm(pt100_r0_ohm, t[k]).value();
    INFO("t = " << t[k] << " degC, R = " << r << " ohm, IEC table " << r_table[k] << " ohm");
    CHECK(in_table_digits(r) == in_table_digits(r_table[k]));  // IEC 60751 table, 0.01 ohm
    CHECK(std::abs(r - r_cvd[k]) <= 0.5e-4);                   // file's 4-decimal evaluation (computed)
  }
}

TEST_CASE("Pt100 inverse recovers every tabulated temperature to the table's resolution in degC") {
  // R_table is R(t) rounded to 0.01 ohm: at most 0.005 ohm, i.e. 0.005 / (dR/dt) degC, off.
  const auto t = column("iec60751_pt100_checkpoints.dat", 0);
  const auto r_table = column("iec60751_pt100_checkpoints.dat", 1);
  const double r_min = rtd_resistance_ohm(pt100_r0_ohm, rtd_min_c).value();
  int inside = 0;
  for (std::size_t k = 0; k < t.size(); ++k) {
    INFO("t = " << t[k] << " degC, R_table = " << r_table[k] << " ohm");
    const auto back = rtd_temperature_c(pt100_r0_ohm, r_table[k]);
    if (r_table[k] < r_min) {
      // -200 degC: the printed 18.52 ohm is below R(-200) = 18.5201 ohm through rounding; the contract
      // is an error there, not an extrapolation.
      CHECK(t[k] == rtd_min_c);
      CHECK(r_min - r_table[k] <= 0.005);
      CHECK(mentions(back, "outside the range"));
      continue;
    }
    REQUIRE(back.ok());
    CHECK(std::abs(*back - t[k]) <= 1.01 * 0.005 / rtd_sensitivity_ohm_per_c(pt100_r0_ohm, t[k]));
    ++inside;
  }
  CHECK(inside == 9);
}

TEST_CASE("RTD round trip t -> R -> t to 1e-9 degC over -200..850 degC (0.01 degC grid)") {
  for (double r0 : {pt100_r0_ohm, pt1000_r0_ohm}) {
    double worst_below = 0.0;  // Newton on the quartic
    double worst_above = 0.0;  // closed-form quadratic root
    for (long k = 0; k <= 105000; ++k) {
      const double t = rtd_min_c + 0.01 * static_cast<double>(k);
      const double back = rtd_temperature_c(r0, rtd_resistance_ohm(r0, t).value()).value();
      (t < 0 ? worst_below : worst_above) = std::max(t < 0 ? worst_below : worst_above, std::abs(back - t));
    }
    INFO("R0 = " << r0 << " ohm: worst error below 0 degC " << worst_below << ", above " << worst_above);
    CHECK(worst_below <= 1e-9);
    CHECK(worst_above <= 1e-9);
  }
}

TEST_CASE("Pt1000 is ten times Pt100 at every temperature") {
  const auto t = column("iec60751_pt100_checkpoints.dat", 0);
  const auto r_table = column("iec60751_pt100_checkpoints.dat", 1);
  for (std::size_t k = 0; k < t.size(); ++k) {
    CHECK(rtd_resistance_ohm(pt1000_r0_ohm, t[k]).value() ==
          Approx(10.0 * rtd_resistance_ohm(pt100_r0_ohm, t[k]).value()).epsilon(1e-15));
    if (t[k] == rtd_min_c) continue;  // 10 x the printed 18.52 ohm is below R(-200), as for Pt100
    CHECK(rtd_temperature_c(pt1000_r0_ohm, 10.0 * r_table[k]).value() ==
          Approx(rtd_temperature_c(pt100_r0_ohm, r_table[k]).value()).margin(1e-9));
  }
  for (double tc = rtd_min_c; tc <= rtd_max_c; tc += 0.5) {
    CHECK(rtd_sensitivity_ohm_per_c(pt1000_r0_ohm, tc) ==
          Approx(10.0 * rtd_sensitivity_ohm_per_c(pt100_r0_ohm, tc)).epsilon(1e-15));
  }
}

TEST_CASE("RTD sensitivity is dR/dt") {
  // At 0 degC the slope is R0 A = 0.39083 ohm/degC for a Pt100 (IEC 60751 A), from either side.
  CHECK(rtd_sensitivity_ohm_per_c(pt100_r0_ohm, 0.0) == Approx(100.0 * 3.9083e-3).epsilon(1e-15));
  CHECK(rtd_sensitivity_ohm_per_c(pt100_r0_ohm, -1e-12) == Approx(100.0 * 3.9083e-3).epsilon(1e-12));
  for (double tc = -199.0; tc < 850.0; tc += 3.7) {
    const double h = 1e-3;
    const double central = (rtd_resistance_ohm(pt100_r0_ohm, tc + h).value() -
                            rtd_resistance_ohm(pt100_r0_ohm, tc - h).value()) /
                           (2 * h);
    INFO("t = " << tc << " degC");
    CHECK(rtd_sensitivity_ohm_per_c(pt100_r0_ohm, tc) == Approx(central).epsilon(1e-8));
  }
}

TEST_CASE("calibrated sensors use their own CVD coefficients") {
  SECTION("a sensor's own A, B, C: round trip in both ranges, and a difference from IEC") {
    const CvdCoefficients own{3.9092e-3, -5.81e-7, -4.0e-12};
    for (double tc : {-195.0, -80.0, -0.5, 0.0, 0.5, 150.0, 660.0, 849.0}) {
      const double r = rtd_resistance_ohm(pt100_r0_ohm, tc, own).value();
      CHECK(rtd_temperature_c(pt100_r0_ohm, r, own).value() == Approx(tc).margin(1e-9));
    }
    const double r = rtd_resistance_ohm(pt100_r0_ohm, 100.0, own).value();
    CHECK(std::abs(rtd_temperature_c(pt100_r0_ohm, r).value() - 100.0) > 0.01);
  }
  SECTION("B = C = 0 is a linear sensor, t = (R/R0 - 1) / A") {
    const CvdCoefficients linear{3.85e-3, 0.0, 0.0};
    CHECK(rtd_temperature_c(pt100_r0_ohm, 138.5, linear).value() == Approx(38.5 / 0.385).epsilon(1e-14));
    CHECK(rtd_temperature_c(pt100_r0_ohm, 80.75, linear).value() == Approx(-19.25 / 0.385).epsilon(1e-12));
  }
  SECTION("coefficients under which R does not rise with t are rejected") {
    const std::string msg = "do not give a resistance that rises with temperature";
    CHECK(mentions(rtd_resistance_ohm(pt100_r0_ohm, 20.0, {-3.9e-3, 0.0, 0.0}), msg));
    CHECK(
        mentions(rtd_resistance_ohm(pt100_r0_ohm, 20.0, {3.9e-3, -3e-6, 0.0}), msg));  // falls above 650 degC
    CHECK(mentions(rtd_temperature_c(pt100_r0_ohm, 50.0, {3.9e-3, 0.0, 1e-10}),
                   msg));  // falls below about -191 degC
    CHECK(mentions(rtd_temperature_c(pt100_r0_ohm, 50.0, {3.9e-3, 0.0, std::nan("")}), "not all finite"));
    CHECK(std::isnan(rtd_sensitivity_ohm_per_c(pt100_r0_ohm, 20.0, {3.9e-3, -3e-6, 0.0})));
    CHECK(check_rtd_parameters(pt100_r0_ohm).ok());
  }
}

TEST_CASE("RTD inputs outside the range or not finite give errors, never NaN") {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  CHECK(mentions(rtd_resistance_ohm(pt100_r0_ohm, 850.001),
                 "outside the Callendar-Van Dusen range -200 .. 850"));
  CHECK(mentions(rtd_resistance_ohm(pt100_r0_ohm, -200.001), "outside the Callendar-Van Dusen range"));
  CHECK(rtd_resistance_ohm(pt100_r0_ohm, rtd_min_c).ok());
  CHECK(rtd_resistance_ohm(pt100_r0_ohm, rtd_max_c).ok());
  for (double x : {nan, inf, -inf}) {
    CHECK(mentions(rtd_resistance_ohm(pt100_r0_ohm, x), "is not a finite number"));
    CHECK(mentions(rtd_temperature_c(pt100_r0_ohm, x), "is not a finite number"));
    CHECK(std::isnan(rtd_sensitivity_ohm_per_c(pt100_r0_ohm, x)));
  }
  CHECK(mentions(rtd_temperature_c(pt100_r0_ohm, 390.49), "outside the range 18.52008 .. 390.4811 ohm"));
  CHECK(mentions(rtd_temperature_c(pt100_r0_ohm, 18.5), "outside the range"));
  CHECK(mentions(rtd_temperature_c(pt100_r0_ohm, -5.0), "outside the range"));
  CHECK(rtd_temperature_c(pt100_r0_ohm, rtd_resistance_ohm(pt100_r0_ohm, rtd_max_c).value()).value() ==
        rtd_max_c);
  CHECK(rtd_temperature_c(pt100_r0_ohm, rtd_resistance_ohm(pt100_r0_ohm, rtd_min_c).value()).value() ==
        Approx(rtd_min_c).margin(1e-9));
  for (double r0 : {0.0, -100.0, nan, inf}) {
    CHECK(mentions(rtd_resistance_ohm(r0, 20.0), "is not a finite positive resistance"));
    CHECK(mentions(rtd_temperature_c(r0, 100.0), "is not a finite positive resistance"));
  }
  CHECK(std::isnan(rtd_sensitivity_ohm_per_c(pt100_r0_ohm, 851.0)));
  for (double x : {-1e300, -201.0, 5e-324, 1e300, 1e-300, 60.0, 400.0}) {
    for (const auto& res : {rtd_resistance_ohm(pt100_r0_ohm, x), rtd_temperature_c(pt100_r0_ohm, x)}) {
      if (res.ok()) CHECK(std::isfinite(*res));
    }
  }
}
