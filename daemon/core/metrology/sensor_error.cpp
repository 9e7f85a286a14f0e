#include "rigcal/metrology/sensor_error.hpp"

#include <array>
#include <cmath>

#include "number_text.hpp"
#include "rigcal/metrology/uncertainty_budget.hpp"

namespace rigcal::metrology {

Result<SensorError> sensor_error_at(const stats::LineFit& fit, const stats::CertifiedLine& certificate,
                                    const ReferenceStandardUncertainty& reference, double x,
                                    const stats::TwoSidedT& t) {
  if (!std::isfinite(x)) return Error{"sensor error: reference value is not a finite number"};
  if (!(std::isfinite(certificate.slope) && certificate.slope != 0 && std::isfinite(certificate.intercept))) {
    return Error{
        "sensor error: the certificate line must have a finite intercept and a finite, non-zero slope, got "
        "intercept " +
        detail::number_text(certificate.intercept) + ", slope " + detail::number_text(certificate.slope)};
  }
  if (auto s = check_reference_standard(reference); !s) return Error{"sensor error: " + s.error().message};

  SensorError e;
  e.x = x;
  const double inv_slope = 1.0 / std::abs(certificate.slope);
  e.error = (fit.predict(x) - certificate.intercept) / certificate.slope - x;
  e.u_fit = fit.s * std::sqrt(fit.leverage(x)) * inv_slope;
  e.u_reference = std::abs(fit.b1) * inv_slope * reference.u;
  e.u = std::hypot(e.u_fit, e.u_reference);
  const std::array<DofTerm, 2> terms{DofTerm{e.u_fit, fit.dof}, DofTerm{e.u_reference, reference.dof}};
  auto nu = welch_satterthwaite(terms);
  if (!nu) return Error{"sensor error: " + nu.error().message};
  if (*nu < 1)
    return Error{"sensor error: effective degrees of freedom " + detail::number_text(*nu) + " < 1"};
  e.dof = *nu;
  e.k = t.critical_value(e.dof);
  e.expanded = e.k * e.u;
  if (!(std::isfinite(e.error) && std::isfinite(e.u))) {
    return Error{"sensor error: the error or its uncertainty overflows double precision at x = " +
                 detail::number_text(x)};
  }
  return e;
}

}  // namespace rigcal::metrology
