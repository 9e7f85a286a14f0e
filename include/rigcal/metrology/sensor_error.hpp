#pragma once
// The error of a sensor as the plant uses it, at a reference value x, with its uncertainty.
//
// The plant corrects each reading y with the certificate line: x_plant = (y - b0*) / b1*. The current
// fit says the sensor reads y_hat(x) on average when the reference reads x, so the error is
//   e(x) = (y_hat(x) - b0*) / b1* - x,
// linear in x. It is the error of the sensor's mean indication (its calibration), not of a single
// reading; reading noise is the fit's residual scatter and is not part of e.
//
// Uncertainty, in reference units:
//  - fit (Type A): Var y_hat(x) = s^2 leverage(x), scaled by 1 / |b1*|; nu = fit.dof.
//  - reference standard (Type B): if the standard reads q + delta at true value q, the fit places the
//    sensor's response delta too far along x, and the true error differs from e by (b1 / b1*) delta;
//    contribution |b1 / b1*| u_ref, with the standard's dof.
//  - the certificate line is not uncertain here: b0*, b1* are the fixed correction in use, and e is
//    measured against exactly that correction. (Their stated uncertainties describe how well the
//    line fitted the sensor when it was issued, which is what e now re-measures.)
// u^2 = u_fit^2 + u_ref^2; nu_eff by Welch-Satterthwaite (GUM G.2b); k = t_p(floor nu_eff); U = k u.
#include "rigcal/metrology/reference_standard.hpp"
#include "rigcal/result.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::metrology {

struct SensorError {
  double x = 0;            // reference value, reference units
  double error = 0;        // e(x), reference units
  double u_fit = 0;        // s sqrt(leverage(x)) / |b1*|
  double u_reference = 0;  // |b1 / b1*| u_ref
  double u = 0;            // combined standard uncertainty of e(x)
  double dof = 0;          // nu_eff (may be +infinity)
  double k = 0;            // t_p(floor nu_eff) at the confidence of the TwoSidedT passed in
  double expanded = 0;     // U_e = k u
};

// Error if x is not finite, the certificate's slope is zero or not finite, its intercept is not
// finite, the reference standard is invalid, or nu_eff < 1.
Result<SensorError> sensor_error_at(const stats::LineFit& fit, const stats::CertifiedLine& certificate,
                                    const ReferenceStandardUncertainty& reference, double x,
                                    const stats::TwoSidedT& t);

}  // namespace rigcal::metrology
