// Inverse prediction X' = (Y' - a) / b with its propagation-of-error uncertainty, on the
// NIST/SEMATECH e-Handbook 2.3.6.7 linewidth calibration (CALIBRATIONLINE.DAT).
#include <catch2/catch.hpp>
#include <cmath>

#include "../support/reference_data.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;
using rigcal::test::column;
using rigcal::test::read_named_values;

namespace {
LineFit linewidth_fit() {
  const auto x = column("nist_handbook_linewidth_calibration.dat", 0);
  const auto y = column("nist_handbook_linewidth_calibration.dat", 1);
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (std::size_t i = 0; i < x.size(); ++i) fit.add(x[i], y[i]);
  return fit.summary(Model::line).value();
}
}  // namespace

TEST_CASE("linewidth calibration reproduces the e-Handbook's coefficients and covariance matrix") {
  const auto pub = read_named_values("nist_handbook_linewidth.expected");
  const LineFit f = linewidth_fit();
  CHECK(f.dof == pub.at("dof_residual"));
  CHECK(f.b0 == Approx(pub.at("a_published")).epsilon(1e-6));
  CHECK(f.b1 == Approx(pub.at("b_published")).epsilon(1e-7));
  CHECK(f.se_b0 == Approx(pub.at("se_a_published")).epsilon(1e-6));
  CHECK(f.se_b1 == Approx(pub.at("se_b_published")).epsilon(1e-5));
  CHECK(f.se_b0 * f.se_b0 == Approx(pub.at("var_a_published")).epsilon(1e-6));
  CHECK(f.cov_b0_b1 == Approx(pub.at("cov_ab_published")).epsilon(1e-6));
  CHECK(f.se_b1 * f.se_b1 == Approx(pub.at("var_b_published")).epsilon(1e-6));
}

TEST_CASE("inverse-prediction uncertainty equals the e-Handbook 2.3.6.7.3 propagation-of-error formula") {
  // u^2(X') = [s^2 + var(a) + X'^2 var(b) + 2 X' cov(a,b)] / b^2 for one future reading, evaluated
  // with the published covariance matrix; the classical form (s^2/b^2)(1/m + 1/n + (X'-xbar)^2/Sxx) must agree.
  const auto pub = read_named_values("nist_handbook_linewidth.expected");
  const LineFit f = linewidth_fit();
  const TwoSidedT t(0.95);
  double max_u = 0;
  for (double y_new = 0.0; y_new <= 12.0 + 1e-9; y_new += 0.05) {
    const InversePrediction ip = inverse_predict(f, y_new, 1, t).value();
    const double xp = (y_new - pub.at("a_published")) / pub.at("b_published");
    const double u2 = (f.s * f.s + pub.at("var_a_published") + xp * xp * pub.at("var_b_published") +
                       2 * xp * pub.at("cov_ab_published")) /
                      (pub.at("b_published") * pub.at("b_published"));
    INFO("Y' = " << y_new);
    CHECK(ip.x_hat == Approx(xp).epsilon(1e-6));
    CHECK(ip.u == Approx(std::sqrt(u2)).epsilon(1e-5));
    max_u = std::max(max_u, ip.u);
  }
  // The e-Handbook prints the maximum propagation-of-error standard deviation over 0..12 um: 0.068 um.
  CHECK(std::abs(max_u - pub.at("max_poe_sd_published_um")) <= 0.0005);
}

TEST_CASE("averaging m readings shrinks only the 1/m term: the calibration terms set a floor") {
  const LineFit f = linewidth_fit();
  const TwoSidedT t(0.95);
  const double y = 5.0;
  const auto one = inverse_predict(f, y, 1, t).value();
  const auto many = inverse_predict(f, y, 1e9, t).value();
  CHECK(many.u < one.u);
  CHECK(many.u == Approx(one.u_calibration).epsilon(1e-6));
  CHECK(many.u_calibration == Approx(one.u_calibration));
  CHECK(one.u_repeatability == Approx(f.s / f.b1));
  CHECK(one.u * one.u == Approx(one.u_repeatability * one.u_repeatability + one.u_calibration * one.u_calibration));
}

TEST_CASE("Fieller interval brackets the delta-method interval and is unbounded for a flat slope") {
  const LineFit f = linewidth_fit();
  const TwoSidedT t(0.95);
  const auto ip = inverse_predict(f, 5.0, 4, t).value();
  REQUIRE(ip.fieller_bounded);
  // With g << 1 (slope well determined) the two intervals nearly coincide.
  CHECK(ip.fieller_g < 1e-3);
  CHECK(ip.fieller.lo == Approx(ip.delta.lo).epsilon(1e-3));
  CHECK(ip.fieller.hi == Approx(ip.delta.hi).epsilon(1e-3));
  CHECK(ip.fieller.contains(ip.x_hat));

  // A sensor that barely responds to the reference: slope 0.01 +- 0.02.
  StreamingLineFit weak(MemoryPolicy::cumulative());
  const double ys[] = {1.0, 1.3, 0.8, 1.2, 0.9, 1.1};
  for (int i = 0; i < 6; ++i) weak.add(i, ys[i] + 0.01 * i);
  const auto wf = weak.summary(Model::line).value();
  const auto wip = inverse_predict(wf, 1.05, 1, t).value();
  CHECK_FALSE(wip.fieller_bounded);
  CHECK(wip.fieller_g >= 1.0);
}
