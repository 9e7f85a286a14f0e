// The study's analytic statements about the engine's designs: the channel ARL0 they promise, and how it
// moves when the configured noise SD is wrong.
#include <catch2/catch.hpp>

#include "realistic.hpp"
#include "rigcal/engine/engine_tables.hpp"

using namespace rigcal;
using namespace rigcal::study;

TEST_CASE("designs read back from the engine give the channel ARL0 target; a low sigma shortens it") {
  engine::EngineTables tables;
  const StudyChannel channel;
  for (const auto kind : {config::DetectorKind::cusum, config::DetectorKind::ewma}) {
    DetectorSetting setting;
    setting.kind = kind;
    setting.target_arl0_pairs = 20000;
    const RealisticDesign d = realistic_design(channel, "test", setting, {1.0}, 1, tables);
    INFO(kind_label(kind));
    CHECK(d.design.arl0_pairs == 20000);
    // Offset designed for 2 x 20000 pairs, slope for 20000 innovations = 40000 pairs: together 20000.
    CHECK(misconfigured_arl0(d.design, 1.0) == Approx(20000).epsilon(1e-3));
    CHECK(misconfigured_arl0(d.design, 0.87) < 0.5 * 20000);
    CHECK(misconfigured_arl0(d.design, 1.13) > 2 * 20000);
    REQUIRE(d.arl0_by_sigma_factor.size() == std::size(sigma_factors));
    for (std::size_t i = 1; i < d.arl0_by_sigma_factor.size(); ++i)
      CHECK(d.arl0_by_sigma_factor[i] > d.arl0_by_sigma_factor[i - 1]);
    // A 1 sigma offset step is detected well inside the design's own ARL1 for the smaller design change.
    REQUIRE(d.analytic_offset_arl1.size() == 1);
    CHECK(d.analytic_offset_arl1[0] < d.design.arl1_offset_pairs);
  }
}
