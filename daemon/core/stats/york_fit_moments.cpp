// The York fit in closed form from streaming moments, for constant uncorrelated uncertainties.
//
// Derivation. Pair i, of precision weight w_i, has uncertainties u_x/sqrt(w_i) and u_y/sqrt(w_i), so
// York's w(X_i) = w_i/u_x^2, w(Y_i) = w_i/u_y^2 and (York 2004 eq. 4 with r = 0)
//   W_i = w_i / D,   D = u_y^2 + b^2 u_x^2.
// W_i is proportional to w_i, so the W-weighted means are the moments' means and U_i, V_i the
// deviations that cxx = sum w U^2, cxy = sum w U V, cyy = sum w V^2 are built from. Then
//   beta_i = W_i (U_i / w(Y_i) + b V_i / w(X_i)) = (u_y^2 U_i + b u_x^2 V_i) / D
// is linear in U_i, V_i, and every sum York needs is a combination of the co-moments:
//   sum W beta V = (u_y^2 cxy + b u_x^2 cyy) / D^2,   sum W beta U = (u_y^2 cxx + b u_x^2 cxy) / D^2.
//
// Slope. The fixed point b = sum W beta V / sum W beta U is, with lambda = u_y^2 / u_x^2,
//   cxy b^2 + (lambda cxx - cyy) b - lambda cxy = 0,
// the equation of Deming's regression. Of its two roots York's iteration is attracted to the one with
// the sign of cxy, which minimises S (the slopes of the iteration map at the two roots multiply to 1,
// and this root's is the smaller). With b = b_ols + d, b_ols = cxy/cxx and e = ssr/cxx, where
// ssr = cyy - cxy^2/cxx is the moments' own well-conditioned residual sum, the equation becomes
//   b_ols d^2 + (b_ols^2 + lambda - e) d - b_ols e = 0,
// solved below without cancellation. d is the correction of OLS's attenuation; it and S stay accurate
// when the points lie close to a line, where cyy - 2 b cxy + b^2 cxx would cancel.
//
// Uncertainties. sum W beta = 0 (U and V are centred), so the adjusted points' mean xbar is the mean of
// the reference values and York's u_i equals beta_i:
//   sum W u^2 = (u_y^4 cxx + 2 b u_x^2 u_y^2 cxy + b^2 u_x^4 cyy) / D^3, hence
//   u_b^2 = u_x^2 (lambda + b^2)^3 / (lambda^2 cxx + 2 b lambda cxy + b^2 cyy)
// (every term of the denominator is >= 0 because b cxy >= 0), sum W = sum_w / D and
// u_a^2 = D / sum_w + xbar^2 u_b^2.
// Chi-square. S = sum W (V - b U)^2 = (cyy - 2 b cxy + b^2 cxx) / D = (ssr + cxx d^2) / D.
#include <cmath>
#include <optional>
#include <string>

#include "rigcal/stats/york_fit.hpp"
#include "york_fit_common.hpp"

namespace rigcal::stats {

namespace {

// Root with the sign of b_ols of b_ols d^2 + h d - b_ols e = 0, h = b_ols^2 + lambda - e. The two
// forms are the same root (the roots multiply to -e); each is used where it does not cancel. Empty
// when b_ols = 0 and lambda <= e: the sensor readings do not follow the reference values and the
// minimum of S is a vertical line (or S does not depend on the slope at all).
std::optional<double> deming_correction(double b_ols, double lambda, double e) {
  const double h = b_ols * b_ols + lambda - e;
  const double disc = std::hypot(h, 2.0 * b_ols * std::sqrt(e));
  if (h > 0) return 2.0 * b_ols * e / (h + disc);
  if (b_ols == 0) return std::nullopt;
  return (disc - h) / (2.0 * b_ols);
}

}  // namespace

Result<YorkFit> york_fit_from_moments(const LineMoments& m, double u_x, double u_y) {
  if (!(u_x > 0) || !std::isfinite(u_x) || !(u_y > 0) || !std::isfinite(u_y))
    return Error{"York fit: u_x and u_y must be positive and finite"};
  // Effective sample size and weight scale under forgetting, as in summarize() (line_fit.hpp).
  double n = m.a2 > 0 ? m.a1 * m.a1 / m.a2 : 0;
  if (m.a1 == m.a2) n = m.a1;
  const double k = m.a2 > 0 ? m.a1 / m.a2 : 1.0;
  if (m.count < 3 || !(n - 2 > 0)) {
    const std::string have = m.a1 == m.a2 ? std::to_string(m.count) : std::to_string(n) + " effective";
    return Error{"too few pairs for a York fit: have " + have + ", need at least 3"};
  }
  if (!(m.cxx > 0))
    return Error{"no spread in the reference values: every pair has the same reference value"};

  const double ratio = u_y / u_x;
  const double lambda = ratio * ratio;
  const double b_ols = m.cxy / m.cxx;
  const double e = m.ssr / m.cxx;
  const std::optional<double> d = deming_correction(b_ols, lambda, e);
  if (!d)
    return Error{"York fit: slope undetermined (the best line is vertical or the data fix no direction)"};
  const double b = b_ols + *d;

  const double d_over_ux2 = lambda + b * b;  // D / u_x^2
  const double big_d = u_x * u_x * d_over_ux2;
  const double q = lambda * lambda * m.cxx + 2.0 * b * lambda * m.cxy + b * b * m.cyy;
  detail::YorkSolution s;
  s.count = m.count;
  s.dof = n - 2;
  s.b = b;
  // The large cancellation (shift_y - b shift_x) is kept apart from the small one.
  s.a = (m.shift_y - b * m.shift_x) + (m.dmean_y - b * m.dmean_x);
  s.var_b = u_x * u_x * d_over_ux2 * d_over_ux2 * d_over_ux2 / (k * q);
  s.sum_weights = k * m.sum_w / big_d;
  s.mean_x_adjusted = m.shift_x + m.dmean_x;
  s.mean_y_adjusted = m.shift_y + m.dmean_y;
  s.chi_square = k * (m.ssr + m.cxx * *d * *d) / big_d;
  return detail::complete_york_fit(s);
}

LineFit line_fit_from_york(const YorkFit& york, double u_sensor) {
  LineFit f;
  f.model = Model::line;
  f.count = york.count;
  f.dof = york.dof;
  f.n = york.dof + 2;
  f.b0 = york.a;
  f.b1 = york.b;
  f.s = u_sensor;
  f.se_b0 = york.u_a;
  f.se_b1 = york.u_b;
  f.cov_b0_b1 = york.cov_ab;
  f.corr_b0_b1 = york.corr_ab;
  f.mean_x = york.mean_x_adjusted;
  f.mean_y = york.mean_y_adjusted;
  const double s2 = u_sensor * u_sensor;
  f.sum_w = s2 * york.sum_weights;
  f.sxx = york.u_b > 0 ? s2 / (york.u_b * york.u_b) : 0.0;
  f.ssr = york.chi_square * s2;
  return f;
}

}  // namespace rigcal::stats
