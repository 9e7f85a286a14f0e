#include "correction.hpp"

#include "rigcal/metrology/corrected_value_budget.hpp"

namespace rigcal::engine {

void correct_block(const config::ChannelConfig& cfg, const Result<stats::LineFit>& fit, bool min_pairs_reached,
                   bool drift_alert, const stats::TwoSidedT& t_coverage, HistorianRecord& record) {
  record.coverage_probability = t_coverage.confidence();
  if (!fit) {
    record.quality = Quality::bad;
    record.quality_reason = "no calibration fit yet";
    return;
  }
  auto reference = metrology::reference_from_certificate(cfg.reference.expanded_uncertainty,
                                                         cfg.reference.coverage_factor, cfg.reference.dof);
  metrology::CorrectedValueInputs inputs;
  if (reference) inputs.reference = reference.value();
  inputs.resolution = cfg.sensor.resolution;
  auto cv = metrology::corrected_value(fit.value(), record.indication, static_cast<double>(record.m), inputs,
                                       t_coverage);
  if (!cv) {
    record.quality = Quality::bad;
    record.quality_reason = "the current fit cannot correct readings (fitted slope zero)";
    return;
  }
  const metrology::UncertaintyBudget& b = cv->budget;
  record.corrected = cv->x_hat;
  record.u = b.u_c;
  record.expanded = b.expanded;
  record.k = b.k;
  record.nu_eff = b.nu_eff;
  // Budget lines 0-3 are fixed by corrected_value_budget.hpp: repeatability, calibration line,
  // reference standard, resolution.
  record.u_repeatability = b.lines.at(0).contribution;
  record.u_calibration = b.lines.at(1).contribution;
  record.u_reference = b.lines.at(2).contribution;
  record.u_resolution = b.lines.at(3).contribution;
  if (!min_pairs_reached) {
    record.quality = Quality::uncertain;
    record.quality_reason = "fewer pairs in the fit than min_pairs";
  } else if (fit->reference_spread() < cfg.min_reference_spread()) {
    record.quality = Quality::uncertain;
    record.quality_reason = "the fit's reference values spread too little over the range";
  } else if (drift_alert) {
    record.quality = Quality::uncertain;
    record.quality_reason = "drift alert raised: the calibration may no longer hold";
  } else {
    record.quality = Quality::good;
    record.quality_reason = "";
  }
}

}  // namespace rigcal::engine
