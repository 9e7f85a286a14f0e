// The tabular CUSUM: recursion, alarms, cap, checkpoints and simulated ARLs.
#include <catch2/catch.hpp>
#include <random>
#include <stdexcept>
#include <string>
#include <vector>

#include "../support/run_length.hpp"
#include "rigcal/detect/arl.hpp"
#include "rigcal/detect/cusum.hpp"

using rigcal::detect::Cusum;

TEST_CASE("CUSUM follows the tabular recursion of Montgomery and the NIST e-Handbook 6.3.2.3") {
  // C+ = max(0, C+ + z - k), C- = max(0, C- - z - k); k = 0.5, h = 2. Expected values worked by hand.
  Cusum c(0.5, 2.0);
  const double z[] = {0.8, 1.6, -0.3, 2.2, -2.9, -1.4, 0.1};
  const double upper[] = {0.3, 1.4, 0.6, 2.3, 0.0, 0.0, 0.0};
  const double lower[] = {0.0, 0.0, 0.0, 0.0, 2.4, 3.3, 2.7};
  const bool alarm[] = {false, false, false, true, true, true, true};
  for (int i = 0; i < 7; ++i) {
    INFO("step " << i);
    CHECK(c.update(z[i]) == alarm[i]);
    CHECK(c.upper() == Approx(upper[i]).margin(1e-12));
    CHECK(c.lower() == Approx(lower[i]).margin(1e-12));
  }
  CHECK(c.lower_alarm());
  CHECK_FALSE(c.upper_alarm());
  c.reset();
  CHECK(c.upper() == 0);
  CHECK(c.lower() == 0);
  CHECK_FALSE(c.in_alarm());
}

TEST_CASE("the alarm is strictly beyond h") {
  Cusum c(0.0, 1.0);
  CHECK_FALSE(c.update(1.0));  // C+ = h exactly
  CHECK(c.update(1e-9));
}

TEST_CASE("a cap of 2h clears an alert in about h / k innovations after the fault is fixed") {
  // A 3-sigma fault for 5000 innovations, then exactly in control (z = 0): C+ drains by k per step.
  auto clearing_steps = [](double cap) {
    Cusum c(0.5, 5.0, cap);
    for (int i = 0; i < 5000; ++i) c.update(3.0);
    REQUIRE(c.upper_alarm());
    int steps = 0;
    while (c.update(0.0)) ++steps;
    return steps + 1;
  };
  CHECK(clearing_steps(10.0) == 10);              // (cap - h) / k
  CHECK(clearing_steps(Cusum::no_cap) == 24990);  // (2.5 * 5000 - h) / k: most of a day at 1 Hz
  Cusum capped(0.5, 5.0, 10.0);
  for (int i = 0; i < 100; ++i) capped.update(-4.0);
  CHECK(capped.lower() == 10.0);
  CHECK(capped.upper() == 0.0);
}

TEST_CASE("a cap above h does not move the first alarm") {
  std::mt19937_64 rng(7);
  std::normal_distribution<double> z(0.3, 1.0);
  for (int run = 0; run < 200; ++run) {
    Cusum capped(0.5, 4.0, 4.01), free(0.5, 4.0);
    for (int t = 0; t < 100000; ++t) {
      const double v = z(rng);
      const bool a = capped.update(v), b = free.update(v);
      REQUIRE(a == b);
      if (a) break;
    }
  }
}

TEST_CASE("CUSUM checkpoints restore identical behaviour") {
  std::mt19937_64 rng(3);
  std::normal_distribution<double> z(0.2, 1.0);
  Cusum original(0.5, 4.0, 8.0);
  for (int i = 0; i < 1000; ++i) original.update(z(rng));
  Cusum restored(0.5, 4.0, 8.0);
  REQUIRE(restored.restore(original.state()).ok());
  for (int i = 0; i < 1000; ++i) {
    const double v = z(rng);
    REQUIRE(original.update(v) == restored.update(v));
    REQUIRE(original.upper() == restored.upper());
    REQUIRE(original.lower() == restored.lower());
  }
}

TEST_CASE("CUSUM rejects invalid parameters, checkpoints and innovations") {
  CHECK_FALSE(Cusum::create(-0.1, 4).ok());
  CHECK_FALSE(Cusum::create(0.5, 0).ok());
  CHECK_FALSE(Cusum::create(0.5, 4, 3.9).ok());
  CHECK_FALSE(Cusum::create(0.5, 4, 4).ok());  // a cap at h would make the alarm impossible
  CHECK_FALSE(Cusum::create(0.5, 4, NAN).ok());
  CHECK(Cusum::create(0.5, 4, 8).ok());
  CHECK(Cusum::create(0.5, 4, 3.9).error().message.find("cap") != std::string::npos);
  CHECK_THROWS_AS(Cusum(0.5, -1), std::invalid_argument);
  Cusum c(0.5, 4, 8);
  CHECK_THROWS_AS(c.update(NAN), std::invalid_argument);
  CHECK_FALSE(c.restore({-1, 0}).ok());
  CHECK_FALSE(c.restore({0, 8.5}).ok());
  CHECK_FALSE(c.restore({INFINITY, 0}).ok());
  CHECK(c.restore({8, 3}).ok());
  CHECK(c.upper() == 8);
}

TEST_CASE("simulated CUSUM run lengths match the computed ARL (k = 0.5, h = 4 and 5)") {
  // Also checks the two-sided combination 1/ARL = 1/ARL+ + 1/ARL-, an approximation for h > 2k.
  struct Case {
    double h, mu;
    int runs;
  };
  for (const Case c : {Case{4, 0, 20000}, Case{5, 0, 8000}, Case{4, 0.5, 8000}, Case{4, 1, 8000}}) {
    const double computed = rigcal::detect::cusum_arl_two_sided(0.5, c.h, c.mu).value();
    const auto sim = rigcal::test::simulate_run_lengths(Cusum(0.5, c.h), c.mu, c.runs, 100 + c.runs);
    INFO("h = " << c.h << ", mu = " << c.mu << ": computed " << computed << ", simulated " << sim.mean
                << " +- " << sim.standard_error);
    CHECK(std::abs(sim.mean - computed) < 3 * sim.standard_error);
  }
}
