// Scenario files: read strictly, every problem at its place; and the bundled demo scenario agrees
// with the bundled rigcald configuration, so that the demo's records suit the demo's daemon.
#include <catch2/catch.hpp>
#include <algorithm>
#include <fstream>
#include <sstream>

#include "rigcal/config/loader.hpp"
#include "rigcal/sim/scenario_loader.hpp"

using namespace rigcal;

namespace {

std::string read_source_file(const std::string& relative) {
  std::ifstream in(std::string(RIGCAL_SOURCE_DIR) + "/" + relative);
  REQUIRE(in);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

std::vector<std::string> errors_of(const std::string& yaml) {
  std::vector<std::string> out;
  for (const auto& e : sim::load_scenario(yaml, "s.yaml").errors) out.push_back(e.to_string());
  return out;
}

const char* minimal = R"(name: t
channels:
  - id: A
    pairs: {interval_s: 1}
    profile: {set_points: [1, 2]}
)";

}  // namespace

TEST_CASE("a minimal scenario loads with the documented defaults") {
  const auto r = sim::load_scenario(minimal, "s.yaml");
  REQUIRE(r.errors.empty());
  const sim::ChannelModel& c = r.scenario.channels.at(0);
  CHECK(r.scenario.seed == 1);
  CHECK_FALSE(r.scenario.start_ns);
  CHECK_FALSE(r.scenario.duration_s);
  CHECK(c.profile.dwell_s == 600);
  CHECK(c.profile.order == sim::SetPointOrder::up);
  CHECK(c.sensor.slope == 1);
  CHECK_FALSE(c.readings);
  CHECK_FALSE(c.sensor.raw);
}

TEST_CASE("every part of the format is read") {
  const auto r = sim::load_scenario(R"(name: full
start: 2026-12-01T06:00:00.5Z
duration_s: 3600
seed: 18446744073709551615
channels:
  - id: TT-9
    units: degC
    pairs: {interval_s: 0.5}
    readings: {interval_s: 2}
    profile: {spread: {low: 0, high: 100, count: 5}, order: random, dwell_s: 30, ramp_per_s: 1, jitter: 0.1}
    reference: {noise_sd: 0.01, resolution: 0.001, raw: {kind: thermocouple, type: J, cold_junction_c: 20}}
    sensor:
      slope: 1.001
      offset: -0.2
      noise_sd: 0.02
      resolution: 0.01
      spikes: {probability: 0.01, size: 5}
      dropout_probability: 0.02
      raw: {kind: rtd, r0_ohm: 1000, resolution: 0.01}
    faults:
      - {kind: gain_step, after_s: 10, change: 0.02}
      - {kind: offset_step, after_s: 20, change: 0.5}
      - {kind: ageing, after_s: 30, offset_per_day: 0.1, gain_per_day: -0.001}
      - {kind: stuck, after_s: 40, duration_s: 5}
  - id: PT-9
    readings: {interval_s: 1}
    profile: {set_points: [0, 16], order: listed}
    sensor: {raw: {kind: current_loop, value_at_4ma: 0, value_at_20ma: 16}}
)", "s.yaml");
  REQUIRE(r.errors.empty());
  const auto& s = r.scenario;
  CHECK(*s.start_ns == 1796104800'500000000LL);
  CHECK(*s.duration_s == 3600);
  CHECK(s.seed == 18446744073709551615ull);
  const auto& c = s.channels.at(0);
  CHECK(c.profile.set_points == std::vector<double>{0, 25, 50, 75, 100});
  CHECK(c.profile.order == sim::SetPointOrder::random);
  CHECK(c.reference.raw->linearisation.kind == metrology::Linearisation::Kind::thermocouple);
  CHECK(c.reference.raw->linearisation.thermocouple_type == metrology::ThermocoupleType::J);
  CHECK(c.reference.raw->linearisation.cold_junction_c == 20);
  CHECK(c.sensor.raw->linearisation.r0_ohm == 1000);
  CHECK(c.sensor.raw->raw_resolution == 0.01);
  CHECK(c.sensor.spikes.size == 5);
  REQUIRE(c.faults.size() == 4);
  CHECK(c.faults[1].kind == sim::Fault::Kind::offset_step);
  CHECK(c.faults[2].gain_per_day == -0.001);
  CHECK(*c.faults[3].duration_s == 5);
  CHECK(s.channels.at(1).sensor.raw->linearisation.loop_range.value_at_20ma == 16);
}

TEST_CASE("unknown keys are refused with their place and a suggestion") {
  const auto e = errors_of(R"(name: t
channels:
  - id: A
    pairs: {interval_s: 1}
    profile: {set_points: [1, 2]}
    sensor: {noise_sdd: 0.1}
)");
  REQUIRE(e.size() == 1);
  CHECK(e[0] == "s.yaml:6:14: channels[0].sensor.noise_sdd: unknown key 'noise_sdd' (did you mean 'noise_sd'?)");
}

TEST_CASE("a key of another fault kind is refused") {
  const auto e = errors_of(std::string(minimal) + "    faults: [{kind: stuck, after_s: 5, change: 0.1}]\n");
  REQUIRE(e.size() == 1);
  CHECK(e[0] == "s.yaml:6:40: channels[0].faults[0].change: unknown key 'change'");
}

TEST_CASE("bad values are reported at their place, each of them") {
  const auto e = errors_of(R"(name: t
start: 2026-12-01T06:00:00+01:00
channels:
  - id: A
    pairs: {interval_s: 0.0001}
    profile: {set_points: [1, x], order: sideways}
    sensor: {dropout_probability: 2}
)");
  REQUIRE(e.size() == 4);
  CHECK_THAT(e[0], Catch::StartsWith("s.yaml:2:8: start: expected a UTC time"));
  CHECK(e[1] == "s.yaml:6:31: channels[0].profile.set_points[1]: expected a number");
  CHECK(e[2] == "s.yaml:6:42: channels[0].profile.order: expected one of listed, up, down, up_down, random, got 'sideways'");
  CHECK(e[3] == "s.yaml:7:35: channels[0].sensor.dropout_probability: expected a number from 0 to 1, got '2'");
}

TEST_CASE("check_scenario's findings point into the file") {
  const auto e = errors_of(R"(name: t
channels:
  - id: A
    pairs: {interval_s: 0.0005}
    profile: {set_points: [1, 2]}
)");
  REQUIRE(e.size() == 1);
  CHECK(e[0] == "s.yaml:4:25: channels[0].pairs.interval_s: must be a whole number of milliseconds "
                "(timestamps carry milliseconds)");
  const auto raw = errors_of(R"(name: t
channels:
  - id: A
    pairs: {interval_s: 1}
    profile: {set_points: [0, 16]}
    sensor: {raw: {kind: current_loop, value_at_4ma: 0, value_at_20ma: 10}}
)");
  REQUIRE(raw.size() == 1);
  CHECK_THAT(raw[0], Catch::StartsWith("s.yaml:6:19: channels[0].sensor.raw: cannot carry the channel's values 0 .. 16"));
}

TEST_CASE("missing required parts are named") {
  const auto e = errors_of("name: t\nchannels:\n  - id: A\n    pairs: {interval_s: 1}\n");
  REQUIRE(e.size() == 1);
  CHECK(e[0] == "s.yaml:3:5: channels[0]: profile: is missing (the set points the reference visits)");
  CHECK(errors_of("name: t\n")[0] == "s.yaml: channels: needs at least one channel");
  CHECK(errors_of("- a\n")[0] == "s.yaml:1:1: expected a map of keys at the top level (see config/demo-scenario.yaml)");
}

TEST_CASE("the demo scenario matches the channels of the demo rigcald configuration") {
  const auto demo = sim::load_scenario(read_source_file("config/demo-scenario.yaml"), "config/demo-scenario.yaml");
  for (const auto& e : demo.errors) FAIL(e.to_string());
  const auto daemon = config::load_config(read_source_file("config/rigcald.yaml"), "config/rigcald.yaml");
  for (const auto& e : daemon.errors) FAIL(e.to_string());
  REQUIRE(demo.scenario.channels.size() == daemon.config.channels.size());
  for (const auto& ch : daemon.config.channels) {
    INFO(ch.id);
    const auto it = std::find_if(demo.scenario.channels.begin(), demo.scenario.channels.end(),
                                 [&](const sim::ChannelModel& m) { return m.id == ch.id; });
    REQUIRE(it != demo.scenario.channels.end());
    CHECK(it->units == ch.units);
    CHECK(it->sensor.noise_sd == ch.sensor.noise_sd.value());
    CHECK(it->sensor.resolution == ch.sensor.resolution);
    CHECK_FALSE(it->sensor.raw);  // rigcald.yaml's channels take engineering units
    CHECK(it->reference.noise_sd <= ch.reference.standard_uncertainty());
    CHECK(it->pairs);
    // The set points cover the channel's range (to within a tenth of its span) and stay inside it.
    const auto [lo, hi] = std::minmax_element(it->profile.set_points.begin(), it->profile.set_points.end());
    const double span = *ch.range_high - *ch.range_low;
    CHECK(*lo - it->profile.jitter >= *ch.range_low);
    CHECK(*hi + it->profile.jitter <= *ch.range_high);
    CHECK(*lo <= *ch.range_low + 0.1 * span);
    CHECK(*hi >= *ch.range_high - 0.1 * span);
  }
  // The drift rigcald should catch: about +1.5 % gain on TT-101, part-way through.
  const auto& tt = demo.scenario.channels.at(0);
  REQUIRE(tt.faults.size() == 1);
  CHECK(tt.faults[0].kind == sim::Fault::Kind::gain_step);
  CHECK(tt.faults[0].change == Approx(0.015));
  CHECK(tt.faults[0].after_s > 0);
  CHECK(tt.faults[0].after_s < *demo.scenario.duration_s);
}
