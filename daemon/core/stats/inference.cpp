#include "rigcal/stats/inference.hpp"

#include <cmath>
#include <limits>

namespace rigcal::stats {

CoefficientIntervals coefficient_intervals(const LineFit& fit, const TwoSidedT& t) {
  CoefficientIntervals ci;
  ci.t = t.critical_value(fit.dof);
  ci.b1 = {fit.b1 - ci.t * fit.se_b1, fit.b1 + ci.t * fit.se_b1};
  if (fit.model == Model::line) ci.b0 = {fit.b0 - ci.t * fit.se_b0, fit.b0 + ci.t * fit.se_b0};
  return ci;
}

namespace {

// Quadratic form d' S^-1 d for a symmetric positive definite 2x2 matrix S = [a c; c b].
double quadratic_form_2x2(double d0, double d1, double a, double b, double c) {
  const double det = a * b - c * c;
  if (!(det > 0)) return std::numeric_limits<double>::infinity();
  return (b * d0 * d0 - 2.0 * c * d0 * d1 + a * d1 * d1) / det;
}

}  // namespace

CertificateVerdict judge_against_certificate(const LineFit& fit, const CertifiedLine& cert,
                                             const TwoSidedT& t, bool widen) {
  CertificateVerdict v;
  const double tc = t.critical_value(fit.dof);
  const double u_slope = widen ? cert.u_slope : 0.0;
  const double u_int = widen ? cert.u_intercept : 0.0;
  const double cov_cert = widen ? cert.cov : 0.0;
  v.slope_deviation = fit.b1 - cert.slope;
  v.slope_limit = tc * std::sqrt(fit.se_b1 * fit.se_b1 + u_slope * u_slope);
  v.slope_consistent = std::abs(v.slope_deviation) <= v.slope_limit;
  if (fit.model == Model::through_origin) {
    v.intercept_deviation = 0;
    v.intercept_limit = 0;
    v.joint_statistic = v.slope_limit > 0 ? std::pow(v.slope_deviation / (v.slope_limit / tc), 2) : 0;
    v.joint_critical = tc * tc;
    v.joint_consistent = v.slope_consistent;
    return v;
  }
  v.intercept_deviation = fit.b0 - cert.intercept;
  v.intercept_limit = tc * std::sqrt(fit.se_b0 * fit.se_b0 + u_int * u_int);
  v.intercept_consistent = std::abs(v.intercept_deviation) <= v.intercept_limit;

  // About the centroid the fitted level a = mean_y and slope b1 are uncorrelated:
  // Var(a) = s^2 / sum_w, Var(b1) = s^2 / Sxx. The certified line's level there is
  // a* = intercept* + slope* mean_x, with Var(a*) = u0^2 + mean_x^2 u1^2 + 2 mean_x cov.
  const double xm = fit.mean_x;
  const double s2 = fit.s * fit.s;
  const double d_level = fit.mean_y - (cert.intercept + cert.slope * xm);
  const double d_slope = v.slope_deviation;
  const double var_level = s2 / fit.sum_w + u_int * u_int + xm * xm * u_slope * u_slope + 2.0 * xm * cov_cert;
  const double var_slope = s2 / fit.sxx + u_slope * u_slope;
  const double cov_ls = xm * u_slope * u_slope + cov_cert;
  double q = quadratic_form_2x2(d_level, d_slope, var_level, var_slope, cov_ls);
  if (std::isinf(q) && d_level == 0 && d_slope == 0) q = 0;  // a perfect fit that matches exactly
  v.joint_statistic = 0.5 * q;
  v.joint_critical = t.joint_critical_value(fit.dof);
  v.joint_consistent = v.joint_statistic <= v.joint_critical;
  return v;
}

Interval confidence_interval_at(const LineFit& fit, double x, const TwoSidedT& t) {
  const double y = fit.predict(x);
  const double half = t.critical_value(fit.dof) * fit.s * std::sqrt(fit.leverage(x));
  return {y - half, y + half};
}

Interval prediction_interval_at(const LineFit& fit, double x, const TwoSidedT& t) {
  const double y = fit.predict(x);
  const double half = t.critical_value(fit.dof) * fit.s * std::sqrt(1.0 + fit.leverage(x));
  return {y - half, y + half};
}

Result<InversePrediction> inverse_predict(const LineFit& fit, double y_mean, double m, const TwoSidedT& t) {
  if (fit.b1 == 0) return Error{"fitted slope is zero: sensor readings do not depend on the reference value"};
  InversePrediction ip;
  ip.m = m;
  const bool line = fit.model == Model::line;
  const double centre = line ? fit.mean_x : 0.0;
  const double level = line ? fit.mean_y : 0.0;
  const double d_hat = (y_mean - level) / fit.b1;  // x_hat - centre
  ip.x_hat = centre + d_hat;
  const double s_over_b = fit.s / std::abs(fit.b1);
  const double base = line ? 1.0 / fit.sum_w : 0.0;
  const double cal_factor = base + d_hat * d_hat / fit.sxx;
  ip.u_repeatability = s_over_b / std::sqrt(m);
  ip.u_calibration = s_over_b * std::sqrt(cal_factor);
  ip.u = s_over_b * std::sqrt(1.0 / m + cal_factor);
  const double tc = t.critical_value(fit.dof);
  ip.delta = {ip.x_hat - tc * ip.u, ip.x_hat + tc * ip.u};

  // Fieller: {x0 : (y_mean - yhat(x0))^2 <= t^2 s^2 (1/m + base + (x0 - centre)^2 / Sxx)}.
  ip.fieller_g = tc * tc * s_over_b * s_over_b / fit.sxx;
  if (ip.fieller_g < 1.0) {
    const double one_minus_g = 1.0 - ip.fieller_g;
    const double root = tc * s_over_b * std::sqrt(one_minus_g * (1.0 / m + base) + d_hat * d_hat / fit.sxx);
    ip.fieller_bounded = true;
    ip.fieller = {centre + (d_hat - root) / one_minus_g, centre + (d_hat + root) / one_minus_g};
  }
  return ip;
}

}  // namespace rigcal::stats
