#pragma once
// The corrected value of an averaging block: inverse prediction of the block's mean indication
// through the channel's current fit, with its GUM uncertainty budget. Internal to the engine.
#include "rigcal/config/config.hpp"
#include "rigcal/engine/averager.hpp"
#include "rigcal/engine/events.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::engine {

// Fills the value, uncertainty and quality fields of `record` (the caller fills identity and window).
// REQUIRES: record.m, record.indication set from the block.
void correct_block(const config::ChannelConfig& cfg, const Result<stats::LineFit>& fit, bool min_pairs_reached,
                   bool drift_alert, const stats::TwoSidedT& t_coverage, HistorianRecord& record);

}  // namespace rigcal::engine
