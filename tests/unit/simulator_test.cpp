// The rig simulator: reproducible from a seed, and each ingredient of the model (faults, rounding,
// dropouts, spikes, raw signals, schedules) visible in the records as specified.
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <optional>
#include <vector>

#include "rigcal/metrology/linearisation.hpp"
#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/sim/simulator.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal;
using namespace rigcal::sim;

namespace {

const protocol::TimeNs start = *protocol::parse_timestamp("2026-12-01T00:00:00Z").time;
constexpr protocol::TimeNs ns = 1'000'000'000;

// One channel stepping over 0..100 every 60 s, a pair a second, an ideal reference.
Scenario rig() {
  Scenario s;
  s.name = "unit-rig";
  ChannelModel c;
  c.id = "TT-1";
  c.units = "degC";
  c.pairs = Schedule{1.0};
  c.profile.set_points = {0, 25, 50, 75, 100};
  c.profile.order = SetPointOrder::up_down;
  c.profile.dwell_s = 60;
  c.sensor.noise_sd = 0.01;
  s.channels.push_back(c);
  return s;
}

std::vector<SimRecord> run(const Scenario& s, std::uint64_t seed, std::size_t n) {
  REQUIRE(check_scenario(s).empty());
  Simulator sim(s, seed, start);
  std::vector<SimRecord> out;
  for (std::size_t i = 0; i < n; ++i) {
    auto r = sim.next();
    REQUIRE(r.ok());
    out.push_back(*r);
  }
  return out;
}

Fault step_fault(Fault::Kind kind, double after_s, double change) {
  Fault f;
  f.kind = kind;
  f.after_s = after_s;
  f.change = change;
  return f;
}

double seconds(const SimRecord& r) { return static_cast<double>(r.time - start) / ns; }

// Straight-line fit of sensor on reference over the pairs with from_s <= t < to_s.
stats::LineFit fit_pairs(const std::vector<SimRecord>& rs, double from_s, double to_s) {
  stats::StreamingLineFit fit(stats::MemoryPolicy::cumulative());
  for (const auto& r : rs)
    if (r.kind == SimRecord::Kind::pair && seconds(r) >= from_s && seconds(r) < to_s) fit.add(r.reference, r.sensor);
  auto f = fit.summary(stats::Model::line);
  REQUIRE(f.ok());
  return *f;
}

bool same(const SimRecord& a, const SimRecord& b) {
  return a.kind == b.kind && a.channel == b.channel && a.time == b.time && a.reference == b.reference &&
         a.sensor == b.sensor;
}

bool on_grid(double v, double step) { return std::abs(v / step - std::round(v / step)) < 1e-6; }

}  // namespace

TEST_CASE("a seed gives the same records every time; another seed gives others") {
  Scenario s = rig();
  s.channels[0].sensor.spikes = {0.01, 2.0};
  s.channels[0].sensor.dropout_probability = 0.05;
  s.channels[0].profile.order = SetPointOrder::random;
  s.channels[0].profile.jitter = 1;
  const auto a = run(s, 99, 5000), b = run(s, 99, 5000), c = run(s, 100, 5000);
  std::size_t differences = 0;
  for (std::size_t i = 0; i < a.size(); ++i) {
    REQUIRE(same(a[i], b[i]));
    differences += !same(a[i], c[i]);
  }
  CHECK(differences > 4000);
}

TEST_CASE("records come in time order; ties go by channel, pairs before readings") {
  Scenario s = rig();
  s.channels[0].readings = Schedule{0.5};
  ChannelModel second = s.channels[0];
  second.id = "PT-2";
  second.pairs = Schedule{2.0};
  s.channels.push_back(second);
  const auto rs = run(s, 1, 12);
  const char* expected[] = {"0P", "0R", "1P", "1R", "0R", "1R", "0P", "0R", "1R", "0R", "1R", "0P"};
  for (std::size_t i = 0; i < rs.size(); ++i) {
    const std::string got = std::to_string(rs[i].channel) + (rs[i].kind == SimRecord::Kind::pair ? "P" : "R");
    CHECK(got == expected[i]);
    if (i > 0) CHECK(rs[i].time >= rs[i - 1].time);
  }
  CHECK(rs[2].time == start);
  CHECK(rs[4].time == start + ns / 2);
}

TEST_CASE("readings come at their own rate, alongside the pairs") {
  Scenario s = rig();
  s.channels[0].readings = Schedule{0.25};
  const auto rs = run(s, 3, 5000);
  std::size_t pairs = 0, readings = 0;
  for (const auto& r : rs) {
    if (r.kind == SimRecord::Kind::pair) {
      ++pairs;
      CHECK((r.time - start) % ns == 0);
    } else {
      ++readings;
      CHECK((r.time - start) % (ns / 4) == 0);
    }
  }
  CHECK(readings == 4 * pairs);
  CHECK(Simulator::scheduled_slots(s, 10) == 10 + 40);
  CHECK(Simulator::scheduled_slots(s, 10.1) == 11 + 41);
}

TEST_CASE("a gain step shows as the new slope in a fit of the pairs after it") {
  Scenario s = rig();
  s.channels[0].faults.push_back(step_fault(Fault::Kind::gain_step, 3600, 0.015));
  const auto rs = run(s, 5, 7200);
  const auto before = fit_pairs(rs, 0, 3600), after = fit_pairs(rs, 3600, 7200);
  CHECK(before.b1 == Approx(1.0).margin(5 * before.se_b1 + 1e-12));
  CHECK(after.b1 == Approx(1.015).margin(5 * after.se_b1));
  CHECK(after.se_b1 < 0.0005);  // the check above is tight enough to see the step
  CHECK(after.b0 == Approx(0.0).margin(5 * after.se_b0));
}

TEST_CASE("an offset step shows as the new intercept, the slope unchanged") {
  Scenario s = rig();
  Fault f;
  f.kind = Fault::Kind::offset_step;
  f.after_s = 1800;
  f.change = -0.25;
  s.channels[0].faults.push_back(f);
  const auto rs = run(s, 6, 3600);
  const auto before = fit_pairs(rs, 0, 1800), after = fit_pairs(rs, 1800, 3600);
  CHECK(before.b0 == Approx(0.0).margin(5 * before.se_b0));
  CHECK(after.b0 == Approx(-0.25).margin(5 * after.se_b0));
  CHECK(after.b1 == Approx(1.0).margin(5 * after.se_b1));
}

TEST_CASE("ageing ramps the offset and the gain by their rates per day") {
  Scenario s = rig();
  s.channels[0].pairs = Schedule{60};
  Fault f;
  f.kind = Fault::Kind::ageing;
  f.after_s = 86400;  // a day of good behaviour, then two of ageing
  f.offset_per_day = 0.3;
  f.gain_per_day = 0.002;
  s.channels[0].faults.push_back(f);
  const auto rs = run(s, 7, 3 * 1440);
  SensorModel model(s.channels[0].sensor, s.channels[0].faults);
  CHECK(model.offset_at(86400) == 0);
  CHECK(model.offset_at(2 * 86400) == Approx(0.3));
  CHECK(model.slope_at(3 * 86400) == Approx(1.004));
  // The error at the set point 0 (pure offset) grows at 0.3 per day once ageing starts.
  stats::StreamingLineFit trend(stats::MemoryPolicy::cumulative());
  for (const auto& r : rs)
    if (seconds(r) >= 86400 && r.true_value == 0) trend.add(seconds(r) / 86400, r.sensor - r.reference);
  const auto t = trend.summary(stats::Model::line).value();
  CHECK(t.b1 == Approx(0.3).margin(5 * t.se_b1));
  CHECK(t.se_b1 < 0.01);
}

TEST_CASE("a stuck sensor repeats one value for its duration, then reads again") {
  Scenario s = rig();
  Fault f;
  f.kind = Fault::Kind::stuck;
  f.after_s = 100;
  f.duration_s = 150;
  s.channels[0].faults.push_back(f);
  const auto rs = run(s, 8, 400);
  std::optional<double> held;
  for (const auto& r : rs) {
    const bool inside = seconds(r) >= 100 && seconds(r) < 250;
    CHECK(r.stuck == inside);
    if (!inside) continue;
    if (!held) held = r.sensor;
    CHECK(r.sensor == *held);
  }
  // After the fault the indication follows the process again (at 300 s the rig is at 75).
  CHECK(rs[300].sensor != *held);
  CHECK(rs[300].sensor == Approx(rs[300].true_value).margin(0.1));
}

TEST_CASE("readings are rounded to the resolution of the sensor and of the reference") {
  Scenario s = rig();
  s.channels[0].sensor.resolution = 0.01;
  s.channels[0].sensor.noise_sd = 0.03;
  s.channels[0].reference.resolution = 0.005;
  s.channels[0].reference.noise_sd = 0.004;
  s.channels[0].profile.jitter = 0.3;
  const auto rs = run(s, 9, 3000);
  for (const auto& r : rs) {
    REQUIRE(on_grid(r.sensor, 0.01));
    REQUIRE(on_grid(r.reference, 0.005));
    // Rounding to the nearest step moves a reading by at most half a step.
    REQUIRE(std::abs(r.sensor - r.true_value) < 0.005 + 6 * 0.03);
  }
  CHECK(emitted_decimals(s.channels[0]).sensor == 2);
  CHECK(emitted_decimals(s.channels[0]).reference == 3);
  CHECK(decimals_for_step(0) == -1);
  CHECK(decimals_for_step(2) == 0);
  CHECK(decimals_for_step(0.25) == 2);
  CHECK(quantise(-0.004, 0.01) == 0.0);
  CHECK(!std::signbit(quantise(-0.004, 0.01)));
}

TEST_CASE("dropouts remove records at their rate and leave the others as they were") {
  Scenario clean = rig(), lossy = rig();
  lossy.channels[0].sensor.dropout_probability = 0.1;
  const std::size_t slots = 20000;
  const auto all = run(clean, 10, slots);
  Simulator sim(lossy, 10, start);
  std::size_t kept = 0, j = 0;
  while (true) {
    const SimRecord r = sim.next().value();
    if (r.time >= all.back().time + ns) break;
    while (all[j].time < r.time) ++j;  // the dropped slots
    REQUIRE(same(r, all[j]));
    ++kept;
  }
  const double lost = static_cast<double>(slots - kept);
  CHECK(std::abs(lost - 2000) < 5 * std::sqrt(slots * 0.1 * 0.9));
  CHECK(sim.dropped() >= static_cast<std::uint64_t>(lost));
}

TEST_CASE("spikes come at their rate, with their size and either sign") {
  Scenario s = rig();
  s.channels[0].sensor.spikes = {0.01, 3.0};
  const auto rs = run(s, 11, 30000);
  std::size_t spikes = 0, up = 0;
  for (const auto& r : rs) {
    if (!r.spike) {
      REQUIRE(std::abs(r.sensor - r.true_value) < 0.1);
      continue;
    }
    ++spikes;
    const double jump = r.sensor - r.true_value;
    CHECK(std::abs(std::abs(jump) - 3.0) < 0.1);
    up += jump > 0;
  }
  CHECK(std::abs(double(spikes) - 300) < 5 * std::sqrt(30000 * 0.01 * 0.99));
  CHECK(up > spikes / 4);
  CHECK(up < 3 * spikes / 4);
}

TEST_CASE("raw signals round-trip through linearise() to the engineering reading") {
  using metrology::Linearisation;
  Scenario s = rig();
  ChannelModel& c = s.channels[0];
  c.sensor.resolution = 0.01;
  SECTION("Pt100 resistance") {
    c.sensor.raw = RawOutput{Linearisation::rtd(100), 0.0};
    c.reference.raw = RawOutput{Linearisation::rtd(100), 0.0};
    for (const auto& r : run(s, 12, 2000)) {
      REQUIRE(linearise(c.sensor.raw->linearisation, r.sensor).value() == Approx(r.sensor_value).margin(1e-9));
      REQUIRE(linearise(c.reference.raw->linearisation, r.reference).value() ==
              Approx(r.reference_value).margin(1e-9));
    }
  }
  SECTION("type K emf with a 25 degC cold junction, rounded to 1 uV") {
    c.sensor.raw = RawOutput{Linearisation::thermocouple(metrology::ThermocoupleType::K, 25), 0.001};
    for (const auto& r : run(s, 13, 2000)) {
      REQUIRE(on_grid(r.sensor, 0.001));
      // 1 uV is about 0.025 degC on type K; rounding moves at most half of it.
      REQUIRE(linearise(c.sensor.raw->linearisation, r.sensor).value() == Approx(r.sensor_value).margin(0.0125));
    }
    CHECK(emitted_decimals(c).sensor == 3);
  }
  SECTION("4-20 mA loop over 0..100, saturating at 20.5 mA") {
    c.sensor.raw = RawOutput{Linearisation::current_loop({0, 100}), 0.0001};
    c.sensor.spikes = {0.05, 10.0};  // spikes above 100 drive the loop into saturation
    bool saturated = false;
    for (const auto& r : run(s, 14, 4000)) {
      REQUIRE(r.sensor >= 3.8 - 1e-12);
      REQUIRE(r.sensor <= 20.5 + 1e-12);
      if (std::abs(r.sensor - 20.5) < 1e-12 || std::abs(r.sensor - 3.8) < 1e-12) {
        saturated = true;
        continue;
      }
      REQUIRE(linearise(c.sensor.raw->linearisation, r.sensor).value() == Approx(r.sensor_value).margin(0.0007));
    }
    CHECK(saturated);
  }
}

TEST_CASE("a value beyond the raw signal's range is an error naming channel and time") {
  Scenario s = rig();
  s.channels[0].sensor.raw = RawOutput{metrology::Linearisation::rtd(100), 0};
  s.channels[0].faults.push_back(step_fault(Fault::Kind::offset_step, 10, 2000));
  REQUIRE(check_scenario(s).empty());  // as found, the sensor fits the Pt100's range
  Simulator sim(s, 1, start);
  for (int i = 0; i < 10; ++i) REQUIRE(sim.next().ok());
  const auto r = sim.next();
  REQUIRE_FALSE(r.ok());
  CHECK_THAT(r.error().message, Catch::StartsWith("channel TT-1 at 2026-12-01T00:00:10.000Z: the sensor value"));
}

TEST_CASE("check_scenario names what is wrong and where") {
  Scenario s = rig();
  s.channels[0].pairs = Schedule{0.0005};
  s.channels[0].sensor.dropout_probability = 1.5;
  s.channels[0].faults.push_back(step_fault(Fault::Kind::gain_step, 0, 0));
  ChannelModel dup = s.channels[0];
  dup.pairs.reset();
  s.channels.push_back(dup);
  std::vector<std::string> got;
  for (const auto& p : check_scenario(s)) got.push_back(p.path + ": " + p.message);
  CHECK_THAT(got[0], Catch::StartsWith("channels[0].pairs.interval_s: must be a whole number of milliseconds"));
  CHECK(std::count_if(got.begin(), got.end(), [](const std::string& m) {
          return m.rfind("channels[1]: needs pairs, readings or both", 0) == 0;
        }) == 1);
  CHECK(std::count_if(got.begin(), got.end(), [](const std::string& m) {
          return m.rfind("channels[1].id: another channel already has the id 'TT-1'", 0) == 0;
        }) == 1);
  CHECK(std::count_if(got.begin(), got.end(), [](const std::string& m) {
          return m == "channels[0].sensor.dropout_probability: must be a probability from 0 to 1";
        }) == 1);
  CHECK(std::count_if(got.begin(), got.end(), [](const std::string& m) {
          return m.rfind("channels[0].faults[0].change:", 0) == 0;
        }) == 1);
}
