#include "rigcal/sim/reference_profile.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

namespace rigcal::sim {

ReferenceProfileGenerator::ReferenceProfileGenerator(const ReferenceProfile& profile, RandomStream rng)
    : profile_(profile), rng_(rng) {}

void ReferenceProfileGenerator::refill_cycle() {
  const auto& sp = profile_.set_points;
  std::vector<std::size_t> sorted(sp.size());
  std::iota(sorted.begin(), sorted.end(), std::size_t{0});
  // Stable, so that equal set points keep their listed order and the result does not depend on the
  // standard library's sort.
  std::stable_sort(sorted.begin(), sorted.end(), [&](std::size_t a, std::size_t b) { return sp[a] < sp[b]; });
  cycle_.clear();
  switch (profile_.order) {
    case SetPointOrder::listed:
      cycle_.resize(sp.size());
      std::iota(cycle_.begin(), cycle_.end(), std::size_t{0});
      break;
    case SetPointOrder::up:
      cycle_ = sorted;
      break;
    case SetPointOrder::down:
      cycle_.assign(sorted.rbegin(), sorted.rend());
      break;
    case SetPointOrder::up_down:
      cycle_ = sorted;
      // Back down without the two end points, which the next cycle's start and this peak already visit.
      for (std::size_t i = sorted.size() >= 2 ? sorted.size() - 2 : 0; i >= 1 && sorted.size() > 2; --i)
        cycle_.push_back(sorted[i]);
      break;
    case SetPointOrder::random:
      cycle_ = sorted;
      // Fisher-Yates with our own uniform draws: std::shuffle's use of the engine is unspecified.
      for (std::size_t i = cycle_.size(); i > 1; --i) std::swap(cycle_[i - 1], cycle_[rng_.below(i)]);
      break;
  }
  position_ = 0;
}

double ReferenceProfileGenerator::next_visit() {
  if (position_ >= cycle_.size()) refill_cycle();
  const double nominal = profile_.set_points[cycle_[position_++]];
  // The draw is taken even when jitter is 0, so that switching jitter on changes nothing else.
  const double u = rng_.uniform(-1.0, 1.0);
  return nominal + profile_.jitter * u;
}

void ReferenceProfileGenerator::next_segment() {
  const double target = next_visit();
  if (!started_) {
    // The rig starts settled at its first set point.
    started_ = true;
    from_ = target;
    start_s_ = ramp_end_s_ = 0;
  } else {
    from_ = to_;
    start_s_ = end_s_;
    const double ramp_s = profile_.ramp_per_s > 0 ? std::abs(target - from_) / profile_.ramp_per_s : 0.0;
    ramp_end_s_ = start_s_ + ramp_s;
  }
  to_ = target;
  end_s_ = ramp_end_s_ + profile_.dwell_s;
}

double ReferenceProfileGenerator::value_at(double t_s) {
  if (!started_) next_segment();
  while (t_s >= end_s_) next_segment();
  if (t_s >= ramp_end_s_) return to_;
  return from_ + (to_ - from_) * (t_s - start_s_) / (ramp_end_s_ - start_s_);
}

}  // namespace rigcal::sim
