#include "york_fit_common.hpp"

#include <boost/math/distributions/chi_squared.hpp>
#include <cmath>

namespace rigcal::stats {

double YorkFit::u_predict(double x) const {
  const double d = x - mean_x_adjusted;
  return std::sqrt(1.0 / sum_weights + d * d * u_b * u_b);
}

namespace detail {

namespace {
bool all_finite(const YorkFit& f) {
  for (double v :
       {f.a, f.b, f.u_a, f.u_b, f.cov_ab, f.corr_ab, f.chi_square, f.reduced_chi_square, f.p_value,
        f.u_a_scaled, f.u_b_scaled, f.cov_ab_scaled, f.mean_x_adjusted, f.mean_y_adjusted, f.sum_weights})
    if (!std::isfinite(v)) return false;
  return f.sum_weights > 0;
}
}  // namespace

Result<YorkFit> complete_york_fit(const YorkSolution& s) {
  const Error overflow{"York fit overflows double precision: readings or weights too large in magnitude"};
  // Checked before Boost.Math sees S: its distributions throw on non-finite arguments.
  if (!std::isfinite(s.chi_square) || !std::isfinite(s.var_b) || !(s.sum_weights > 0)) return overflow;
  YorkFit f;
  f.count = s.count;
  f.dof = s.dof;
  f.a = s.a;
  f.b = s.b;
  f.sum_weights = s.sum_weights;
  f.mean_x_adjusted = s.mean_x_adjusted;
  f.mean_y_adjusted = s.mean_y_adjusted;
  f.iterations = s.iterations;
  // York (2004) eq. (13): the intercept's variance is that of the line at xbar plus the slope's
  // lever arm to x = 0; the same arm gives the (negative, for xbar > 0) covariance.
  const double xbar = s.mean_x_adjusted;
  f.u_b = std::sqrt(s.var_b);
  f.u_a = std::sqrt(1.0 / s.sum_weights + xbar * xbar * s.var_b);
  f.cov_ab = -xbar * s.var_b;
  f.corr_ab = f.u_a > 0 && f.u_b > 0 ? f.cov_ab / (f.u_a * f.u_b) : 0.0;

  f.chi_square = s.chi_square;
  f.reduced_chi_square = s.chi_square / s.dof;
  // Upper tail of chi^2(dof) at S: ISO/TS 28037's check that the data are consistent with the line
  // and the stated uncertainties.
  f.p_value = boost::math::cdf(
      boost::math::complement(boost::math::chi_squared_distribution<double>(s.dof), s.chi_square));
  const double scale = std::sqrt(f.reduced_chi_square);
  f.u_a_scaled = scale * f.u_a;
  f.u_b_scaled = scale * f.u_b;
  f.cov_ab_scaled = f.reduced_chi_square * f.cov_ab;
  if (!all_finite(f)) return overflow;
  return f;
}

}  // namespace detail
}  // namespace rigcal::stats
