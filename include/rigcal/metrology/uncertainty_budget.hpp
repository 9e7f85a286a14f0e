#pragma once
// GUM uncertainty budgets (JCGM 100:2008): independent input components combined into a combined
// standard uncertainty u_c, its effective degrees of freedom nu_eff and an expanded uncertainty U.
//
//  - combination, GUM 5.1.2 eq. (10) for uncorrelated inputs: u_c^2 = sum (c_i u(x_i))^2;
//  - effective degrees of freedom, Welch-Satterthwaite, GUM G.4.1 eq. (G.2b):
//      nu_eff = u_c^4 / sum (c_i u(x_i))^4 / nu_i;   a component with nu_i = infinity adds nothing;
//  - coverage factor k = t_p(nu_eff), GUM G.4.1 / G.6.4, with nu_eff truncated to the next lower
//    integer (TwoSidedT does this); U = k u_c.
//
// Coverage probability: the caller's TwoSidedT fixes p. 0.95 gives the usual 95 % interval; GUM's
// k = 2 convention is p = 0.9545 (k = 2.000 at nu = infinity, GUM Table G.1).
//
// Components estimated from the same data are not independent variance estimates. The inverse
// prediction through a fitted line, for instance, splits into a repeatability and a calibration part
// that both scale with the one residual variance s^2 (nu = n - 2). Listed as two independent lines,
// Welch-Satterthwaite would credit them with up to 2 (n - 2) degrees of freedom. Such components name
// the same `dof_source`: their variances are summed into one Welch-Satterthwaite term with that
// common nu. They still appear as separate budget lines.
//
// Correlated inputs (GUM 5.2) are not supported; callers combine correlated parts beforehand.
#include <limits>
#include <span>
#include <string>
#include <vector>

#include "rigcal/result.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::metrology {

inline constexpr double coverage_95 = 0.95;
// GUM's k = 2 convention: the two-sided normal coverage of +-2 standard deviations (GUM Table G.1).
inline constexpr double coverage_k2 = 0.9545;

enum class EvaluationType { type_a, type_b };  // GUM 4.2 (statistical) / 4.3 (other means)

// One input of a budget.
struct UncertaintyComponent {
  std::string name;
  EvaluationType type = EvaluationType::type_b;
  double u = 0;            // standard uncertainty u(x_i) in the input's own unit; >= 0
  double sensitivity = 1;  // c_i = d(output)/d(input); output units per input unit
  double dof = std::numeric_limits<double>::infinity();  // nu_i > 0; infinity for a known bound
  std::string dof_source;  // empty: an independent estimate; otherwise see the header comment
};

// One line of the finished budget, in output units.
struct BudgetLine {
  std::string name;
  EvaluationType type = EvaluationType::type_b;
  double u = 0;
  double sensitivity = 1;
  double contribution = 0;  // |c_i| u(x_i)
  double dof = 0;
  double variance_share_percent = 0;  // 100 contribution^2 / u_c^2 (0 when u_c is 0)
};

struct UncertaintyBudget {
  std::vector<BudgetLine> lines;  // in the order given
  double u_c = 0;                 // combined standard uncertainty
  double nu_eff = 0;              // Welch-Satterthwaite, not truncated; may be +infinity
  double coverage_probability = 0;
  double k = 0;         // t_p(floor(nu_eff))
  double expanded = 0;  // U = k u_c
};

// A Welch-Satterthwaite term: a contribution |c_i| u(x_i) in output units and its nu_i.
struct DofTerm {
  double contribution = 0;
  double dof = 0;
};

// GUM eq. (G.2b). Infinite-dof terms drop out of the denominator; when every term has infinite
// dof, or every contribution is zero, the result is +infinity (nothing statistical to be unsure of).
// Computed on contributions scaled by the largest one, so that u^4 neither underflows nor overflows.
// Error: a negative or non-finite contribution, or a dof that is not > 0.
Result<double> welch_satterthwaite(std::span<const DofTerm> terms);

// The budget of a set of independent components (pooling shared dof sources as described above).
// Error: no components; a u that is negative or not finite; a non-finite sensitivity; a dof that is
// not > 0; members of one dof_source with different dof; nu_eff < 1 (no finite coverage factor).
Result<UncertaintyBudget> combine_uncertainties(std::span<const UncertaintyComponent> components,
                                                const stats::TwoSidedT& t);

}  // namespace rigcal::metrology
