#pragma once
// One channel's sensor under simulation: its as-found line, its noise, spikes and rounding, and the
// faults that change it over time. Raw-signal conversion and dropouts are the simulator's business;
// this is the indication in engineering units.
#include <optional>
#include <vector>

#include "rigcal/sim/random.hpp"
#include "rigcal/sim/scenario.hpp"

namespace rigcal::sim {

// v rounded to the nearest multiple of step (step <= 0: v itself); never -0.
double quantise(double v, double step);

struct SensorSample {
  double value = 0;    // the indication, rounded to the sensor's resolution
  bool spike = false;  // a spike was added
  bool stuck = false;  // a stuck fault held the value
};

class SensorModel {
 public:
  SensorModel(const SensorReading& sensor, std::vector<Fault> faults);

  // Slope and offset in force at t_s seconds, every fault but stuck applied.
  double slope_at(double t_s) const;
  double offset_at(double t_s) const;

  // The sensor's indication of true_value at t_s. REQUIRES: t_s not less than on the last call.
  // Draws the same random numbers whatever the parameters (one normal, then two uniforms), so that
  // turning spikes on or changing a fault does not shift the rest of the stream.
  SensorSample read(double t_s, double true_value, RandomStream& rng);

 private:
  bool stuck_active(const Fault& f, double t_s) const;

  SensorReading sensor_;
  std::vector<Fault> faults_;
  std::vector<std::optional<double>> latched_;  // per fault: the value a stuck fault holds
};

}  // namespace rigcal::sim
