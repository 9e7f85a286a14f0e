// The simulator's random numbers: bit-exact from a seed on any standard library, and distributed as
// they claim.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>
#include <set>

#include "rigcal/sim/random.hpp"

using namespace rigcal::sim;

TEST_CASE("std::mt19937_64 is the engine the standard specifies") {
  // [rand.predef]: the 10000th output of a default-constructed mt19937_64.
  std::mt19937_64 e;
  e.discard(9999);
  CHECK(e() == 9981545732273789042ull);
}

TEST_CASE("uniform01 is the engine's top 53 bits, so a seed gives the same values everywhere") {
  RandomStream r(42);
  std::mt19937_64 e(42);
  for (int i = 0; i < 1000; ++i) {
    const double u = r.uniform01();
    REQUIRE(u == static_cast<double>(e() >> 11) / 9007199254740992.0);
    REQUIRE(u >= 0.0);
    REQUIRE(u < 1.0);
  }
}

TEST_CASE("the same seed gives the same stream, another seed another") {
  RandomStream a(7), b(7), c(8);
  bool differs = false;
  for (int i = 0; i < 100; ++i) {
    const double x = a.normal();
    REQUIRE(x == b.normal());
    differs = differs || x != c.normal();
  }
  CHECK(differs);
}

TEST_CASE("derived seeds differ by channel and by purpose") {
  std::set<std::uint64_t> seeds;
  for (std::uint64_t ch = 0; ch < 50; ++ch)
    for (std::uint64_t purpose = 1; purpose <= 3; ++purpose) seeds.insert(derive_seed(1, ch, purpose));
  CHECK(seeds.size() == 150);
  CHECK(derive_seed(1, 0, 1) != derive_seed(2, 0, 1));
  // SplitMix64's published first output for state 0 (x += golden gamma, then mix).
  CHECK(splitmix64(0) == 0xE220A8397B1DCDAFull);
}

TEST_CASE("normal draws have mean 0 and standard deviation 1") {
  RandomStream r(2026);
  const int n = 200000;
  double sum = 0, sum2 = 0, beyond3 = 0;
  for (int i = 0; i < n; ++i) {
    const double x = r.normal();
    sum += x;
    sum2 += x * x;
    if (std::abs(x) > 3) ++beyond3;
  }
  const double mean = sum / n, sd = std::sqrt(sum2 / n - mean * mean);
  CHECK(std::abs(mean) < 5 / std::sqrt(double(n)));        // 5 standard errors
  CHECK(std::abs(sd - 1) < 5 / std::sqrt(2.0 * n));
  CHECK(beyond3 / n == Approx(0.0027).margin(0.0006));      // two-sided tail beyond 3 sd
}

TEST_CASE("below(n) is uniform over 0..n-1 and chance(p) happens at rate p") {
  RandomStream r(11);
  int counts[6] = {};
  for (int i = 0; i < 60000; ++i) ++counts[r.below(6)];
  for (int c : counts) CHECK(std::abs(c - 10000) < 5 * std::sqrt(10000 * 5.0 / 6));
  int hits = 0;
  for (int i = 0; i < 100000; ++i) hits += r.chance(0.03);
  CHECK(std::abs(hits - 3000) < 5 * std::sqrt(100000 * 0.03 * 0.97));
  CHECK_FALSE(r.chance(0.0));
  CHECK(r.chance(1.0));
}
