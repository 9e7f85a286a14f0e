// Averaging blocks for the historian: counts, UTC-aligned buckets, late readings.
#include <catch2/catch.hpp>

#include "rigcal/engine/averager.hpp"

using namespace rigcal::engine;

namespace {
constexpr std::int64_t s = 1'000'000'000;
}

TEST_CASE("count blocks close on their m-th reading with Welford mean and SD") {
  Averager a(4, 0);
  CHECK_FALSE(a.add(1 * s, 10.0, 1.0));
  CHECK_FALSE(a.add(2 * s, 12.0, 1.2));
  CHECK_FALSE(a.add(3 * s, 11.0, 1.1));
  const auto b = a.add(4 * s, 13.0, 1.3);
  REQUIRE(b);
  CHECK(b->m == 4);
  CHECK(b->mean == Approx(11.5));
  CHECK(b->block_sd() == Approx(1.2909944487));  // sample SD of 10, 12, 11, 13
  CHECK(b->mean_raw == Approx(1.15));
  CHECK(b->start == 1 * s);
  CHECK(b->end == 4 * s);
  CHECK_FALSE(a.open());
}

TEST_CASE("time buckets are aligned to UTC multiples and close on a later reading or when closed as quiet") {
  Averager a(0, 60 * s);
  CHECK_FALSE(a.add(125 * s, 1.0, 1.0));  // bucket [120, 180)
  CHECK_FALSE(a.add(179 * s, 3.0, 3.0));
  CHECK_FALSE(a.add(100 * s, 2.0, 2.0));  // late: joins the open block
  const auto b = a.add(181 * s, 9.0, 9.0);
  REQUIRE(b);
  CHECK(b->start == 120 * s);
  CHECK(b->end == 180 * s);
  CHECK(b->m == 3);
  CHECK(b->mean == Approx(2.0));
  const auto c = a.close_open();
  REQUIRE(c);
  CHECK(c->m == 1);
  CHECK(c->start == 180 * s);
  CHECK_FALSE(a.close_open());
}
