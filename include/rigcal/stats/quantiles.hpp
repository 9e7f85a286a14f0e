#pragma once
// Critical values of Student's t and of F(2, nu), cached so that the per-pair path never evaluates a
// distribution quantile.
#include <vector>

namespace rigcal::stats {

// Upper quantile t_p(nu) of Student's t, evaluated directly with Boost.Math (slow: microseconds).
// REQUIRES: 0 < p < 1, nu > 0 (nu may be non-integer; +inf gives the normal quantile).
double student_t_quantile(double p, double nu);

// Upper quantile z_p of the standard normal distribution.
double normal_quantile(double p);

// F_{1-alpha}(2, nu): exact closed form (nu/2)(alpha^(-2/nu) - 1), the critical value of the joint
// confidence region of a straight line's intercept and slope. REQUIRES: 0 < alpha < 1, nu > 0.
double f2_critical_value(double alpha, double nu);

// Two-sided Student t critical values for one confidence level, for any number of degrees of freedom.
//
// nu <= exact_table_limit: exact values computed with Boost.Math at construction (a few milliseconds).
// nu >  exact_table_limit: the asymptotic expansion of t in powers of 1/nu (Abramowitz & Stegun 26.7.5,
// terms to nu^-4); at nu > 4096 its truncation error is below 1e-15 relative (checked in the tests).
// Non-integer nu (exponential forgetting, Welch-Satterthwaite) is truncated to the next lower integer,
// as GUM G.4.1 advises; that is conservative (a slightly wider interval).
class TwoSidedT {
 public:
  static constexpr int exact_table_limit = 4096;

  // REQUIRES: 0 < confidence < 1 (e.g. 0.95 for a 95 % two-sided interval).
  explicit TwoSidedT(double confidence);

  double confidence() const { return confidence_; }
  // Critical value t such that P(|T_nu| <= t) = confidence. nu < 1 gives +infinity.
  double critical_value(double nu) const;
  // F_{confidence}(2, nu) for the joint region of intercept and slope (same truncation of nu).
  double joint_critical_value(double nu) const;

 private:
  double confidence_;
  double z_;  // normal quantile, the nu -> infinity limit
  std::vector<double> table_;  // table_[nu - 1] for nu = 1 .. exact_table_limit
  std::vector<double> f2_table_;  // F(2, nu) likewise
};

}  // namespace rigcal::stats
