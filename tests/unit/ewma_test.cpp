// The EWMA: recursion, fixed limits, checkpoints and simulated ARLs.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>
#include <stdexcept>

#include "../support/run_length.hpp"
#include "rigcal/detect/arl.hpp"
#include "rigcal/detect/ewma.hpp"

using rigcal::detect::Ewma;

TEST_CASE("EWMA follows Roberts' recursion with limits L sqrt(lambda / (2 - lambda))") {
  // W = lambda z + (1 - lambda) W; lambda = 0.25. Expected values worked by hand.
  Ewma e(0.25, 3.0);
  CHECK(e.limit() == Approx(3.0 * std::sqrt(0.25 / 1.75)).epsilon(1e-15));
  e.update(1.0);
  CHECK(e.statistic() == Approx(0.25).epsilon(1e-15));
  e.update(2.0);
  CHECK(e.statistic() == Approx(0.6875).epsilon(1e-15));
  e.update(-1.0);
  CHECK(e.statistic() == Approx(0.265625).epsilon(1e-15));
  CHECK_FALSE(e.in_alarm());
  for (int i = 0; i < 20; ++i) e.update(-3.0);
  CHECK(e.lower_alarm());
  CHECK_FALSE(e.upper_alarm());
  e.reset();
  CHECK(e.statistic() == 0);
}

TEST_CASE("EWMA limits are the asymptotic ones from the first innovation") {
  // The time-varying limit at t = 1 would be L lambda (= 0.75 here); the asymptotic one is
  // L sqrt(lambda / (2 - lambda)) = 1.134. W_1 = 1.0 lies between: no alarm with fixed limits.
  Ewma e(0.25, 3.0);
  CHECK_FALSE(e.update(4.0));
  CHECK(e.statistic() == 1.0);
}

TEST_CASE("EWMA checkpoints restore identical behaviour") {
  std::mt19937_64 rng(5);
  std::normal_distribution<double> z(0.1, 1.0);
  Ewma original(0.1, 2.814);
  for (int i = 0; i < 1000; ++i) original.update(z(rng));
  Ewma restored(0.1, 2.814);
  REQUIRE(restored.restore(original.state()).ok());
  for (int i = 0; i < 1000; ++i) {
    const double v = z(rng);
    REQUIRE(original.update(v) == restored.update(v));
    REQUIRE(original.statistic() == restored.statistic());
  }
}

TEST_CASE("EWMA rejects invalid parameters, checkpoints and innovations") {
  CHECK_FALSE(Ewma::create(0, 3).ok());
  CHECK_FALSE(Ewma::create(1.01, 3).ok());
  CHECK_FALSE(Ewma::create(0.1, 0).ok());
  CHECK_FALSE(Ewma::create(NAN, 3).ok());
  CHECK(Ewma::create(1.0, 3).ok());
  CHECK_THROWS_AS(Ewma(0.1, -2), std::invalid_argument);
  Ewma e(0.1, 3);
  CHECK_THROWS_AS(e.update(INFINITY), std::invalid_argument);
  CHECK_FALSE(e.restore({NAN}).ok());
  CHECK(e.restore({0.8}).ok());  // limit 0.688
  CHECK(e.upper_alarm());
}

TEST_CASE("simulated EWMA run lengths match the Markov-chain ARL (Lucas & Saccucci schemes)") {
  struct Case {
    double lambda, L, mu;
    int runs;
  };
  // lambda = 0.1, L = 2.814 and lambda = 0.5, L = 3.071: ARL0 = 500 in Lucas & Saccucci (1990).
  for (const Case c : {Case{0.1, 2.814, 0, 6000}, Case{0.5, 3.071, 0, 6000}, Case{0.1, 2.814, 1.0, 6000},
                       Case{0.2, 2.5, 0.5, 6000}}) {
    const double computed = rigcal::detect::ewma_arl(c.lambda, c.L, c.mu).value();
    const auto sim = rigcal::test::simulate_run_lengths(
        Ewma(c.lambda, c.L), c.mu, c.runs, static_cast<std::uint64_t>(1000 * c.lambda + 10 * c.mu));
    INFO("lambda = " << c.lambda << ", mu = " << c.mu << ": computed " << computed << ", simulated "
                     << sim.mean << " +- " << sim.standard_error);
    CHECK(std::abs(sim.mean - computed) < 3 * sim.standard_error);
  }
}
