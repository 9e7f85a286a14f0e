// The streaming estimator against an independent batch algorithm (Householder QR in extended
// precision on centred data, rigcal/stats/batch_fit.hpp) after a million pairs, under every memory
// policy, with the reference values sitting at large offsets.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>
#include <vector>

#include "rigcal/stats/batch_fit.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;

namespace {

struct Pairs {
  std::vector<double> x, y;
};

// A sensor reading 0.3 + 1.002 x with noise 0.05 over a 100-unit span above `offset`.
Pairs make_pairs(std::size_t n, double offset, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> spread(0.0, 100.0);
  std::normal_distribution<double> noise(0.0, 0.05);
  Pairs p;
  p.x.reserve(n);
  p.y.reserve(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double x = offset + spread(rng);
    p.x.push_back(x);
    p.y.push_back(0.3 + 1.002 * x + noise(rng));
  }
  return p;
}

double rel(double a, double b) { return std::abs(a - b) / std::max(std::abs(b), 1e-300); }

// b0 = mean_y - b1 mean_x amplifies the slope's rounding by |mean_x| / |b0| (1e9 at the largest offset),
// so no double-precision method determines b0 to 1e-10 of itself there; compare it at the scale of the
// terms it is computed from.
double intercept_scale(const LineFit& f) { return std::abs(f.b0) + std::abs(f.b1 * f.mean_x); }

void check_same_fit(const LineFit& streaming, const LineFit& batch) {
  CHECK(rel(streaming.b1, batch.b1) < 1e-10);
  CHECK(std::abs(streaming.b0 - batch.b0) < 1e-10 * intercept_scale(batch));
  CHECK(rel(streaming.mean_y, batch.mean_y) < 1e-10);
  CHECK(rel(streaming.mean_x, batch.mean_x) < 1e-10);
  CHECK(rel(streaming.s, batch.s) < 1e-10);
  CHECK(rel(streaming.se_b1, batch.se_b1) < 1e-10);
  CHECK(rel(streaming.se_b0, batch.se_b0) < 1e-10);
  CHECK(rel(streaming.sxx, batch.sxx) < 1e-10);
}

}  // namespace

TEST_CASE("streaming equals batch QR after 10^6 pairs at reference offsets 0, 1e6 and 1e9") {
  const std::size_t n = 1'000'000;
  for (double offset : {0.0, 1e6, 1e9}) {
    const Pairs p = make_pairs(n, offset, 20261201);
    INFO("offset " << offset);

    SECTION("cumulative") {
      StreamingLineFit fit(MemoryPolicy::cumulative());
      for (std::size_t i = 0; i < n; ++i) fit.add(p.x[i], p.y[i]);
      auto batch = batch_fit(p.x, p.y, {}, Model::line);
      REQUIRE(batch.ok());
      check_same_fit(fit.summary(Model::line).value(), batch.value());
    }
    SECTION("sliding window of 1000 pairs, after 999 000 slides") {
      const std::size_t window = 1000;
      StreamingLineFit fit(MemoryPolicy::window(window));
      for (std::size_t i = 0; i < n; ++i) fit.add(p.x[i], p.y[i]);
      std::span<const double> xs(p.x.data() + n - window, window), ys(p.y.data() + n - window, window);
      auto batch = batch_fit(xs, ys, {}, Model::line);
      REQUIRE(batch.ok());
      check_same_fit(fit.summary(Model::line).value(), batch.value());
    }
    SECTION("exponential forgetting, lambda = 0.999") {
      const double lambda = 0.999;
      StreamingLineFit fit(MemoryPolicy::forgetting(lambda));
      for (std::size_t i = 0; i < n; ++i) fit.add(p.x[i], p.y[i]);
      // The batch fit sees the same pairs with weights lambda^age (those below 1e-300 dropped).
      std::vector<double> xs, ys, ws;
      double w = 1;
      for (std::size_t i = n; i-- > 0 && w > 1e-300; w *= lambda) {
        xs.push_back(p.x[i]);
        ys.push_back(p.y[i]);
        ws.push_back(w);
      }
      auto batch = batch_fit(xs, ys, ws, Model::line);
      REQUIRE(batch.ok());
      const LineFit s = fit.summary(Model::line).value();
      const LineFit& b = batch.value();
      CHECK(rel(s.b1, b.b1) < 1e-10);
      CHECK(std::abs(s.b0 - b.b0) < 1e-10 * intercept_scale(b));
      CHECK(rel(s.mean_y, b.mean_y) < 1e-10);
      // Same weighted sums, before the effective-sample-size rescaling (see line_fit.hpp).
      const double rescale = fit.moments().a1 / fit.moments().a2;
      CHECK(rel(s.ssr / rescale, b.ssr) < 1e-10);
      CHECK(rel(s.sxx / rescale, b.sxx) < 1e-10);
      CHECK(s.n == Approx((1 + lambda) / (1 - lambda)).epsilon(1e-9));
    }
  }
}

TEST_CASE("the raw-sum formula fails on the same data where the streaming fit does not") {
  // Sxx = sum x^2 - (sum x)^2 / n loses every digit when x sits at 1e6 with a spread of 100: this test
  // would catch a regression of the accumulator to raw sums.
  const std::size_t n = 100'000;
  const Pairs p = make_pairs(n, 1e6, 7);
  double sx = 0, sy = 0, sxx = 0, sxy = 0;
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (std::size_t i = 0; i < n; ++i) {
    sx += p.x[i];
    sy += p.y[i];
    sxx += p.x[i] * p.x[i];
    sxy += p.x[i] * p.y[i];
    fit.add(p.x[i], p.y[i]);
  }
  const double nn = static_cast<double>(n);
  const double naive_sxx = sxx - sx * sx / nn;
  const double naive_slope = (sxy - sx * sy / nn) / naive_sxx;
  const LineFit batch = batch_fit(p.x, p.y, {}, Model::line).value();
  const LineFit streaming = fit.summary(Model::line).value();
  CHECK(rel(naive_sxx, batch.sxx) > 1e-6);
  CHECK(rel(naive_slope, batch.b1) > 1e-6);
  CHECK(rel(streaming.sxx, batch.sxx) < 1e-12);
  CHECK(rel(streaming.b1, batch.b1) < 1e-12);
}

TEST_CASE("weighted and through-origin streaming fits equal batch QR") {
  std::mt19937_64 rng(99);
  std::uniform_real_distribution<double> u(1.0, 50.0), wdist(0.2, 5.0);
  std::normal_distribution<double> noise(0.0, 1.0);
  std::vector<double> x, y, w;
  for (int i = 0; i < 5000; ++i) {
    x.push_back(u(rng));
    w.push_back(wdist(rng));
    y.push_back(2.0 + 0.98 * x.back() + noise(rng) / std::sqrt(w.back()));
  }
  for (Model model : {Model::line, Model::through_origin}) {
    StreamingLineFit fit(MemoryPolicy::cumulative(), true);
    for (std::size_t i = 0; i < x.size(); ++i) fit.add(x[i], y[i], w[i]);
    const LineFit s = fit.summary(model).value();
    const LineFit b = batch_fit(x, y, w, model).value();
    INFO((model == Model::line ? "line" : "through origin"));
    CHECK(rel(s.b1, b.b1) < 1e-12);
    CHECK(std::abs(s.b0 - b.b0) < 1e-12);
    CHECK(rel(s.s, b.s) < 1e-12);
    CHECK(rel(s.se_b1, b.se_b1) < 1e-12);
    CHECK(std::abs(s.se_b0 - b.se_b0) < 1e-12);
    CHECK(rel(*s.r2, *b.r2) < 1e-12);
  }
}

TEST_CASE("a weighted window removes each pair with its own weight") {
  std::mt19937_64 rng(3);
  std::uniform_real_distribution<double> u(0.0, 10.0), wdist(0.5, 2.0);
  std::vector<double> x, y, w;
  StreamingLineFit fit(MemoryPolicy::window(50), true);
  for (int i = 0; i < 5000; ++i) {
    x.push_back(u(rng));
    y.push_back(1 + 2 * x.back() + u(rng));
    w.push_back(wdist(rng));
    fit.add(x.back(), y.back(), w.back());
  }
  const std::size_t k = x.size() - 50;
  const LineFit b = batch_fit(std::span(x).subspan(k), std::span(y).subspan(k), std::span(w).subspan(k),
                              Model::line).value();
  const LineFit s = fit.summary(Model::line).value();
  CHECK(rel(s.b1, b.b1) < 1e-11);
  CHECK(rel(s.s, b.s) < 1e-11);
  CHECK(s.count == 50);
}

TEST_CASE("merging two states equals adding all their pairs to one") {
  const Pairs p = make_pairs(2000, 5e5, 11);
  LineAccumulator all, first, second;
  for (std::size_t i = 0; i < 2000; ++i) {
    all.add(p.x[i], p.y[i]);
    (i < 700 ? first : second).add(p.x[i], p.y[i]);
  }
  first.merge(second);
  const LineFit a = summarize(all.moments(), Model::line).value();
  const LineFit m = summarize(first.moments(), Model::line).value();
  CHECK(rel(m.b1, a.b1) < 1e-12);
  CHECK(rel(m.s, a.s) < 1e-10);
  CHECK(rel(m.se_b0, a.se_b0) < 1e-10);
  CHECK(m.count == 2000);

  LineAccumulator empty;
  empty.merge(all);
  CHECK(empty.moments() == all.moments());
  all.merge(LineAccumulator{});
  CHECK(summarize(all.moments(), Model::line).value().b1 == a.b1);
}
