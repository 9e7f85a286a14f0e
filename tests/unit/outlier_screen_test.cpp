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

TEST_CASE("a single spike is held for its episode, then rejected; normal pairs pass meanwhile") {
  const LineFit fit = clean_fit();
  OutlierScreen screen(true, 6.0, 3, 5);
  CHECK(screen.offer(pair_with(fit, 40, fit.predict(40) + 50)) == OutlierScreen::Verdict::hold);
  CHECK(screen.take_released().empty());
  for (int i = 0; i < 4; ++i) {
    CHECK(screen.offer(pair_with(fit, 41 + i, fit.predict(41 + i))) == OutlierScreen::Verdict::pass);
    CHECK(screen.take_rejected().size() == (i < 3 ? 0u : 1u));
  }
  CHECK(screen.held().empty());
}

TEST_CASE("max_held flagged pairs within an episode are a real change and are all released in order") {
  // A gain change flags the pairs far from the centre while those near it pass: interleaved.
  const LineFit fit = clean_fit();
  OutlierScreen screen(true, 6.0, 3, 20);
  CHECK(screen.offer(pair_with(fit, 90, fit.predict(90) + 5)) == OutlierScreen::Verdict::hold);
  CHECK(screen.offer(pair_with(fit, 50, fit.predict(50))) == OutlierScreen::Verdict::pass);
  CHECK(screen.offer(pair_with(fit, 95, fit.predict(95) + 5)) == OutlierScreen::Verdict::hold);
  CHECK(screen.offer(pair_with(fit, 51, fit.predict(51))) == OutlierScreen::Verdict::pass);
  CHECK(screen.take_released().empty());
  CHECK(screen.offer(pair_with(fit, 99, fit.predict(99) + 5)) == OutlierScreen::Verdict::hold);
  const auto released = screen.take_released();
  REQUIRE(released.size() == 3);
  CHECK(released[0].x == 90);
  CHECK(released[2].x == 99);
  CHECK(screen.held().empty());
  CHECK(screen.take_rejected().empty());
}
