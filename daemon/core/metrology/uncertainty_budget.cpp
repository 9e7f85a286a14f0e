#include "rigcal/metrology/uncertainty_budget.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "number_text.hpp"

namespace rigcal::metrology {

namespace {

constexpr double infinity = std::numeric_limits<double>::infinity();

bool valid_dof(double dof) { return dof > 0; }  // false for NaN; +infinity allowed

Status check_component(const UncertaintyComponent& c) {
  const std::string what = "uncertainty component '" + c.name + "': ";
  if (!(std::isfinite(c.u) && c.u >= 0)) {
    return Error{what + "standard uncertainty must be a finite number >= 0, got " + detail::number_text(c.u)};
  }
  if (!std::isfinite(c.sensitivity)) {
    return Error{what + "sensitivity coefficient must be finite, got " + detail::number_text(c.sensitivity)};
  }
  if (!valid_dof(c.dof)) {
    return Error{what + "degrees of freedom must be > 0 (or infinite), got " + detail::number_text(c.dof)};
  }
  return ok_status();
}

// One Welch-Satterthwaite term per independent variance estimate: components sharing a dof source
// are summed in variance (their contributions add in quadrature) and keep their common dof.
Result<std::vector<DofTerm>> pooled_terms(std::span<const UncertaintyComponent> components) {
  std::vector<DofTerm> terms;
  std::map<std::string, std::size_t> source_index;
  for (const auto& c : components) {
    const double contribution = std::abs(c.sensitivity) * c.u;
    if (c.dof_source.empty()) {
      terms.push_back({contribution, c.dof});
      continue;
    }
    const auto [it, inserted] = source_index.try_emplace(c.dof_source, terms.size());
    if (inserted) {
      terms.push_back({contribution, c.dof});
      continue;
    }
    DofTerm& pooled = terms[it->second];
    if (pooled.dof != c.dof) {
      return Error{"uncertainty components of dof source '" + c.dof_source +
                   "' have different degrees of freedom (" + detail::number_text(pooled.dof) + " and " +
                   detail::number_text(c.dof) + "); one variance estimate has one dof"};
    }
    pooled.contribution = std::hypot(pooled.contribution, contribution);
  }
  return terms;
}

}  // namespace

Result<double> welch_satterthwaite(std::span<const DofTerm> terms) {
  double largest = 0;
  for (const auto& term : terms) {
    if (!(std::isfinite(term.contribution) && term.contribution >= 0)) {
      return Error{"Welch-Satterthwaite: contribution must be a finite number >= 0, got " +
                   detail::number_text(term.contribution)};
    }
    if (!valid_dof(term.dof)) {
      return Error{"Welch-Satterthwaite: degrees of freedom must be > 0 (or infinite), got " +
                   detail::number_text(term.dof)};
    }
    largest = std::max(largest, term.contribution);
  }
  if (largest == 0) return infinity;
  double sum_r2 = 0;       // u_c^2 / largest^2
  double sum_r4_over = 0;  // sum (u_i / largest)^4 / nu_i
  for (const auto& term : terms) {
    const double r2 = (term.contribution / largest) * (term.contribution / largest);
    sum_r2 += r2;
    if (std::isfinite(term.dof)) sum_r4_over += r2 * r2 / term.dof;
  }
  if (sum_r4_over == 0) return infinity;
  return sum_r2 * sum_r2 / sum_r4_over;
}

Result<UncertaintyBudget> combine_uncertainties(std::span<const UncertaintyComponent> components,
                                                const stats::TwoSidedT& t) {
  if (components.empty()) return Error{"uncertainty budget: no components"};
  for (const auto& c : components) {
    if (auto s = check_component(c); !s) return s.error();
  }
  auto terms = pooled_terms(components);
  if (!terms) return terms.error();
  auto nu = welch_satterthwaite(*terms);
  if (!nu) return nu.error();

  UncertaintyBudget b;
  b.lines.reserve(components.size());
  double variance = 0;
  for (const auto& c : components) {
    BudgetLine line{c.name, c.type, c.u, c.sensitivity, std::abs(c.sensitivity) * c.u, c.dof, 0};
    variance += line.contribution * line.contribution;
    b.lines.push_back(std::move(line));
  }
  b.u_c = std::sqrt(variance);
  if (!std::isfinite(b.u_c))
    return Error{"uncertainty budget: combined uncertainty overflows double precision"};
  for (auto& line : b.lines) {
    line.variance_share_percent =
        b.u_c > 0 ? 100.0 * (line.contribution / b.u_c) * (line.contribution / b.u_c) : 0;
  }
  b.nu_eff = *nu;
  if (b.nu_eff < 1) {
    return Error{"uncertainty budget: effective degrees of freedom " + detail::number_text(b.nu_eff) +
                 " < 1, so no finite coverage factor exists"};
  }
  b.coverage_probability = t.confidence();
  b.k = t.critical_value(b.nu_eff);
  b.expanded = b.k * b.u_c;
  return b;
}

}  // namespace rigcal::metrology
