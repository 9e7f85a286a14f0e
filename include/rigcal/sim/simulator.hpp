#pragma once
// The rig simulator: a Scenario, a seed and a start time in, an endless sequence of records out, in
// time order, on a simulated clock. No I/O and no wall clock: the same inputs give the same records
// on any machine (see random.hpp for what "the same" rests on). The caller decides when to stop
// (a duration, a number of records) and how to write the records (rigcal simulate formats them as
// protocol lines).
//
// Each channel draws from its own streams (profile, pairs, readings), derived from the seed and the
// channel's position, and every record consumes the same draws whether or not it is dropped, spiked
// or stuck; so a dropout or a fault changes only what it is meant to change.
#include <cstddef>
#include <cstdint>
#include <vector>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/result.hpp"
#include "rigcal/sim/reference_profile.hpp"
#include "rigcal/sim/scenario.hpp"
#include "rigcal/sim/sensor_model.hpp"

namespace rigcal::sim {

struct SimRecord {
  enum class Kind { pair, reading };
  Kind kind = Kind::pair;
  std::size_t channel = 0;   // index into Scenario::channels
  protocol::TimeNs time = 0;
  double reference = 0;      // pair only: as emitted (the raw signal when the reference has one)
  double sensor = 0;         // as emitted (the raw signal when the sensor has one)

  // What lies behind the emitted values, for tests and diagnostics:
  double true_value = 0;       // the process value from the profile
  double reference_value = 0;  // pair only: the reference's reading in channel units, rounded
  double sensor_value = 0;     // the sensor's indication in channel units, rounded
  bool spike = false;
  bool stuck = false;
};

// Decimal places that show every multiple of `step` exactly (0.01 -> 2, 0.005 -> 3, 2 -> 0); -1 when
// step is 0 (values are not rounded: print them in shortest round-trip form).
int decimals_for_step(double step);

// Decimal places of a channel's emitted reference and sensor values, from the resolution that applies
// to what is emitted (the raw resolution when there is a raw output).
struct ValueDecimals {
  int reference = -1;
  int sensor = -1;
};
ValueDecimals emitted_decimals(const ChannelModel& c);

class Simulator {
 public:
  // REQUIRES: check_scenario(scenario) is empty. The scenario is copied.
  Simulator(const Scenario& scenario, std::uint64_t seed, protocol::TimeNs start_ns);

  // The next record: the earliest scheduled one (ties: channel order, then pair before reading),
  // skipping dropouts. Error when a value has no raw signal (a spike or fault drove a Pt100 beyond
  // -200..850 degC, say); the message names the channel and the time.
  Result<SimRecord> next();

  const Scenario& scenario() const { return scenario_; }
  protocol::TimeNs start_ns() const { return start_ns_; }
  std::uint64_t dropped() const { return dropped_; }

  // Pair and reading slots scheduled in [start, start + duration_s): the records of that duration
  // before dropouts (an upper bound for progress estimates).
  static std::uint64_t scheduled_slots(const Scenario& scenario, double duration_s);

 private:
  struct ChannelState {
    ReferenceProfileGenerator profile;
    SensorModel sensor;
    RandomStream pair_rng, reading_rng;
    std::int64_t pair_interval_ns = 0, reading_interval_ns = 0;  // 0: none of that kind
    std::uint64_t next_pair = 0, next_reading = 0;               // slot indices
  };

  protocol::TimeNs slot_time(std::int64_t interval_ns, std::uint64_t k) const;
  Result<SimRecord> make_pair(std::size_t c, protocol::TimeNs t, bool& dropped);
  Result<SimRecord> make_reading(std::size_t c, protocol::TimeNs t, bool& dropped);

  Scenario scenario_;
  protocol::TimeNs start_ns_;
  std::vector<ChannelState> channels_;
  std::uint64_t dropped_ = 0;
};

}  // namespace rigcal::sim
