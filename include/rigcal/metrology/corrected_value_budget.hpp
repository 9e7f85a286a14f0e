#pragma once
// The GUM uncertainty budget of a corrected value: the reference-scale value x_hat implied by the
// mean of m sensor readings through the channel's current fit (stats::inverse_predict), with every
// component expressed in the reference (x) scale.
//
// Budget lines, always present and in this order (a component that is not stated has u = 0):
//   0 "repeatability of the mean reading"   Type A, u = s / (|b1| sqrt m)            (the 1/m term)
//   1 "calibration line"                    Type A, u = (s / |b1|) sqrt(1/n + lev)   (1/n + leverage)
//        Lines 0 and 1 both come from the fit's residual variance s^2 and share one dof source with
//        nu = fit.dof, so together they carry exactly the fit's dof (see uncertainty_budget.hpp).
//   2 "reference standard"                  Type B, u = U/k of its certificate, c = 1, its dof
//        An error of the standard shifts every reference value, hence the fitted line and x_hat, by
//        the same amount.
//   3 "sensor resolution"                   Type B, u = resolution / sqrt 12 (rectangular, GUM
//        4.3.7 and F.2.2.1), in sensor units, c = 1 / |b1|, nu = infinity (the bounds are exact).
//        Not divided by sqrt m: when the reading noise is smaller than the resolution step, every
//        reading rounds the same way and averaging removes nothing, so this is the conservative
//        choice; when the noise is well above the step, the rounding is already inside s and this
//        line counts it a second time (a small excess, since a step below the noise adds little).
//   4.. further components given by the caller, in their order, with their own sensitivity to x.
//
// Averaging (m -> infinity) removes only line 0; lines 1-3 are the floor that no amount of
// averaging reduces.
#include <vector>

#include "rigcal/metrology/reference_standard.hpp"
#include "rigcal/metrology/uncertainty_budget.hpp"
#include "rigcal/result.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::metrology {

struct CorrectedValueInputs {
  ReferenceStandardUncertainty reference;
  double resolution = 0;  // smallest step of the sensor's indication, sensor (y) units; 0 if not stated
  std::vector<UncertaintyComponent> further;
};

struct CorrectedValue {
  double x_hat = 0;                  // reference units
  stats::InversePrediction inverse;  // delta and Fieller intervals from the fit alone
  UncertaintyBudget budget;          // u_c, nu_eff, k, U of x_hat
};

// The dof source shared by budget lines 0 and 1.
inline constexpr const char* fit_dof_source = "calibration fit";

// x_hat and its budget for the mean y_mean of m readings (REQUIRES nothing; errors instead):
// Error if y_mean is not finite, m is not a finite number >= 1, the resolution is negative or not
// finite, the reference standard is invalid, the fitted slope is zero, or the budget fails
// (see combine_uncertainties).
Result<CorrectedValue> corrected_value(const stats::LineFit& fit, double y_mean, double m,
                                       const CorrectedValueInputs& inputs, const stats::TwoSidedT& t);

}  // namespace rigcal::metrology
