#include "rigcal/metrology/corrected_value_budget.hpp"

#include <cmath>
#include <limits>

#include "number_text.hpp"

namespace rigcal::metrology {

namespace {

constexpr double infinity = std::numeric_limits<double>::infinity();

Status check_inputs(double y_mean, double m, const CorrectedValueInputs& inputs) {
  if (!std::isfinite(y_mean)) {
    return Error{"corrected value: mean sensor reading is not a finite number (" +
                 detail::number_text(y_mean) + ")"};
  }
  if (!(std::isfinite(m) && m >= 1)) {
    return Error{"corrected value: number of averaged readings must be a finite number >= 1, got " +
                 detail::number_text(m)};
  }
  if (!(std::isfinite(inputs.resolution) && inputs.resolution >= 0)) {
    return Error{"corrected value: sensor resolution must be a finite number >= 0, got " +
                 detail::number_text(inputs.resolution)};
  }
  return check_reference_standard(inputs.reference);
}

std::vector<UncertaintyComponent> components(const stats::LineFit& fit, const stats::InversePrediction& ip,
                                             const CorrectedValueInputs& inputs) {
  std::vector<UncertaintyComponent> c;
  c.reserve(4 + inputs.further.size());
  c.push_back({"repeatability of the mean reading", EvaluationType::type_a, ip.u_repeatability, 1.0, fit.dof,
               fit_dof_source});
  c.push_back({"calibration line", EvaluationType::type_a, ip.u_calibration, 1.0, fit.dof, fit_dof_source});
  c.push_back(
      {"reference standard", EvaluationType::type_b, inputs.reference.u, 1.0, inputs.reference.dof, ""});
  c.push_back({"sensor resolution", EvaluationType::type_b, inputs.resolution / std::sqrt(12.0),
               1.0 / std::abs(fit.b1), infinity, ""});
  c.insert(c.end(), inputs.further.begin(), inputs.further.end());
  return c;
}

}  // namespace

Result<CorrectedValue> corrected_value(const stats::LineFit& fit, double y_mean, double m,
                                       const CorrectedValueInputs& inputs, const stats::TwoSidedT& t) {
  if (auto s = check_inputs(y_mean, m, inputs); !s) return s.error();
  auto ip = stats::inverse_predict(fit, y_mean, m, t);
  if (!ip) return Error{"corrected value: " + ip.error().message};
  const auto parts = components(fit, *ip, inputs);
  auto budget = combine_uncertainties(parts, t);
  if (!budget) return Error{"corrected value: " + budget.error().message};
  return CorrectedValue{ip->x_hat, *ip, std::move(budget).value()};
}

}  // namespace rigcal::metrology
