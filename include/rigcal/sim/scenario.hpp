#pragma once
// A simulated calibration rig as a value: channels, each a reference profile (what the process does),
// a reference standard and a sensor (how each reads it), the sensor's faults, and how often pairs and
// sensor-only readings are taken. The simulator (simulator.hpp) turns it into records.
//
// Units: every value without a unit in its name is in the channel's engineering units (e.g. degC),
// before any raw-signal conversion. Times are seconds of simulated time after the simulation's start.
// Scenario files (scenario_loader.hpp) map one to one onto these structs; config/demo-scenario.yaml
// documents the file format.
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "rigcal/metrology/linearisation.hpp"

namespace rigcal::sim {

// The order in which one cycle visits the set points.
enum class SetPointOrder {
  listed,   // as the set points are listed
  up,       // lowest to highest, then again from the lowest
  down,     // highest to lowest
  up_down,  // up and back down without repeating the end points: 1 2 3 2 | 1 2 3 2 | ...
  random,   // a fresh random permutation every cycle
};

// What the process (and so the true value) does: it moves between set points, ramping at
// ramp_per_s (0: an instantaneous step), and holds each for dwell_s. The rig starts at the first
// set point of the first cycle. Each visit's set point is offset by a uniform draw in
// [-jitter, +jitter], so that repeated cycles do not sit on exactly the same values.
struct ReferenceProfile {
  std::vector<double> set_points;  // at least one; explicit, or spread evenly by the loader
  SetPointOrder order = SetPointOrder::up;
  double dwell_s = 600;    // > 0
  double ramp_per_s = 0;   // >= 0, channel units per second
  double jitter = 0;       // >= 0
};

// A raw signal in place of the engineering value: the value is converted through the inverse of the
// linearisation (engineering -> raw), then rounded to raw_resolution (0: not rounded). A current loop
// saturates at the NAMUR NE 43 measuring limits 3.8 / 20.5 mA, as a real transmitter does; the
// other kinds have no such behaviour, and a value outside their range is an error of the simulation.
struct RawOutput {
  metrology::Linearisation linearisation;
  double raw_resolution = 0;
};

// The reference standard's reading of the true value.
struct ReferenceReading {
  double noise_sd = 0;     // normal scatter of one reading
  double resolution = 0;   // readings are multiples of this (0: not rounded)
  std::optional<RawOutput> raw;
};

struct Spikes {
  double probability = 0;  // per reading, 0..1
  double size = 0;         // added with a random sign, channel units
};

// The sensor as found when the simulation starts: reading = offset + slope * true value + noise, then
// a spike now and then, then rounding to resolution, then the raw conversion if any. A dropout loses
// the whole record (pair or reading), as a missed poll or a lost frame would.
struct SensorReading {
  double slope = 1;
  double offset = 0;
  double noise_sd = 0;
  double resolution = 0;
  Spikes spikes;
  double dropout_probability = 0;  // per record, 0..1
  std::optional<RawOutput> raw;
};

// A change of the sensor that begins after_s seconds into the simulation and lasts to its end
// (stuck: for duration_s, when given).
struct Fault {
  enum class Kind {
    gain_step,    // slope becomes slope * (1 + change)
    offset_step,  // offset becomes offset + change
    ageing,       // from after_s on, offset += offset_per_day * days and slope *= 1 + gain_per_day * days
    stuck,        // the reading freezes at the first value produced at or after after_s
  };
  Kind kind = Kind::gain_step;
  double after_s = 0;
  double change = 0;               // gain_step: fraction; offset_step: channel units
  double offset_per_day = 0;       // ageing
  double gain_per_day = 0;         // ageing, fraction per day
  std::optional<double> duration_s;  // stuck only; absent: until the end
};

// How often a record of one kind is taken: at start + k * interval_s, k = 0, 1, 2, ...
struct Schedule {
  double interval_s = 1;  // > 0, a whole number of milliseconds
};

struct ChannelModel {
  std::string id;     // the protocol's channel name
  std::string units;  // for people (and the check against rigcald's configuration)
  std::optional<Schedule> pairs;     // P records
  std::optional<Schedule> readings;  // R records (sensor only)
  ReferenceProfile profile;
  ReferenceReading reference;
  SensorReading sensor;
  std::vector<Fault> faults;
};

struct Scenario {
  std::string name;  // 1-64 characters of the channel-name alphabet (it goes into stream names)
  std::optional<std::int64_t> start_ns;     // default simulated start, ns since the epoch (UTC)
  std::optional<double> duration_s;         // default simulated length
  std::uint64_t seed = 1;                   // default seed
  std::vector<ChannelModel> channels;
};

// One problem with a scenario, at a path such as channels[1].sensor.noise_sd.
struct ScenarioProblem {
  std::string path;
  std::string message;
};

// Checks what the simulator relies on: at least one channel; ids valid and unique; every channel with
// pairs or readings; intervals positive and whole milliseconds; profile set points present, dwell
// positive, ramp and jitter non-negative; probabilities in 0..1; noise, sizes and resolutions
// non-negative; raw outputs usable and able to carry the profile's range; stuck's duration only on
// stuck. Empty when the scenario may be simulated.
std::vector<ScenarioProblem> check_scenario(const Scenario& s);

}  // namespace rigcal::sim
