// JCGM 100:2008 (GUM) Annex H.3, calibration of a thermometer: b(t) = y1 + y2 (t - t0), t0 = 20 degC,
// fitted to the 11 pairs of Table H.6. Published values are checked to their printed digits; which of
// them were copied and which are from memory is stated in tests/data/gum_h3_thermometer.expected.
#include <catch2/catch.hpp>
#include <cmath>

#include "../support/reference_data.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;
using rigcal::test::column;
using rigcal::test::read_named_values;

namespace {
// |computed - printed| within half a unit of the printed value's last digit.
bool matches_printed(double computed, double printed, double last_digit) {
  return std::abs(computed - printed) <= 0.5 * last_digit + 1e-15;
}
}  // namespace

TEST_CASE("GUM H.3 thermometer calibration: coefficients, uncertainties, correlation, residual SD") {
  const auto t = column("gum_h3_thermometer.dat", 1);
  const auto b = column("gum_h3_thermometer.dat", 2);
  const auto gum = read_named_values("gum_h3_thermometer.expected");
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (std::size_t k = 0; k < t.size(); ++k) fit.add(t[k] - 20.0, b[k]);
  const LineFit f = fit.summary(Model::line).value();

  CHECK(f.dof == 9);
  CHECK(matches_printed(f.b0, gum.at("y1_gum_degC"), 1e-4));          // y1 = -0.1712 degC
  CHECK(matches_printed(f.se_b0, gum.at("u_y1_gum_degC"), 1e-4));     // u(y1) = 0.0029 degC
  CHECK(matches_printed(f.b1, gum.at("y2_gum"), 1e-5));               // y2 = 0.00218
  CHECK(matches_printed(f.se_b1, gum.at("u_y2_gum"), 1e-5));          // u(y2) = 0.00067
  CHECK(matches_printed(f.corr_b0_b1, gum.at("r_y1_y2_gum"), 1e-3));  // r = -0.930
  CHECK(matches_printed(f.s, gum.at("s_gum_degC"), 1e-4));            // s = 0.0035 degC
  CHECK(matches_printed(f.mean_x + 20.0, gum.at("tbar_gum_degC"), 1e-4));

  // GUM eq. H.16: u^2[b(t)] = u^2(y1) + (t - t0)^2 u^2(y2) + 2 (t - t0) u(y1) u(y2) r; at t = 30 degC:
  const double b30 = f.predict(10.0);
  const double u_b30 = f.s * std::sqrt(f.leverage(10.0));
  const double u_b30_h16 = std::sqrt(f.se_b0 * f.se_b0 + 100 * f.se_b1 * f.se_b1 +
                                     2 * 10 * f.se_b0 * f.se_b1 * f.corr_b0_b1);
  CHECK(matches_printed(b30, gum.at("b30_gum_degC"), 1e-4));    // -0.1494 degC
  CHECK(matches_printed(u_b30, gum.at("u_b30_gum_degC"), 1e-4));  // 0.0041 degC
  CHECK(u_b30 == Approx(u_b30_h16).epsilon(1e-12));
  // At the mean reading the correction's uncertainty is s / sqrt(n) = 0.0011 degC.
  CHECK(matches_printed(f.s * std::sqrt(f.leverage(f.mean_x)), gum.at("u_btbar_gum_degC"), 1e-4));
}
