// The channel engine end to end in process: determinism across a checkpoint, one alert per drift
// (no flapping), spikes screened out, and the historian's uncertainty equal to the GUM budget.
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <memory>
#include <random>
#include <vector>

#include "rigcal/config/loader.hpp"
#include "rigcal/engine/channel_engine.hpp"

using namespace rigcal;
using namespace rigcal::engine;

namespace {

constexpr std::int64_t s = 1'000'000'000;

struct CollectingSink final : EventSink {
  std::vector<AlertEvent> alerts;
  std::vector<HistorianRecord> records;
  std::vector<EngineReject> rejects;
  std::vector<std::string> notices;
  void on_alert(const AlertEvent& e) override { alerts.push_back(e); }
  void on_historian(const HistorianRecord& r) override { records.push_back(r); }
  void on_reject(const EngineReject& r) override { rejects.push_back(r); }
  void on_notice(const Notice& n) override { notices.push_back(n.message); }
  int raised(AlertKind k) const {
    int n = 0;
    for (const auto& a : alerts) n += a.kind == k && a.transition == Transition::raised;
    return n;
  }
  int cleared(AlertKind k) const {
    int n = 0;
    for (const auto& a : alerts) n += a.kind == k && a.transition == Transition::cleared;
    return n;
  }
};

config::ChannelConfig channel_config(const std::string& extra = "") {
  const std::string yaml = R"(
channels:
  - id: TT-101
    units: degC
    reference: {id: PRT-REF-07, expanded_uncertainty: 0.02, coverage_factor: 2}
    certificate: {intercept: 0.0, slope: 1.0, u_intercept: 0.01, u_slope: 0.0002}
    sensor: {resolution: 0.01, noise_sd: 0.05}
    range: [20, 180]
    tolerance: {absolute: 0.5}
    fit: {window_pairs: 400}
    detector: {target_arl0_pairs: 1.0e7, min_slope_change: 0.005}
    averaging: {block_readings: 25}
)" + extra;
  auto r = config::load_config(yaml, "test.yaml");
  std::string errors;
  for (const auto& e : r.errors) errors += e.to_string() + "\n";
  INFO(errors);
  REQUIRE(r.ok());
  return r.config.channels.at(0);
}

// Design target 1e7 pairs: over the 12 000 in-control pairs a test runs, a false alert has a chance
// of about 0.1 %, so "exactly one alert" tests the engine, not luck.

// A sensor following y = offset + slope x + noise at set points spread over 20..180 degC.
struct Rig {
  std::mt19937_64 rng{2026};
  std::normal_distribution<double> noise{0.0, 0.05};
  std::uniform_real_distribution<double> ref{20.0, 180.0};
  double slope = 1.0, offset = 0.0;
  std::int64_t t = 1764576000 * s;
  void pair(ChannelEngine& ch, EventSink& sink) {
    const double x = ref(rng);
    t += s;
    ch.on_pair(t, x, offset + slope * x + noise(rng), sink);
  }
  void reading(ChannelEngine& ch, EventSink& sink, double x) {
    t += s / 10;
    ch.on_reading(t, offset + slope * x + noise(rng), sink);
  }
};

std::string state_of(const ChannelEngine& ch) {
  state::BinaryWriter w;
  ch.save(w);
  return w.buffer();
}

}  // namespace

TEST_CASE("a checkpoint mid-stream continues exactly like the uninterrupted run") {
  auto cfg = std::make_shared<const config::ChannelConfig>(channel_config());
  EngineTables tables;
  ChannelEngine straight(cfg, config::TimeRules{}, tables);
  CollectingSink a, b;
  Rig rig_a, rig_b;
  for (int i = 0; i < 3000; ++i) {
    rig_a.pair(straight, a);
    if (i % 4 == 0) rig_a.reading(straight, a, 100.0);
  }
  ChannelEngine first(cfg, config::TimeRules{}, tables);
  for (int i = 0; i < 1700; ++i) {
    rig_b.pair(first, b);
    if (i % 4 == 0) rig_b.reading(first, b, 100.0);
  }
  ChannelEngine resumed(cfg, config::TimeRules{}, tables);
  const std::string saved = state_of(first);
  state::BinaryReader r(saved);
  REQUIRE(resumed.load(r));
  REQUIRE(r.at_end());
  for (int i = 1700; i < 3000; ++i) {
    rig_b.pair(resumed, b);
    if (i % 4 == 0) rig_b.reading(resumed, b, 100.0);
  }
  CHECK(state_of(resumed) == state_of(straight));
  CHECK(resumed.fit().moments() == straight.fit().moments());
  REQUIRE(a.records.size() == b.records.size());
  CHECK(a.records.back().corrected == b.records.back().corrected);
  CHECK(a.records.back().seq == b.records.back().seq);
}

TEST_CASE("a slope shift injected mid-stream raises exactly one drift alert, which clears when it ends") {
  for (const char* kind : {"cusum", "ewma", "interval"}) {
    INFO(kind);
    auto cfg = std::make_shared<const config::ChannelConfig>(
        channel_config(std::string("    alert: {clear_after: 300}\n")));
    auto c2 = *cfg;
    c2.detector.kind = std::string(kind) == "cusum"  ? config::DetectorKind::cusum
                       : std::string(kind) == "ewma" ? config::DetectorKind::ewma
                                                     : config::DetectorKind::interval;
    cfg = std::make_shared<const config::ChannelConfig>(c2);
    EngineTables tables;
    ChannelEngine ch(cfg, config::TimeRules{}, tables);
    CollectingSink sink;
    Rig rig;
    for (int i = 0; i < 3000; ++i) rig.pair(ch, sink);
    CHECK(sink.raised(AlertKind::drift) == 0);
    rig.slope = 1.01;  // +1 % gain
    for (int i = 0; i < 3000; ++i) rig.pair(ch, sink);
    CHECK(sink.raised(AlertKind::drift) == 1);
    CHECK(ch.alert_raised());
    rig.slope = 1.0;
    for (int i = 0; i < 6000; ++i) rig.pair(ch, sink);
    CHECK(sink.raised(AlertKind::drift) == 1);
    CHECK(sink.cleared(AlertKind::drift) == 1);
    CHECK_FALSE(ch.alert_raised());
    const AlertEvent& e = *std::find_if(sink.alerts.begin(), sink.alerts.end(),
                                        [](const AlertEvent& a) { return a.kind == AlertKind::drift; });
    CHECK(e.channel == "TT-101");
    CHECK(e.detector == kind);
    CHECK(e.ne107 == "maintenance_required");
    CHECK_THAT(e.message, Catch::Contains("no longer agrees with its certificate"));
  }
}

TEST_CASE("a single spike is screened out and raises no alert") {
  auto cfg = std::make_shared<const config::ChannelConfig>(channel_config());
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  Rig rig;
  for (int i = 0; i < 1000; ++i) rig.pair(ch, sink);
  rig.t += s;
  ch.on_pair(rig.t, 100.0, 1000.0, sink);  // a dropped decimal point: 100.0 read as 1000
  for (int i = 0; i < 1000; ++i) rig.pair(ch, sink);
  CHECK(sink.raised(AlertKind::drift) == 0);
  REQUIRE(sink.rejects.size() == 1);
  CHECK(sink.rejects[0].reason == protocol::RejectReason::outlier);
  CHECK(sink.rejects[0].sensor_raw == 1000.0);
  CHECK(ch.counters().outliers == 1);
}

TEST_CASE("a historian record carries u, U, k and nu_eff of a hand-computed GUM budget") {
  // JCGM 100:2008 eq. (10) and G.2b, with the inverse-prediction formula for the fit's part:
  //   u^2 = (s/b1)^2 (1/m + 1/n + (x^ - xbar)^2 / Sxx) + (U_ref/k)^2 + (res / sqrt(12) / b1)^2
  auto cfg = std::make_shared<const config::ChannelConfig>(channel_config());
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  Rig rig;
  for (int i = 0; i < 1000; ++i) rig.pair(ch, sink);
  for (int i = 0; i < 25; ++i) rig.reading(ch, sink, 120.0);
  REQUIRE(sink.records.size() == 1);
  const HistorianRecord& r = sink.records[0];
  const auto f = ch.fit_summary().value();
  const double x_hat = f.mean_x + (r.indication - f.mean_y) / f.b1;
  const double u_fit2 = std::pow(f.s / f.b1, 2) * (1.0 / 25 + 1.0 / f.n + std::pow(x_hat - f.mean_x, 2) / f.sxx);
  const double u_ref2 = std::pow(0.02 / 2, 2);
  const double u_res2 = std::pow(0.01 / std::sqrt(12.0) / f.b1, 2);
  const double u = std::sqrt(u_fit2 + u_ref2 + u_res2);
  const double nu_eff = std::pow(u, 4) / (u_fit2 * u_fit2 / f.dof);  // the Type B terms have infinite dof
  const double k = stats::student_t_quantile(0.975, std::floor(nu_eff));
  REQUIRE(r.corrected.has_value());
  CHECK(*r.corrected == Approx(x_hat).epsilon(1e-12));
  CHECK(r.u == Approx(u).epsilon(1e-12));
  CHECK(r.nu_eff == Approx(nu_eff).epsilon(1e-9));
  CHECK(r.k == Approx(k).epsilon(1e-12));
  CHECK(r.expanded == Approx(k * u).epsilon(1e-12));
  CHECK(r.m == 25);
  CHECK(r.quality == Quality::good);
  CHECK(opc_ua_severity(r.quality) == 0u);
}

TEST_CASE("quality is uncertain before min_pairs and while a drift alert is raised, bad without a fit") {
  auto cfg = std::make_shared<const config::ChannelConfig>(channel_config());
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  Rig rig;
  for (int i = 0; i < 25; ++i) rig.reading(ch, sink, 100.0);
  REQUIRE(sink.records.size() == 1);
  CHECK(sink.records[0].quality == Quality::bad);
  CHECK_FALSE(sink.records[0].corrected.has_value());
  for (int i = 0; i < 10; ++i) rig.pair(ch, sink);
  for (int i = 0; i < 25; ++i) rig.reading(ch, sink, 100.0);
  CHECK(sink.records.back().quality == Quality::uncertain);
  CHECK(sink.records.back().quality_reason == "fewer pairs in the fit than min_pairs");
  rig.slope = 1.02;
  for (int i = 0; i < 2000; ++i) rig.pair(ch, sink);
  REQUIRE(ch.alert_raised());
  for (int i = 0; i < 25; ++i) rig.reading(ch, sink, 100.0);
  CHECK(sink.records.back().quality == Quality::uncertain);
  CHECK(sink.records.back().drift_alert);
}

TEST_CASE("timestamps far backwards are rejected by the channel's clock rule") {
  auto cfg = std::make_shared<const config::ChannelConfig>(channel_config());
  EngineTables tables;
  config::TimeRules rules;
  rules.max_backwards_s = 60;
  ChannelEngine ch(cfg, rules, tables);
  CollectingSink sink;
  ch.on_pair(1000 * s, 50, 50, sink);
  ch.on_pair(950 * s, 60, 60, sink);  // 50 s back: accepted
  ch.on_pair(900 * s, 70, 70, sink);  // 100 s before the latest: rejected
  REQUIRE(sink.rejects.size() == 1);
  CHECK(sink.rejects[0].reason == protocol::RejectReason::clock_backwards);
  CHECK(ch.counters().clock_rejects == 1);
  CHECK(ch.fit().moments().count == 2);
}

TEST_CASE("a raw signal outside its linearisation's range is rejected, inside it is converted") {
  auto c = channel_config();
  c.sensor.linearisation = metrology::Linearisation::rtd(100.0);
  auto cfg = std::make_shared<const config::ChannelConfig>(c);
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  // IEC 60751 table: 138.51 ohm at 100 degC (tests/data/iec60751_pt100_checkpoints.dat)
  ch.on_pair(1 * s, 100.0, 138.5055, sink);
  ch.on_pair(2 * s, 100.0, 5.0, sink);  // 5 ohm: below the -200 degC end of the Pt100 range
  REQUIRE(sink.rejects.size() == 1);
  CHECK(sink.rejects[0].reason == protocol::RejectReason::out_of_signal_range);
  CHECK(ch.fit().moments().count == 1);
  CHECK(ch.fit().moments().shift_y == Approx(100.0).margin(1e-3));
}

TEST_CASE("a block closes by itself once the channel has been quiet for a bucket length of ticks") {
  auto c = channel_config();
  c.averaging.block_readings = 0;
  c.averaging.bucket_s = 60;
  auto cfg = std::make_shared<const config::ChannelConfig>(c);
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  // Readings stamped a day in the past (a replay): the clock never closes their bucket early.
  const std::int64_t past = 1764576000 * s - 86400 * s;
  const std::int64_t wall = 1764576000 * s;
  for (int i = 0; i < 5; ++i) {
    ch.on_reading(past + i * s, 80.0, sink);
    ch.tick(wall + i * s, sink);
  }
  CHECK(sink.records.empty());
  for (int i = 5; i < 64; ++i) ch.tick(wall + i * s, sink);  // quiet from the tick at 5 s
  CHECK(sink.records.empty());
  ch.tick(wall + 65 * s, sink);
  REQUIRE(sink.records.size() == 1);
  CHECK(sink.records[0].m == 5);
  ch.tick(wall + 200 * s, sink);
  CHECK(sink.records.size() == 1);
}

TEST_CASE("regression: a rig dwelling at one set point while the detector learns still gets a working design") {
  // The first learn_pairs pairs all sit at 21 degC (a 15-minute dwell); the spread must come from
  // the channel's range, not from those pairs, or the slope design shift is ~0 and no CUSUM exists.
  auto c = channel_config();
  c.sensor.noise_sd.reset();  // learned from the scatter about the certified line
  auto cfg = std::make_shared<const config::ChannelConfig>(c);
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  std::mt19937_64 rng(9);
  std::normal_distribution<double> noise(0.0, 0.05);
  const double set_points[] = {21, 60, 100, 140, 179, 140, 100, 60};
  std::int64_t t = 0;
  for (int i = 0; i < 8 * 900 * 2; ++i) {
    const double x = set_points[(i / 900) % 8];
    const double gain = i < 8 * 900 ? 1.0 : 1.01;
    ch.on_pair(t += s, x, gain * x + noise(rng), sink);
  }
  CHECK(ch.drift().phase() == DriftMonitor::Phase::monitoring);
  CHECK(ch.drift().design().sigma == Approx(0.05).epsilon(0.35));
  CHECK(ch.drift().design().centre.x_centre == 100.0);
  CHECK(sink.raised(AlertKind::drift) == 1);
}

TEST_CASE("with errors in variables the channel's calibration is York's fit, unbiased where OLS is not") {
  // Reference noise as large as a fifth of the reference spread at one set point pair: OLS slopes are
  // attenuated by var(x) / (var(x) + u_x^2); York's are not (York et al. 2004).
  auto c = channel_config();
  c.reference.noise_sd = 2.0;
  c.sensor.noise_sd = 0.5;
  c.fit.errors_in_variables = true;
  c.fit.memory = stats::MemoryPolicy::Kind::cumulative;
  c.screening.enabled = false;
  c.tolerance = {};
  auto cfg = std::make_shared<const config::ChannelConfig>(c);
  EngineTables tables;
  ChannelEngine ch(cfg, config::TimeRules{}, tables);
  CollectingSink sink;
  std::mt19937_64 rng(12);
  std::normal_distribution<double> n01(0.0, 1.0);
  std::uniform_real_distribution<double> truth(90.0, 110.0);
  for (int i = 0; i < 20000; ++i) {
    const double x = truth(rng);
    ch.on_pair((i + 1) * s, x + 2.0 * n01(rng), x + 0.5 * n01(rng), sink);
  }
  const auto york = ch.fit_summary().value();
  const auto ols = ch.ols_summary().value();
  CHECK(std::abs(york.b1 - 1.0) < 3 * york.se_b1);
  CHECK(ols.b1 < 0.9);  // attenuation: 33.3 / (33.3 + 4) = 0.89
  CHECK(ols.b1 == Approx(33.33 / 37.33).epsilon(0.02));
}
