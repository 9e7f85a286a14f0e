#pragma once
// Intervals and tests drawn from a LineFit: Student t intervals on the coefficients, the joint
// F(2, n-2) test of a certified (intercept, slope) pair, confidence and prediction intervals at a
// reference value, and inverse prediction (the reference value implied by averaged sensor readings).
#include "rigcal/result.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::stats {

struct Interval {
  double lo = 0;
  double hi = 0;
  bool contains(double v) const { return lo <= v && v <= hi; }
  double half_width() const { return 0.5 * (hi - lo); }
};

struct CoefficientIntervals {
  double t = 0;  // critical value used, t_{(1+c)/2}(dof)
  Interval b0;   // [0, 0] for the through-origin model
  Interval b1;
};
CoefficientIntervals coefficient_intervals(const LineFit& fit, const TwoSidedT& t);

// The line on the sensor's certificate, with the certificate's standard uncertainties.
struct CertifiedLine {
  double intercept = 0;
  double slope = 1;
  double u_intercept = 0;  // standard uncertainty of the certified intercept (0 if not stated)
  double u_slope = 0;
  double cov = 0;  // covariance of the certified intercept and slope (0 if not stated)
};

// Verdict of the data against the certificate at the confidence of `t`.
//  - slope / intercept: |fitted - certified| <= t * sqrt(se^2 + u_cert^2)  (widened when requested);
//  - joint: (beta* - b)' (C_fit + C_cert)^-1 (beta* - b) <= 2 F_{c}(2, dof), evaluated about the
//    centroid where the fitted intercept and slope are uncorrelated. With the certificate's covariance
//    added the F reference distribution is an approximation (the certificate's terms have infinite
//    degrees of freedom); without it the region is exact under normal errors.
// Through the origin the joint test reduces to the slope test (F(1, dof) = t^2).
struct CertificateVerdict {
  bool slope_consistent = true;
  bool intercept_consistent = true;
  bool joint_consistent = true;
  double slope_deviation = 0;      // b1 - certified slope
  double slope_limit = 0;          // t * sqrt(se^2 + u^2)
  double intercept_deviation = 0;  // b0 - certified intercept
  double intercept_limit = 0;
  double joint_statistic = 0;  // quadratic form / 2, compare with joint_critical
  double joint_critical = 0;   // F_{c}(2, dof)
};
CertificateVerdict judge_against_certificate(const LineFit& fit, const CertifiedLine& cert,
                                             const TwoSidedT& t, bool widen_by_certificate);

// Two-sided interval for the mean line at x (confidence band, pointwise).
Interval confidence_interval_at(const LineFit& fit, double x, const TwoSidedT& t);
// Two-sided interval for one future sensor reading of unit weight at x.
Interval prediction_interval_at(const LineFit& fit, double x, const TwoSidedT& t);

// Reference value estimated from the mean of m sensor readings by inverting the fitted line.
// u^2(x_hat) = (s^2 / b1^2) (1/m + 1/n + (x_hat - x_mean)^2 / Sxx)  (classical delta-method formula;
// 1/n becomes 1/sum_w with weights; through the origin: 1/m + x_hat^2 / Sxx).
// The exact Fieller interval is bounded only when g = t^2 s^2 / (b1^2 Sxx) < 1; otherwise the slope is
// too poorly determined to invert and `fieller_bounded` is false.
struct InversePrediction {
  double x_hat = 0;
  double m = 1;
  double u = 0;              // combined standard uncertainty of x_hat from the fit
  double u_repeatability = 0;  // the 1/m part: s / (|b1| sqrt(m))
  double u_calibration = 0;    // the 1/n and leverage parts: what averaging cannot reduce
  Interval delta;            // x_hat +- t u
  bool fieller_bounded = false;
  Interval fieller;          // valid when fieller_bounded
  double fieller_g = 0;
};
// Fails when the fitted slope is zero. REQUIRES: m >= 1.
Result<InversePrediction> inverse_predict(const LineFit& fit, double y_mean, double m, const TwoSidedT& t);

}  // namespace rigcal::stats
