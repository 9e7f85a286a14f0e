#include "rigcal/stats/quantiles.hpp"

#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <limits>

namespace rigcal::stats {

double student_t_quantile(double p, double nu) {
  if (std::isinf(nu)) return normal_quantile(p);
  return boost::math::quantile(boost::math::students_t_distribution<double>(nu), p);
}

double normal_quantile(double p) {
  return boost::math::quantile(boost::math::normal_distribution<double>(), p);
}

double f2_critical_value(double alpha, double nu) {
  // expm1 keeps the digits when nu is large and alpha^(-2/nu) is close to 1.
  return 0.5 * nu * std::expm1(-2.0 / nu * std::log(alpha));
}

namespace {
// Abramowitz & Stegun 26.7.5: t_p(nu) = x + g1/nu + g2/nu^2 + g3/nu^3 + g4/nu^4 + ..., x = z_p.
double t_asymptotic(double x, double nu) {
  const double x2 = x * x;
  const double g1 = (x2 + 1.0) * x / 4.0;
  const double g2 = ((5.0 * x2 + 16.0) * x2 + 3.0) * x / 96.0;
  const double g3 = (((3.0 * x2 + 19.0) * x2 + 17.0) * x2 - 15.0) * x / 384.0;
  const double g4 = ((((79.0 * x2 + 776.0) * x2 + 1482.0) * x2 - 1920.0) * x2 - 945.0) * x / 92160.0;
  const double u = 1.0 / nu;
  return x + u * (g1 + u * (g2 + u * (g3 + u * g4)));
}
}  // namespace

TwoSidedT::TwoSidedT(double confidence)
    : confidence_(confidence), z_(normal_quantile(0.5 + 0.5 * confidence)) {
  const double p = 0.5 + 0.5 * confidence;
  table_.reserve(exact_table_limit);
  f2_table_.reserve(exact_table_limit);
  for (int nu = 1; nu <= exact_table_limit; ++nu) {
    table_.push_back(student_t_quantile(p, nu));
    f2_table_.push_back(f2_critical_value(1.0 - confidence, nu));
  }
}

double TwoSidedT::joint_critical_value(double nu) const {
  if (!(nu >= 1.0)) return std::numeric_limits<double>::infinity();
  if (std::isinf(nu)) return -std::log(1.0 - confidence_);  // chi^2(2)/2 limit
  if (nu <= exact_table_limit) return f2_table_[static_cast<std::size_t>(nu) - 1];
  return f2_critical_value(1.0 - confidence_, std::floor(nu));
}

double TwoSidedT::critical_value(double nu) const {
  if (!(nu >= 1.0)) return std::numeric_limits<double>::infinity();
  if (std::isinf(nu)) return z_;
  if (nu <= exact_table_limit) return table_[static_cast<std::size_t>(nu) - 1];
  return t_asymptotic(z_, std::floor(nu));
}

}  // namespace rigcal::stats
