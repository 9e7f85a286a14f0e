// Reference profiles: set points visited in the order asked, held for their dwell, approached at the
// ramp rate, moved by at most the jitter.
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <set>
#include <vector>

#include "rigcal/sim/reference_profile.hpp"

using namespace rigcal::sim;

namespace {
// The set points visited, in order, sampling once per second for `seconds`.
std::vector<double> visits(const ReferenceProfile& p, double seconds, std::uint64_t seed = 1) {
  ReferenceProfileGenerator g(p, RandomStream(seed));
  std::vector<double> out;
  for (double t = 0; t < seconds; t += 1) {
    g.value_at(t);
    if (out.empty() || g.current_target() != out.back()) out.push_back(g.current_target());
  }
  return out;
}
}  // namespace

TEST_CASE("orders: listed, up, down, up_down") {
  ReferenceProfile p;
  p.set_points = {50, 10, 30};
  p.dwell_s = 10;
  p.order = SetPointOrder::listed;
  CHECK(visits(p, 60) == std::vector<double>{50, 10, 30, 50, 10, 30});
  p.order = SetPointOrder::up;
  CHECK(visits(p, 60) == std::vector<double>{10, 30, 50, 10, 30, 50});
  p.order = SetPointOrder::down;
  CHECK(visits(p, 60) == std::vector<double>{50, 30, 10, 50, 30, 10});
  p.order = SetPointOrder::up_down;
  CHECK(visits(p, 80) == std::vector<double>{10, 30, 50, 30, 10, 30, 50, 30});
}

TEST_CASE("random order visits every set point once per cycle, in changing orders") {
  ReferenceProfile p;
  p.set_points = {1, 2, 3, 4, 5, 6};
  p.dwell_s = 10;
  p.order = SetPointOrder::random;
  ReferenceProfileGenerator g(p, RandomStream(5));
  std::vector<std::vector<double>> cycles(50);
  for (int k = 0; k < 300; ++k) cycles[k / 6].push_back(g.value_at(10.0 * k + 5));  // mid-dwell of visit k
  std::set<std::vector<double>> distinct;
  for (auto c : cycles) {
    distinct.insert(c);
    std::sort(c.begin(), c.end());
    CHECK(c == p.set_points);
  }
  CHECK(distinct.size() > 40);  // 720 permutations: 50 cycles repeat few of them
}

TEST_CASE("dwell holds the set point and the ramp runs at ramp_per_s") {
  ReferenceProfile p;
  p.set_points = {20, 100};
  p.order = SetPointOrder::listed;
  p.dwell_s = 600;
  p.ramp_per_s = 0.5;  // 80 degC takes 160 s
  ReferenceProfileGenerator g(p, RandomStream(3));
  CHECK(g.value_at(0) == 20);
  CHECK(g.value_at(599.5) == 20);
  CHECK(g.value_at(600) == 20);
  CHECK(g.value_at(680) == Approx(60));
  CHECK(g.value_at(760) == 100);
  CHECK(g.dwell_start_s() == Approx(760));
  CHECK(g.value_at(1359) == 100);
  CHECK(g.value_at(1440) == Approx(60));  // back down at the same rate
}

TEST_CASE("a zero ramp steps at once; jitter moves each visit by at most its size") {
  ReferenceProfile p;
  p.set_points = {0, 100};
  p.order = SetPointOrder::listed;
  p.dwell_s = 10;
  p.jitter = 0.5;
  ReferenceProfileGenerator g(p, RandomStream(9));
  bool moved = false;
  for (double t = 0; t < 10000; t += 10) {
    const double v = g.value_at(t);
    const double nominal = std::abs(v) < 50 ? 0 : 100;
    CHECK(std::abs(v - nominal) <= 0.5);
    moved = moved || v != nominal;
  }
  CHECK(moved);
}
