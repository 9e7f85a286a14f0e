// Outlier screening: isolated spikes are kept out of the fit; a lasting change gets through.
#include <catch2/catch.hpp>

#include "rigcal/engine/outlier_screen.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::engine;
using namespace rigcal::stats;

namespace {
LineFit clean_fit() {
  StreamingLineFit f(MemoryPolicy::cumulative());
  for (int i = 0; i < 100; ++i) f.add(i, 2.0 + 0.5 * i + 0.01 * ((i * 37) % 11 - 5));
  return f.summary(Model::line).value();
}
HeldPair pair_with(const LineFit& fit, double x, double y) {
  HeldPair p;
  p.x = x;
  p.y = y;
  p.residual = OutlierScreen::studentised_residual(fit, x, y, 0.0);
  return p;
}
}  // namespace

TEST_CASE("the studentised prediction residual uses the leverage of the new point") {
  const LineFit fit = clean_fit();
  const double r_mid = OutlierScreen::studentised_residual(fit, 50, fit.predict(50) + fit.s, 0);
  const double r_far = OutlierScreen::studentised_residual(fit, 500, fit.predict(500) + fit.s, 0);
  CHECK(r_mid == Approx(1.0 / std::sqrt(1.0 + fit.leverage(50))));
  CHECK(std::abs(r_far) < std::abs(r_mid));  // far from the data the prediction is less certain
  CHECK(OutlierScreen::studentised_residual(fit, 50, fit.predict(50) + 1.0, 10.0) ==
        Approx(0.1 / std::sqrt(1.0 + fit.leverage(50))));  // floor on s
}

TEST_CASE("a single spike is held, then rejected when the next pair is normal") {
  const LineFit fit = clean_fit();
  OutlierScreen screen(true, 6.0, 3);
  CHECK(screen.offer(pair_with(fit, 40, fit.predict(40) + 50)) == OutlierScreen::Verdict::hold);
  CHECK(screen.take_released().empty());
  CHECK(screen.offer(pair_with(fit, 41, fit.predict(41))) == OutlierScreen::Verdict::pass);
  const auto rejected = screen.take_rejected();
  REQUIRE(rejected.size() == 1);
  CHECK(rejected[0].x == 40);
  CHECK(std::abs(rejected[0].residual) > 6.0);
}

TEST_CASE("max_consecutive outliers in a row are a real change and are all released in order") {
  const LineFit fit = clean_fit();
  OutlierScreen screen(true, 6.0, 3);
  for (int i = 0; i < 2; ++i) {
    CHECK(screen.offer(pair_with(fit, 10.0 + i, fit.predict(10.0 + i) + 5)) == OutlierScreen::Verdict::hold);
    CHECK(screen.take_released().empty());
  }
  CHECK(screen.offer(pair_with(fit, 12, fit.predict(12) + 5)) == OutlierScreen::Verdict::hold);
  const auto released = screen.take_released();
  REQUIRE(released.size() == 3);
  CHECK(released[0].x == 10);
  CHECK(released[2].x == 12);
  CHECK(screen.held().empty());
  CHECK(screen.take_rejected().empty());
}
