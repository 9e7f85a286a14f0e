// The run-length study's pair simulator: the line, the changes, AR(1) noise and spikes.
#include <catch2/catch.hpp>
#include <cmath>
#include <vector>

#include "pair_simulator.hpp"

using namespace rigcal::study;

namespace {

// Noise of each simulated pair: its reading minus the in-control line.
std::vector<double> residuals(PairSimulator& sim, CertificateLine line, int n) {
  std::vector<double> r;
  for (int i = 0; i < n; ++i) {
    const Pair p = sim.next();
    r.push_back(p.y - line.intercept - line.slope * p.x);
  }
  return r;
}

}  // namespace

TEST_CASE("AR(1) noise keeps its marginal SD at sigma and has lag-1 correlation phi") {
  const CertificateLine line{0.2, 1.01};
  for (const double phi : {0.0, 0.5, 0.8}) {
    PairSimulator sim(line, 0, 100, {0.5, phi, 0, 20}, {}, 7);
    const auto r = residuals(sim, line, 200000);
    double mean = 0;
    for (double v : r) mean += v / static_cast<double>(r.size());
    double var = 0, lag1 = 0;
    for (std::size_t i = 0; i < r.size(); ++i) {
      var += (r[i] - mean) * (r[i] - mean);
      if (i > 0) lag1 += (r[i] - mean) * (r[i - 1] - mean);
    }
    INFO("phi = " << phi << ": SD " << std::sqrt(var / static_cast<double>(r.size())) << ", lag-1 " << lag1 / var);
    // With 2e5 pairs the SD is good to ~1 % even at phi = 0.8 (effective n ~ 2e5 / 9), the
    // correlation to ~0.01.
    CHECK(std::sqrt(var / static_cast<double>(r.size())) == Approx(0.5).epsilon(0.03));
    CHECK(lag1 / var == Approx(phi).margin(0.015));
  }
}

TEST_CASE("spikes hit the configured fraction of pairs with the configured size, either sign") {
  const CertificateLine line{0, 1};
  PairSimulator sim(line, 0, 100, {1.0, 0, 0.005, 20}, {}, 8);
  const auto r = residuals(sim, line, 400000);
  int up = 0, down = 0;
  for (double v : r) {
    up += v > 10;
    down += v < -10;
  }
  const double n = static_cast<double>(r.size());
  const double se = std::sqrt(0.005 * 0.995 / n);
  CHECK(std::abs((up + down) / n - 0.005) < 4 * se);
  CHECK(std::abs(up - down) < 4 * std::sqrt(static_cast<double>(up + down)));
}

TEST_CASE("streams with and without spikes share their reference values and noise") {
  const CertificateLine line{0, 1};
  PairSimulator clean(line, 0, 100, {1.0, 0.5, 0, 20}, {}, 9), spiky(line, 0, 100, {1.0, 0.5, 0.01, 20}, {}, 9);
  int differing = 0;
  for (int i = 0; i < 5000; ++i) {
    const Pair a = clean.next(), b = spiky.next();
    REQUIRE(a.x == b.x);
    const double d = b.y - a.y;
    if (d != 0) {
      ++differing;
      CHECK(std::abs(std::abs(d) - 20) < 1e-9);
    }
  }
  CHECK(differing > 20);
  CHECK(differing < 100);
}

TEST_CASE("gain and offset changes start at their pair; ramps grow by the size per 1000 pairs") {
  const CertificateLine line{0.5, 2.0};
  const double sigma = 1e-12;  // effectively noise-free, to see the line itself
  SECTION("gain step pivots about x = 0") {
    PairSimulator sim(line, 10, 20, {sigma, 0, 0, 20}, {ChangeKind::gain_step, 0.01, 3}, 1);
    for (int i = 0; i < 6; ++i) {
      const Pair p = sim.next();
      const double gain = i >= 3 ? 0.01 : 0.0;
      CHECK(p.y == Approx(0.5 + 2.0 * (1 + gain) * p.x).margin(1e-9));
    }
  }
  SECTION("offset step is in sigma units") {
    PairSimulator sim(line, 10, 20, {0.5, 0, 0, 20}, {ChangeKind::offset_step, 2.0, 0}, 1);
    CHECK(sim.offset_change_sigmas_at(0) == 2.0);
  }
  SECTION("ramps") {
    const PairSimulator gain(line, 10, 20, {sigma, 0, 0, 20}, {ChangeKind::gain_ramp, 0.001, 100}, 1);
    CHECK(gain.gain_change_at(99) == 0);
    CHECK(gain.gain_change_at(100) == Approx(1e-6));
    CHECK(gain.gain_change_at(1099) == Approx(0.001));
    CHECK(gain.offset_change_sigmas_at(5000) == 0);
    const PairSimulator offset(line, 10, 20, {sigma, 0, 0, 20}, {ChangeKind::offset_ramp, 0.1, 0}, 1);
    CHECK(offset.offset_change_sigmas_at(1999) == Approx(0.2));
  }
}

TEST_CASE("stream seeds differ between replicates and families and repeat exactly") {
  CHECK(stream_seed(1, 2, 3) == stream_seed(1, 2, 3));
  CHECK(stream_seed(1, 2, 3) != stream_seed(1, 2, 4));
  CHECK(stream_seed(1, 2, 3) != stream_seed(1, 3, 3));
  CHECK(stream_seed(1, 2, 3) != stream_seed(2, 2, 3));
  CHECK_THROWS(PairSimulator({0, 1}, 0, 100, {1.0, 1.0, 0, 20}, {}, 1));
  CHECK_THROWS(PairSimulator({0, 1}, 5, 5, {1.0, 0, 0, 20}, {}, 1));
}
