// Offset and slope innovations: formulas, the pairing rule, exactness in control and blindness of the
// slope innovation to offset changes.
#include <catch2/catch.hpp>
#include <cmath>
#include <numbers>
#include <random>
#include <vector>

#include "rigcal/detect/arl.hpp"
#include "rigcal/detect/cusum.hpp"
#include "rigcal/detect/innovations.hpp"

using namespace rigcal::detect;
using rigcal::stats::CertifiedLine;

TEST_CASE("reference centre: median, root-mean-square spread and mean absolute deviation") {
  const std::vector<double> odd = {4, 1, 10, 2, 3};
  const ReferenceCentre c = reference_centre(odd).value();
  CHECK(c.x_centre == 3);
  CHECK(c.x_spread == Approx(std::sqrt((1 + 4 + 0 + 1 + 49) / 5.0)).epsilon(1e-15));
  CHECK(c.mean_abs_deviation == Approx((1 + 2 + 0 + 1 + 7) / 5.0).epsilon(1e-15));
  const std::vector<double> even = {0, 1, 3, 10};
  CHECK(reference_centre(even).value().x_centre == 2);
  const std::vector<double> one = {1}, flat = {2, 2, 2}, bad = {1, NAN};
  CHECK_FALSE(reference_centre(one).ok());
  CHECK(reference_centre(flat).error().message.find("no spread") != std::string::npos);
  CHECK_FALSE(reference_centre(bad).ok());
}

TEST_CASE("offset innovation is the standardised deviation from the certificate line") {
  const CertifiedLine line{0.2, 1.01};
  CHECK(offset_innovation(50, 0.2 + 1.01 * 50 + 0.03, line, 0.01) == Approx(3.0).epsilon(1e-9));
  const ReferenceCentre c{300, 50, 40};
  CHECK(slope_shift_sigma(-0.001, c, 0.02) == Approx(std::numbers::sqrt2 * 0.001 * 40 / 0.02).epsilon(1e-15));
  CHECK(line_shift_sigma(0.03, 0.0, c, 0.01) == Approx(3.0).epsilon(1e-15));
  CHECK(line_shift_sigma(-0.3, 0.001, c, 0.01) == Approx(5.0).epsilon(1e-12));  // (0, 5)
}

TEST_CASE("slope pairs match the oldest held pair across the centre") {
  SlopeInnovation s(5.0);
  const double r2 = std::numbers::sqrt2;
  CHECK_FALSE(s.update(1, 0.1));  // below: held
  CHECK_FALSE(s.update(2, 0.2));  // below: held
  auto v = s.update(8, 1.0);      // above: pairs with x = 1
  REQUIRE(v);
  CHECK(*v == Approx((1.0 - 0.1) / r2).epsilon(1e-15));
  v = s.update(9, 0.5);  // above: pairs with x = 2
  REQUIRE(v);
  CHECK(*v == Approx((0.5 - 0.2) / r2).epsilon(1e-15));
  CHECK(s.held() == 0);
  CHECK_FALSE(s.update(7, 0.7));  // above: held
  v = s.update(5, -0.4);          // at the centre: its own side, pairs with x = 7, sign(5 - 7) = -1
  REQUIRE(v);
  CHECK(*v == Approx(-(-0.4 - 0.7) / r2).epsilon(1e-15));
  CHECK_FALSE(s.update(5, 0.3));  // at the centre: held
  CHECK_FALSE(s.update(5, 0.3));  // same side again: held
  CHECK(s.held() == 2);
}

TEST_CASE("at most max_pending pairs are held; the oldest is dropped") {
  SlopeInnovation s(0.0);
  for (int i = 0; i < 20; ++i) s.update(-1.0 - i, static_cast<double>(i));
  CHECK(s.held() == SlopeInnovation::max_pending);
  const auto v = s.update(1.0, 0.0);  // pairs with the oldest kept: i = 4
  REQUIRE(v);
  CHECK(*v == Approx((0.0 - 4.0) / std::numbers::sqrt2).epsilon(1e-15));
}

TEST_CASE("a pure offset change leaves the slope innovations unchanged") {
  // Same noise, same reference values, with and without a 2-sigma offset fault.
  std::mt19937_64 rng(21);
  std::uniform_real_distribution<double> x(0, 100);
  std::normal_distribution<double> noise;
  const CertifiedLine line{0.5, 1.002};
  const double sigma = 0.05;
  const std::vector<double> refs = {0, 25, 50, 75, 100};
  const ReferenceCentre centre = reference_centre(refs).value();
  InnovationStream clean(line, sigma, centre), faulty(line, sigma, centre);
  int compared = 0;
  for (int i = 0; i < 10000; ++i) {
    const double xi = x(rng), e = sigma * noise(rng);
    const double y = line.intercept + line.slope * xi + e;
    const Innovations a = clean.next(xi, y), b = faulty.next(xi, y + 2 * sigma);
    REQUIRE(b.offset == Approx(a.offset + 2).margin(1e-9));
    REQUIRE(a.slope.has_value() == b.slope.has_value());
    if (a.slope) {
      REQUIRE(std::abs(*a.slope - *b.slope) < 1e-9);
      ++compared;
    }
  }
  CHECK(compared > 4500);  // about one slope innovation per two pairs
}

TEST_CASE("a slope change gives the slope innovation mean db1 |x_b - x_a| / (sigma sqrt 2)") {
  const CertifiedLine line{0, 1};
  const double sigma = 0.1, db1 = 0.002;
  InnovationStream s(line, sigma, ReferenceCentre{50, 30, 25});
  const double xs[] = {10, 90, 30, 60};
  std::vector<double> out;
  for (const double xi : xs) {
    if (auto v = s.next(xi, (1 + db1) * xi).slope) out.push_back(*v);
  }
  REQUIRE(out.size() == 2);
  CHECK(out[0] == Approx(db1 * 80 / (sigma * std::numbers::sqrt2)).epsilon(1e-9));
  CHECK(out[1] == Approx(db1 * 30 / (sigma * std::numbers::sqrt2)).epsilon(1e-9));
}

TEST_CASE("slope innovations are exactly N(0, 1) in control: same ARL as the offset innovations") {
  // Two-sided CUSUM k = 0.5, h = 4 (computed ARL0 167.7) run on each innovation stream of simulated
  // pairs; the slope detector counts slope innovations. Then a 1-sigma offset fault: the offset
  // detector's ARL drops to ~8.4, the slope detector's does not move.
  const double arl0 = cusum_arl_two_sided(0.5, 4, 0).value();
  auto run_lengths = [&](double offset_sigma, bool slope, int runs, std::uint64_t seed) {
    std::mt19937_64 rng(seed);
    std::uniform_real_distribution<double> x(0, 100);
    std::normal_distribution<double> noise;
    const CertifiedLine line{0.5, 1.002};
    const double sigma = 0.05;
    const std::vector<double> refs = {0, 20, 40, 60, 80, 100};
    const ReferenceCentre centre = reference_centre(refs).value();
    double sum = 0, sum_sq = 0;
    for (int r = 0; r < runs; ++r) {
      InnovationStream stream(line, sigma, centre);
      Cusum detector(0.5, 4);
      double length = 0;
      for (bool alarm = false; !alarm;) {
        const double xi = x(rng);
        const Innovations in =
            stream.next(xi, line.intercept + line.slope * xi + sigma * (offset_sigma + noise(rng)));
        if (!slope) {
          ++length;
          alarm = detector.update(in.offset);
        } else if (in.slope) {
          ++length;
          alarm = detector.update(*in.slope);
        }
      }
      sum += length;
      sum_sq += length * length;
    }
    const double mean = sum / runs;
    return std::pair{mean, std::sqrt((sum_sq / runs - mean * mean) / runs)};
  };
  const auto [offset_mean, offset_se] = run_lengths(0, false, 6000, 31);
  const auto [slope_mean, slope_se] = run_lengths(0, true, 6000, 32);
  const auto [faulted_mean, faulted_se] = run_lengths(1.0, true, 6000, 33);
  const auto [offset_fault_mean, offset_fault_se] = run_lengths(1.0, false, 2000, 34);
  INFO("ARL0 " << arl0 << "; offset " << offset_mean << " +- " << offset_se << "; slope " << slope_mean
               << " +- " << slope_se << "; slope under a 1-sigma offset fault " << faulted_mean << " +- "
               << faulted_se << "; offset under it " << offset_fault_mean);
  CHECK(std::abs(offset_mean - arl0) < 3 * offset_se);
  CHECK(std::abs(slope_mean - arl0) < 3 * slope_se);
  CHECK(std::abs(slope_mean - offset_mean) < 3 * std::hypot(slope_se, offset_se));
  CHECK(std::abs(faulted_mean - arl0) < 3 * faulted_se);
  CHECK(std::abs(offset_fault_mean - cusum_arl_two_sided(0.5, 4, 1.0).value()) < 3 * offset_fault_se);
}

TEST_CASE("innovation stream: regressor, checkpoints and invalid restores") {
  const CertifiedLine line{0, 1};
  const ReferenceCentre centre{10, 4, 3};
  InnovationStream a(line, 0.5, centre);
  CHECK(a.next(18, 18.5).d == Approx(2.0).epsilon(1e-15));
  std::mt19937_64 rng(9);
  std::uniform_real_distribution<double> x(0, 20);
  std::normal_distribution<double> noise;
  for (int i = 0; i < 101; ++i) {
    const double xi = x(rng);
    a.next(xi, xi + 0.5 * noise(rng));
  }
  InnovationStream b(line, 0.5, centre);
  REQUIRE(b.restore(a.state()).ok());
  for (int i = 0; i < 500; ++i) {
    const double xi = x(rng), yi = xi + 0.5 * noise(rng);
    const Innovations p = a.next(xi, yi), q = b.next(xi, yi);
    REQUIRE(p.offset == q.offset);
    REQUIRE(p.slope == q.slope);
  }
  SlopeInnovation::State bad;
  bad.count = 1;
  bad.side = 1;
  bad.held[0] = {5.0, 0.1};  // below the centre 10, but recorded as above
  CHECK_FALSE(b.restore(bad).ok());
  bad.count = 40;
  CHECK_FALSE(b.restore(bad).ok());
}
