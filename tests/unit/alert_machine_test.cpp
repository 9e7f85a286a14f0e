// Alerts are raised and cleared with on- and off-delays (ISA-18.2 practice), never flapping.
#include <catch2/catch.hpp>

#include "rigcal/engine/alert_machine.hpp"

using namespace rigcal::engine;

namespace {
constexpr std::int64_t s = 1'000'000'000;
}

TEST_CASE("an alert is raised after K consecutive findings and cleared after C absent ones") {
  AlertMachine m(AlertTiming{3, 0, 5, 0});
  std::int64_t t = 0;
  CHECK(m.update(true, t += s) == AlertTransition::none);
  CHECK(m.update(true, t += s) == AlertTransition::none);
  CHECK(m.update(false, t += s) == AlertTransition::none);  // run broken
  CHECK(m.update(true, t += s) == AlertTransition::none);
  CHECK(m.update(true, t += s) == AlertTransition::none);
  CHECK(m.update(true, t += s) == AlertTransition::raised);
  CHECK(m.raised());
  for (int i = 0; i < 4; ++i) CHECK(m.update(false, t += s) == AlertTransition::none);
  CHECK(m.update(true, t += s) == AlertTransition::none);  // absent run broken: stays raised
  for (int i = 0; i < 4; ++i) CHECK(m.update(false, t += s) == AlertTransition::none);
  CHECK(m.update(false, t += s) == AlertTransition::cleared);
  CHECK_FALSE(m.raised());
}

TEST_CASE("a finding that alternates every evaluation never raises a persistence-2 alert") {
  AlertMachine m(AlertTiming{2, 0, 2, 0});
  for (int i = 0; i < 1000; ++i) CHECK(m.update(i % 2 == 0, i * s) == AlertTransition::none);
}

TEST_CASE("minimum durations apply on record time as well as counts") {
  AlertMachine m(AlertTiming{1, 10 * s, 1, 20 * s});
  CHECK(m.update(true, 0) == AlertTransition::none);
  CHECK(m.update(true, 9 * s) == AlertTransition::none);
  CHECK(m.update(true, 10 * s) == AlertTransition::raised);
  CHECK(m.update(false, 11 * s) == AlertTransition::none);
  CHECK(m.update(false, 30 * s) == AlertTransition::none);
  CHECK(m.update(false, 31 * s) == AlertTransition::cleared);
}

TEST_CASE("state restored from a checkpoint continues identically") {
  AlertMachine a(AlertTiming{3, 0, 3, 0}), b(AlertTiming{3, 0, 3, 0});
  a.update(true, 1);
  a.update(true, 2);
  b.restore(a.state());
  CHECK(a.update(true, 3) == AlertTransition::raised);
  CHECK(b.update(true, 3) == AlertTransition::raised);
}
