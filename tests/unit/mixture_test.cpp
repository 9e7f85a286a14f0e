// The normal-mixture martingale: closed form, false-alarm bound, detection, the confidence sequence and
// the prior-scale design.
#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <numbers>
#include <random>
#include <vector>

#include "rigcal/detect/mixture.hpp"

using namespace rigcal::detect;

namespace {

// Reference values standardised as the engine does: uniform on [0, 100], centre 50, RMS spread 100/sqrt(12).
struct Design {
  std::mt19937_64 rng;
  std::uniform_real_distribution<double> x{0, 100};
  std::normal_distribution<double> noise{0, 1};
  explicit Design(std::uint64_t seed) : rng(seed) {}
  double d() { return (x(rng) - 50) / (100 / std::sqrt(12.0)); }
  double e() { return noise(rng); }
};

// log of the mixture integral by brute force: a fine 2-D trapezoid rule over theta of
// exp(theta' S - theta' V theta / 2) times the N(0, rho^2 I) density (Gaussian integrands make the
// trapezoid rule converge geometrically).
double log_mixture_by_quadrature(const std::vector<double>& es, const std::vector<double>& ds, double rho) {
  double s0 = 0, s1 = 0, v00 = 0, v01 = 0, v11 = 0;
  for (std::size_t i = 0; i < es.size(); ++i) {
    s0 += es[i];
    s1 += es[i] * ds[i];
    v00 += 1;
    v01 += ds[i];
    v11 += ds[i] * ds[i];
  }
  const int n = 801;
  const double bound = 8 * rho, step = 2 * bound / (n - 1);
  double sum = 0;
  for (int i = 0; i < n; ++i) {
    for (int j = 0; j < n; ++j) {
      const double a = -bound + i * step, b = -bound + j * step;
      const double log_lr = a * s0 + b * s1 - 0.5 * (a * a * v00 + 2 * a * b * v01 + b * b * v11);
      const double log_prior =
          -(a * a + b * b) / (2 * rho * rho) - std::log(2 * std::numbers::pi * rho * rho);
      sum += std::exp(log_lr + log_prior);
    }
  }
  return std::log(sum * step * step);
}

}  // namespace

TEST_CASE("closed-form mixture martingale equals the integrated likelihood ratio") {
  Design g(1);
  for (const int n : {1, 2, 5, 12}) {
    for (const double shift : {0.0, 0.8}) {
      std::vector<double> es, ds;
      NormalMixtureTest test(0.05, 0.5);
      for (int i = 0; i < n; ++i) {
        ds.push_back(g.d());
        es.push_back(g.e() + shift * (1 + 0.5 * ds.back()));
        test.update(es.back(), ds.back());
      }
      INFO("n = " << n << ", shift " << shift);
      CHECK(test.log_martingale() == Approx(log_mixture_by_quadrature(es, ds, 0.5)).margin(1e-8));
    }
  }
  CHECK(NormalMixtureTest(0.05, 0.5).log_martingale() == 0);
}

TEST_CASE("false alarms over 10 000 pairs stay below alpha (Ville's inequality)") {
  // 2000 in-control replicates of 10 000 pairs, alpha = 0.05, design rho for a 0.5-sigma change.
  const double alpha = 0.05;
  const double rho = design_mixture(alpha, 0.5).value().rho;
  Design g(2);
  int rejected = 0;
  const int replicates = 2000;
  for (int r = 0; r < replicates; ++r) {
    NormalMixtureTest test(alpha, rho);
    for (int t = 0; t < 10000 && !test.rejected(); ++t) test.update(g.e(), g.d());
    rejected += test.rejected();
  }
  const double observed = static_cast<double>(rejected) / replicates;
  const double se = std::sqrt(alpha * (1 - alpha) / replicates);
  INFO("observed false-alarm fraction " << observed << " (" << rejected << " of " << replicates << "), alpha "
                                        << alpha << ", MC standard error " << se);
  CHECK(observed <= alpha + 2 * se);
}

TEST_CASE("the mixture test detects slope and offset changes near the designed time") {
  // Changes of length 0.5 in theta units: an offset of 0.5 sigma at the centre, or a slope change of
  // 0.5 sigma per spread. The design predicts detection_pairs along the drift (about 46).
  const double alpha = 0.05;
  const MixtureDesign design = design_mixture(alpha, 0.5).value();
  struct Change {
    double theta0, theta1;
  };
  for (const Change c : {Change{0.5, 0}, Change{0, 0.5}, Change{0, -0.5}}) {
    Design g(3);
    std::vector<double> delays;
    for (int r = 0; r < 300; ++r) {
      NormalMixtureTest test(alpha, design.rho);
      int t = 0;
      while (!test.rejected() && t < 5000) {
        const double d = g.d();
        test.update(g.e() + c.theta0 + c.theta1 * d, d);
        ++t;
      }
      delays.push_back(t);
    }
    std::sort(delays.begin(), delays.end());
    const double median = delays[delays.size() / 2];
    INFO("theta = (" << c.theta0 << ", " << c.theta1 << "): median delay " << median << ", designed "
                     << design.detection_pairs << ", slowest " << delays.back());
    CHECK(delays.back() < 5000);
    CHECK(median > 0.5 * design.detection_pairs);
    CHECK(median < 1.5 * design.detection_pairs);
  }
}

TEST_CASE("the mixture test's delay grows with the time spent in control before the change") {
  // The documented weakness: the same 0.5-sigma offset after 20 000 in-control pairs takes far longer.
  const MixtureDesign design = design_mixture(0.05, 0.5).value();
  Design g(4);
  std::vector<double> delays;
  for (int r = 0; r < 60; ++r) {
    NormalMixtureTest test(0.05, design.rho);
    for (int t = 0; t < 20000; ++t) test.update(g.e(), g.d());
    if (test.rejected()) continue;  // a false alarm: not a delay
    int delay = 0;
    while (!test.rejected() && delay < 100000) {
      test.update(g.e() + 0.5, g.d());
      ++delay;
    }
    delays.push_back(delay);
  }
  std::sort(delays.begin(), delays.end());
  const double median = delays[delays.size() / 2];
  INFO("median delay after 20 000 in-control pairs: " << median << " (from the start: ~"
                                                      << design.detection_pairs << ")");
  CHECK(median > 4 * design.detection_pairs);
}

TEST_CASE("the confidence region excludes zero exactly when the test rejects, and centres on least squares") {
  Design g(5);
  NormalMixtureTest test(0.05, 0.3);
  double s0 = 0, s1 = 0, n = 0, sd = 0, sdd = 0;
  const LineScale scale{0.02, 300, 40};  // sigma, x_c, s_x: line units
  for (int t = 0; t < 3000; ++t) {
    const double d = g.d();
    const double e = g.e() + (t > 1500 ? 0.3 * d : 0.0);  // a slope change half-way
    test.update(e, d);
    s0 += e, s1 += e * d, n += 1, sd += d, sdd += d * d;
    const double log_m = test.log_martingale();
    if (std::abs(log_m - test.log_threshold()) < 1e-9) continue;  // on the boundary: either is right
    REQUIRE(test.confidence_region().contains(0, 0) == (log_m < test.log_threshold()));
    REQUIRE(test.confidence_region(scale).contains(0, 0) == (log_m < test.log_threshold()));
  }
  CHECK(test.rejected());
  const ConfidenceRegion theta = test.confidence_region();
  REQUIRE(theta.bounded());
  // Least squares from independently accumulated sums.
  const double det = n * sdd - sd * sd;
  const double t0 = (sdd * s0 - sd * s1) / det, t1 = (n * s1 - sd * s0) / det;
  CHECK(theta.centre_intercept() == Approx(t0).epsilon(1e-9));
  CHECK(theta.centre_slope() == Approx(t1).epsilon(1e-9));
  // Line units: db1 = sigma theta1 / s_x, db0 = sigma theta0 - x_c db1; the shadows map the same way.
  const ConfidenceRegion line = test.confidence_region(scale);
  CHECK(line.centre_slope() == Approx(0.02 * t1 / 40).epsilon(1e-9));
  CHECK(line.centre_intercept() == Approx(0.02 * t0 - 300 * 0.02 * t1 / 40).epsilon(1e-9));
  CHECK(line.half_width_slope() == Approx(theta.half_width_slope() * 0.02 / 40).epsilon(1e-12));
  // The shadow's ends are on the ellipse: just inside and just outside along the slope axis, from the centre.
  const double c0 = line.centre_intercept(), c1 = line.centre_slope();
  CHECK(line.contains(c0, c1));
  CHECK_FALSE(line.contains(c0, c1 + 1.001 * line.half_width_slope()));
  CHECK_FALSE(line.contains(c0 + 1.001 * line.half_width_intercept(), c1));
}

TEST_CASE("the confidence sequence covers a nonzero true change at all times") {
  // Coverage of theta* = (0.4, -0.3) over 2000 pairs, 400 replicates: misses <= alpha + 2 MC SE.
  const double alpha = 0.1;
  Design g(6);
  int missed = 0;
  const int replicates = 400;
  for (int r = 0; r < replicates; ++r) {
    NormalMixtureTest test(alpha, 0.4);
    for (int t = 0; t < 2000; ++t) {
      const double d = g.d();
      test.update(g.e() + 0.4 - 0.3 * d, d);
      if (!test.confidence_region().contains(0.4, -0.3)) {
        ++missed;
        break;
      }
    }
  }
  const double observed = static_cast<double>(missed) / replicates;
  INFO("missed " << missed << " of " << replicates);
  CHECK(observed <= alpha + 2 * std::sqrt(alpha * (1 - alpha) / replicates));
}

TEST_CASE("an unbounded region before the regressors spread") {
  NormalMixtureTest test(0.05, 1.0);
  test.update(0.3, 1.0);
  test.update(-0.1, 1.0);  // one distinct d: the slope is not identified
  const ConfidenceRegion c = test.confidence_region();
  CHECK_FALSE(c.bounded());
  CHECK(std::isinf(c.half_width_slope()));
  CHECK(c.contains(0, 0));
}

TEST_CASE("mixture checkpoints restore identical behaviour; invalid ones are refused") {
  Design g(7);
  NormalMixtureTest a(0.01, 0.4);
  for (int i = 0; i < 777; ++i) a.update(g.e() + 0.05, g.d());
  NormalMixtureTest b(0.01, 0.4);
  REQUIRE(b.restore(a.state()).ok());
  for (int i = 0; i < 3000; ++i) {
    const double e = g.e() + 0.05, d = g.d();
    REQUIRE(a.update(e, d) == b.update(e, d));
    REQUIRE(a.log_martingale() == b.log_martingale());
  }
  NormalMixtureTest::State bad = a.state();
  bad.m2_d = -1;
  CHECK_FALSE(b.restore(bad).ok());
  bad = {};
  bad.s0 = 1;
  CHECK_FALSE(b.restore(bad).ok());
  CHECK_FALSE(NormalMixtureTest::create(0, 1).ok());
  CHECK_FALSE(NormalMixtureTest::create(1, 1).ok());
  CHECK_FALSE(NormalMixtureTest::create(0.05, 0).ok());
  CHECK_THROWS(NormalMixtureTest(0.05, -1));
  CHECK_THROWS(a.update(NAN, 0));
}

TEST_CASE("the prior scale grows in proportion to the design shift") {
  // rho / delta and t delta^2 depend on alpha only (mixture.hpp).
  const MixtureDesign base = design_mixture(0.05, 1.0).value();
  CHECK(base.rho == Approx(0.64).margin(0.01));
  CHECK(base.detection_pairs == Approx(11.5).margin(0.1));
  for (const double shift : {0.1, 0.5, 3.0}) {
    const MixtureDesign d = design_mixture(0.05, shift).value();
    CHECK(d.rho / shift == Approx(base.rho).epsilon(1e-6));
    CHECK(d.detection_pairs * shift * shift == Approx(base.detection_pairs).epsilon(1e-6));
  }
  // Smaller alpha: a higher threshold to cross, later detection.
  CHECK(design_mixture(0.001, 1.0).value().detection_pairs > base.detection_pairs);
  CHECK_FALSE(design_mixture(0, 1).ok());
  CHECK_FALSE(design_mixture(0.05, 0).ok());
  CHECK_FALSE(design_mixture(0.05, NAN).ok());
}
