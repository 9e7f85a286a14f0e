#pragma once
// The true process value of one channel over simulated time, following its ReferenceProfile: a ramp
// from the previous set point to the next, a dwell there, and on, cycle after cycle, forever.
#include <cstddef>
#include <vector>

#include "rigcal/sim/random.hpp"
#include "rigcal/sim/scenario.hpp"

namespace rigcal::sim {

class ReferenceProfileGenerator {
 public:
  // REQUIRES: profile as check_scenario accepts it. `rng` draws the jitter and random orders only.
  ReferenceProfileGenerator(const ReferenceProfile& profile, RandomStream rng);

  // True value at t_s seconds after the start. REQUIRES: t_s >= 0 and not less than on the last call
  // (the generator only moves forward, so memory stays constant however long the simulation runs).
  double value_at(double t_s);

  // The set point being approached or held at the last value_at() (jitter included), and the time
  // its dwell began (ramp finished). For tests and diagnostics.
  double current_target() const { return to_; }
  double dwell_start_s() const { return ramp_end_s_; }

 private:
  void next_segment();
  double next_visit();
  void refill_cycle();

  ReferenceProfile profile_;
  RandomStream rng_;
  std::vector<std::size_t> cycle_;  // indices into profile_.set_points, this cycle's order
  std::size_t position_ = 0;        // next entry of cycle_
  bool started_ = false;
  double start_s_ = 0, ramp_end_s_ = 0, end_s_ = 0;
  double from_ = 0, to_ = 0;
};

}  // namespace rigcal::sim
