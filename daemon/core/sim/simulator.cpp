#include "rigcal/sim/simulator.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "rigcal/metrology/current_loop.hpp"
#include "rigcal/sim/raw_signal.hpp"

namespace rigcal::sim {

namespace {

// Purposes of the per-channel random streams (derive_seed). Fixed numbers: changing one changes
// every simulation's output.
enum : std::uint64_t { stream_profile = 1, stream_pairs = 2, stream_readings = 3 };

constexpr double ns_per_s = 1e9;

std::int64_t interval_ns(const std::optional<Schedule>& s) {
  // check_scenario holds intervals to whole milliseconds, so this is exact.
  return s ? std::llround(s->interval_s * 1000.0) * 1'000'000 : 0;
}

// A loop current saturates at the NE 43 measuring limits, as a transmitter's output stage does; the
// other kinds have no physical limit to model, so a value beyond their range is an error.
double saturate_loop(const RawOutput& raw, double value) {
  if (raw.linearisation.kind != metrology::Linearisation::Kind::current_loop) return value;
  const auto& r = raw.linearisation.loop_range;
  const double lo = std::lerp(r.value_at_4ma, r.value_at_20ma, (metrology::ne43::measuring_low_ma - 4.0) / 16.0);
  const double hi = std::lerp(r.value_at_4ma, r.value_at_20ma, (metrology::ne43::measuring_high_ma - 4.0) / 16.0);
  return std::clamp(value, std::min(lo, hi), std::max(lo, hi));
}

Result<double> emit(const std::optional<RawOutput>& raw, double value, const char* side, const ChannelModel& c,
                    protocol::TimeNs t) {
  if (!raw) return value;
  auto r = raw_signal(raw->linearisation, saturate_loop(*raw, value));
  if (!r)
    return Error{"channel " + c.id + " at " + protocol::format_rfc3339(t) + ": the " + side +
                 " value has no raw signal: " + r.error().message};
  return quantise(*r, raw->raw_resolution);
}

}  // namespace

int decimals_for_step(double step) {
  if (!(step > 0)) return -1;
  double scaled = step;
  for (int d = 0; d <= 12; ++d, scaled *= 10) {
    if (std::abs(scaled - std::round(scaled)) <= 1e-9 * std::max(1.0, scaled)) return d;
  }
  return 12;
}

ValueDecimals emitted_decimals(const ChannelModel& c) {
  ValueDecimals d;
  d.reference = decimals_for_step(c.reference.raw ? c.reference.raw->raw_resolution : c.reference.resolution);
  d.sensor = decimals_for_step(c.sensor.raw ? c.sensor.raw->raw_resolution : c.sensor.resolution);
  return d;
}

Simulator::Simulator(const Scenario& scenario, std::uint64_t seed, protocol::TimeNs start_ns)
    : scenario_(scenario), start_ns_(start_ns) {
  channels_.reserve(scenario_.channels.size());
  for (std::size_t i = 0; i < scenario_.channels.size(); ++i) {
    const ChannelModel& c = scenario_.channels[i];
    channels_.push_back(ChannelState{
        ReferenceProfileGenerator(c.profile, RandomStream(derive_seed(seed, i, stream_profile))),
        SensorModel(c.sensor, c.faults),
        RandomStream(derive_seed(seed, i, stream_pairs)),
        RandomStream(derive_seed(seed, i, stream_readings)),
        interval_ns(c.pairs),
        interval_ns(c.readings),
    });
  }
}

protocol::TimeNs Simulator::slot_time(std::int64_t interval, std::uint64_t k) const {
  return start_ns_ + interval * static_cast<std::int64_t>(k);
}

Result<SimRecord> Simulator::make_pair(std::size_t c, protocol::TimeNs t, bool& dropped) {
  ChannelState& ch = channels_[c];
  const ChannelModel& model = scenario_.channels[c];
  const double t_s = static_cast<double>(t - start_ns_) / ns_per_s;
  SimRecord r;
  r.kind = SimRecord::Kind::pair;
  r.channel = c;
  r.time = t;
  r.true_value = ch.profile.value_at(t_s);
  r.reference_value =
      quantise(ch.pair_rng.normal(r.true_value, model.reference.noise_sd), model.reference.resolution);
  const SensorSample s = ch.sensor.read(t_s, r.true_value, ch.pair_rng);
  dropped = ch.pair_rng.chance(model.sensor.dropout_probability);
  r.sensor_value = s.value;
  r.spike = s.spike;
  r.stuck = s.stuck;
  if (dropped) return r;
  auto ref = emit(model.reference.raw, r.reference_value, "reference", model, t);
  if (!ref) return ref.error();
  auto sen = emit(model.sensor.raw, r.sensor_value, "sensor", model, t);
  if (!sen) return sen.error();
  r.reference = *ref;
  r.sensor = *sen;
  return r;
}

Result<SimRecord> Simulator::make_reading(std::size_t c, protocol::TimeNs t, bool& dropped) {
  ChannelState& ch = channels_[c];
  const ChannelModel& model = scenario_.channels[c];
  const double t_s = static_cast<double>(t - start_ns_) / ns_per_s;
  SimRecord r;
  r.kind = SimRecord::Kind::reading;
  r.channel = c;
  r.time = t;
  r.true_value = ch.profile.value_at(t_s);
  const SensorSample s = ch.sensor.read(t_s, r.true_value, ch.reading_rng);
  dropped = ch.reading_rng.chance(model.sensor.dropout_probability);
  r.sensor_value = s.value;
  r.spike = s.spike;
  r.stuck = s.stuck;
  if (dropped) return r;
  auto sen = emit(model.sensor.raw, r.sensor_value, "sensor", model, t);
  if (!sen) return sen.error();
  r.sensor = *sen;
  return r;
}

Result<SimRecord> Simulator::next() {
  for (;;) {
    // The earliest slot over every channel and kind; strict '<' keeps ties in channel order, pairs first.
    std::size_t best_channel = 0;
    bool best_is_pair = true, found = false;
    protocol::TimeNs best = std::numeric_limits<protocol::TimeNs>::max();
    for (std::size_t c = 0; c < channels_.size(); ++c) {
      const ChannelState& ch = channels_[c];
      if (ch.pair_interval_ns > 0 && slot_time(ch.pair_interval_ns, ch.next_pair) < best) {
        best = slot_time(ch.pair_interval_ns, ch.next_pair);
        best_channel = c, best_is_pair = true, found = true;
      }
      if (ch.reading_interval_ns > 0 && slot_time(ch.reading_interval_ns, ch.next_reading) < best) {
        best = slot_time(ch.reading_interval_ns, ch.next_reading);
        best_channel = c, best_is_pair = false, found = true;
      }
    }
    if (!found) return Error{"the scenario schedules no records"};
    ChannelState& ch = channels_[best_channel];
    bool dropped = false;
    auto r = best_is_pair ? make_pair(best_channel, best, dropped) : make_reading(best_channel, best, dropped);
    ++(best_is_pair ? ch.next_pair : ch.next_reading);
    if (!r) return r;
    if (!dropped) return r;
    ++dropped_;
  }
}

std::uint64_t Simulator::scheduled_slots(const Scenario& scenario, double duration_s) {
  const auto duration_ns = static_cast<std::int64_t>(std::ceil(duration_s * ns_per_s));
  std::uint64_t n = 0;
  for (const ChannelModel& c : scenario.channels) {
    for (const std::int64_t interval : {interval_ns(c.pairs), interval_ns(c.readings)}) {
      // Slots k * interval < duration: k = 0 .. ceil(duration / interval) - 1.
      if (interval > 0 && duration_ns > 0) n += static_cast<std::uint64_t>((duration_ns + interval - 1) / interval);
    }
  }
  return n;
}

}  // namespace rigcal::sim
