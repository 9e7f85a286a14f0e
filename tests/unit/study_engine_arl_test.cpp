// The default detector through the real ChannelEngine meets its configured ARL0 in simulation, and the
// study's way of calibrating the interval rule counts exactly what the engine's alert machine counts.
#include <catch2/catch.hpp>
#include <cmath>

#include "calibration.hpp"
#include "rigcal/engine/engine_tables.hpp"
#include "study_runs.hpp"

using namespace rigcal;
using namespace rigcal::study;

TEST_CASE("the default detector (cusum) in the ChannelEngine meets a target ARL0 of 2000 pairs") {
  // Learning, screening, the window fit, both CUSUMs (each designed for twice the target) and the
  // alert machine, on i.i.d. normal noise.
  engine::EngineTables tables;
  const StudyChannel channel;
  DetectorSetting setting;
  REQUIRE(setting.kind == config::ChannelConfig{}.detector.kind);  // the daemon's default kind
  setting.target_arl0_pairs = 2000;
  const auto runs = in_control_runs(channel, setting, {}, McPlan{1000, 20000, 77, 1}, tables);
  const ArlEstimate e = estimate_arl(runs);
  INFO("simulated ARL0 " << e.arl << " +- " << e.standard_error << " pairs, " << e.censored << " censored");
  CHECK(e.arl >= 2000 - 3 * e.standard_error);
  // Nor far over it: a design at twice the target would show as ~4000. Expected ~2200: the two
  // detectors' zero-state starts make the minimum of their run lengths a little longer than half of
  // each, and the slope pairing yields 0.48 rather than 0.5 innovations per pair.
  CHECK(e.arl <= 1.5 * 2000);
}

TEST_CASE("interval persistence counted outside the engine equals the engine's own alert machine") {
  engine::EngineTables tables;
  const StudyChannel channel;
  DetectorSetting setting;
  setting.kind = config::DetectorKind::interval;
  const McPlan plan{12, 60000, 5, 9};
  const auto curve = interval_persistence_curve(channel, setting, {10, 40}, {}, plan, tables);
  for (const auto& point : curve) {
    setting.raise_after = point.raise_after;
    const auto direct = in_control_runs(channel, setting, {}, plan, tables);
    REQUIRE(direct.size() == point.runs.size());
    for (std::size_t r = 0; r < direct.size(); ++r) {
      INFO("raise_after " << point.raise_after << ", run " << r);
      CHECK(direct[r].pairs == point.runs[r].pairs);
      CHECK(direct[r].alarmed == point.runs[r].alarmed);
    }
  }
  // Longer persistence can only alert later on the same stream.
  for (std::size_t r = 0; r < curve[0].runs.size(); ++r) CHECK(curve[0].runs[r].pairs <= curve[1].runs[r].pairs);
}

TEST_CASE("detection delays are counted from the first changed pair, false alerts before it dropped") {
  engine::EngineTables tables;
  const StudyChannel channel;
  DetectorSetting setting;
  setting.target_arl0_pairs = 2000;
  // A 5 sigma offset step after 500 pairs: the offset CUSUM (k ~ 0.22, h ~ 14) needs three or four pairs.
  const Change change{ChangeKind::offset_step, 5.0, 500};
  const DelayRuns d = delay_runs(channel, setting, {}, change, McPlan{200, 1000, 3, 4}, tables);
  const DelayEstimate e = estimate_delay(d.delays, d.false_alerts);
  INFO("mean delay " << e.mean << ", false alerts before the change " << d.false_alerts);
  CHECK(d.delays.size() + d.false_alerts == 200);
  CHECK(d.false_alerts > 0);  // ARL0 2000 against a 500-pair burn-in: about 20 % expected
  CHECK(d.false_alerts < 80);
  CHECK(e.censored == 0);
  CHECK(e.mean >= 2.5);
  CHECK(e.mean < 4.5);
}
