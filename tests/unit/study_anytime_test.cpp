// The anytime-valid test as the study runs it (the engine's innovations, learned centre, designed rho):
// its false-alarm probability over a long horizon stays below alpha, as Ville's inequality promises.
#include <catch2/catch.hpp>
#include <cmath>

#include "calibration.hpp"
#include "realistic.hpp"
#include "rigcal/detect/mixture.hpp"
#include "rigcal/engine/engine_tables.hpp"

using namespace rigcal;
using namespace rigcal::study;

TEST_CASE("anytime-valid test: P(false alert within 50 000 pairs) stays below alpha") {
  engine::EngineTables tables;
  const StudyChannel channel;
  const auto curve = anytime_alpha_curve(channel, {0.05, 0.2}, 50000, McPlan{400, 0, 31, 2}, tables);
  REQUIRE(curve.size() == 2);
  for (const auto& point : curve) {
    const double se = std::sqrt(point.alpha * (1 - point.alpha) / 400.0);
    INFO("alpha " << point.alpha << ": observed " << point.false_alert_by_horizon.p << ", MC SE " << se);
    CHECK(point.false_alert_by_horizon.p <= point.alpha + 3 * se);
    // Not vacuous: the bound is nearly attained (continuous-time Ville is tight; overshoot is small).
    CHECK(point.false_alert_by_horizon.p >= 0.25 * point.alpha);
  }
}

TEST_CASE("the study's anytime detection time reproduces the design rule of design_mixture") {
  for (const double alpha : {0.001, 0.05}) {
    for (const double shift : {0.3, 1.0}) {
      const auto d = detect::design_mixture(alpha, shift).value();
      INFO("alpha " << alpha << ", shift " << shift);
      CHECK(anytime_detection_pairs(alpha, d.rho, shift) == Approx(d.detection_pairs).epsilon(1e-6));
    }
  }
  CHECK(anytime_detection_pairs(0.001, 0.3, 2.0) < anytime_detection_pairs(0.001, 0.3, 1.0));
}
