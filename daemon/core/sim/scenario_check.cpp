// check_scenario: what the simulator needs of a scenario, so that it can run without checks of its
// own. The scenario loader reports these problems at their place in the file.
#include <algorithm>
#include <cmath>
#include <set>

#include "../metrology/number_text.hpp"
#include "rigcal/protocol/record.hpp"
#include "rigcal/sim/raw_signal.hpp"
#include "rigcal/sim/scenario.hpp"

namespace rigcal::sim {

namespace {

class Checker {
 public:
  explicit Checker(std::vector<ScenarioProblem>& out) : out_(out) {}

  void problem(std::string path, std::string message) { out_.push_back({std::move(path), std::move(message)}); }

  void non_negative(const std::string& path, double v) {
    if (!(std::isfinite(v) && v >= 0)) problem(path, "must be a finite number, 0 or more");
  }
  void positive(const std::string& path, double v) {
    if (!(std::isfinite(v) && v > 0)) problem(path, "must be a finite number greater than 0");
  }
  void probability(const std::string& path, double p) {
    if (!(p >= 0 && p <= 1)) problem(path, "must be a probability from 0 to 1");
  }
  void finite(const std::string& path, double v) {
    if (!std::isfinite(v)) problem(path, "must be a finite number");
  }

 private:
  std::vector<ScenarioProblem>& out_;
};

void check_schedule(Checker& k, const std::string& path, const Schedule& s) {
  k.positive(path + ".interval_s", s.interval_s);
  const double ms = s.interval_s * 1000.0;
  if (std::isfinite(ms) && ms > 0 && std::abs(ms - std::round(ms)) > 1e-6)
    k.problem(path + ".interval_s", "must be a whole number of milliseconds (timestamps carry milliseconds)");
}

// The lowest and highest values the profile can take (set points with their jitter).
std::pair<double, double> profile_span(const ReferenceProfile& p) {
  const auto [lo, hi] = std::minmax_element(p.set_points.begin(), p.set_points.end());
  return {*lo - p.jitter, *hi + p.jitter};
}

void check_raw(Checker& k, const std::string& path, const RawOutput& raw, double lo, double hi) {
  if (auto s = metrology::check_linearisation(raw.linearisation); !s) {
    k.problem(path, s.error().message);
    return;
  }
  k.non_negative(path + ".resolution", raw.raw_resolution);
  for (const double v : {lo, hi}) {
    if (auto r = raw_signal(raw.linearisation, v); !r)
      k.problem(path, "cannot carry the channel's values " + metrology::detail::number_text(lo) + " .. " +
                          metrology::detail::number_text(hi) + ": " +
                          r.error().message);
  }
}

void check_profile(Checker& k, const std::string& path, const ReferenceProfile& p) {
  if (p.set_points.empty()) k.problem(path + ".set_points", "needs at least one set point");
  for (std::size_t i = 0; i < p.set_points.size(); ++i)
    k.finite(path + ".set_points[" + std::to_string(i) + "]", p.set_points[i]);
  k.positive(path + ".dwell_s", p.dwell_s);
  k.non_negative(path + ".ramp_per_s", p.ramp_per_s);
  k.non_negative(path + ".jitter", p.jitter);
}

void check_fault(Checker& k, const std::string& path, const Fault& f) {
  k.non_negative(path + ".after_s", f.after_s);
  if (f.duration_s && f.kind != Fault::Kind::stuck) k.problem(path + ".duration_s", "applies to stuck faults only");
  if (f.duration_s) k.positive(path + ".duration_s", *f.duration_s);
  switch (f.kind) {
    case Fault::Kind::gain_step:
      if (!(std::isfinite(f.change) && f.change > -1 && f.change != 0))
        k.problem(path + ".change", "must be a fraction greater than -1 and not 0 (0.015 is +1.5 % gain)");
      break;
    case Fault::Kind::offset_step:
      if (!(std::isfinite(f.change) && f.change != 0)) k.problem(path + ".change", "must be a finite number, not 0");
      break;
    case Fault::Kind::ageing:
      k.finite(path + ".offset_per_day", f.offset_per_day);
      k.finite(path + ".gain_per_day", f.gain_per_day);
      if (f.offset_per_day == 0 && f.gain_per_day == 0)
        k.problem(path, "ageing needs offset_per_day or gain_per_day (or both)");
      break;
    case Fault::Kind::stuck:
      break;
  }
}

void check_channel(Checker& k, const std::string& p, const ChannelModel& c) {
  if (!protocol::is_valid_channel_name(c.id))
    k.problem(p + ".id", "channel ids are 1-64 characters from A-Z a-z 0-9 _ . : / -, got '" + c.id + "'");
  if (!c.pairs && !c.readings) k.problem(p, "needs pairs, readings or both (a schedule of records)");
  if (c.pairs) check_schedule(k, p + ".pairs", *c.pairs);
  if (c.readings) check_schedule(k, p + ".readings", *c.readings);
  check_profile(k, p + ".profile", c.profile);

  k.non_negative(p + ".reference.noise_sd", c.reference.noise_sd);
  k.non_negative(p + ".reference.resolution", c.reference.resolution);
  const SensorReading& s = c.sensor;
  k.finite(p + ".sensor.slope", s.slope);
  k.finite(p + ".sensor.offset", s.offset);
  k.non_negative(p + ".sensor.noise_sd", s.noise_sd);
  k.non_negative(p + ".sensor.resolution", s.resolution);
  k.probability(p + ".sensor.spikes.probability", s.spikes.probability);
  k.non_negative(p + ".sensor.spikes.size", s.spikes.size);
  k.probability(p + ".sensor.dropout_probability", s.dropout_probability);
  for (std::size_t i = 0; i < c.faults.size(); ++i) check_fault(k, p + ".faults[" + std::to_string(i) + "]", c.faults[i]);

  if (c.profile.set_points.empty()) return;
  const auto [lo, hi] = profile_span(c.profile);
  if (c.reference.raw) check_raw(k, p + ".reference.raw", *c.reference.raw, lo, hi);
  if (c.sensor.raw) {
    // As found; faults that move the sensor beyond its raw range show up as errors while simulating.
    const double a = s.offset + s.slope * lo, b = s.offset + s.slope * hi;
    check_raw(k, p + ".sensor.raw", *c.sensor.raw, std::min(a, b), std::max(a, b));
  }
}

}  // namespace

std::vector<ScenarioProblem> check_scenario(const Scenario& s) {
  std::vector<ScenarioProblem> out;
  Checker k(out);
  if (!protocol::is_valid_channel_name(s.name))
    k.problem("name", "scenario names are 1-64 characters from A-Z a-z 0-9 _ . : / -, got '" + s.name + "'");
  if (s.duration_s) k.positive("duration_s", *s.duration_s);
  if (s.channels.empty()) k.problem("channels", "needs at least one channel");
  std::set<std::string> ids;
  for (std::size_t i = 0; i < s.channels.size(); ++i) {
    const std::string p = "channels[" + std::to_string(i) + "]";
    check_channel(k, p, s.channels[i]);
    if (!ids.insert(s.channels[i].id).second)
      k.problem(p + ".id", "another channel already has the id '" + s.channels[i].id + "'");
  }
  return out;
}

}  // namespace rigcal::sim
