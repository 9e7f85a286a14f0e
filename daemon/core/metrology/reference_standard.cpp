#include "rigcal/metrology/reference_standard.hpp"

#include <cmath>

#include "number_text.hpp"

namespace rigcal::metrology {

Result<ReferenceStandardUncertainty> reference_from_certificate(double expanded_uncertainty,
                                                                double coverage_factor, double dof) {
  if (!(std::isfinite(expanded_uncertainty) && expanded_uncertainty >= 0)) {
    return Error{"reference standard: expanded uncertainty must be a finite number >= 0, got " +
                 detail::number_text(expanded_uncertainty)};
  }
  if (!(std::isfinite(coverage_factor) && coverage_factor > 0)) {
    return Error{"reference standard: coverage factor must be a finite number > 0, got " +
                 detail::number_text(coverage_factor)};
  }
  ReferenceStandardUncertainty r{expanded_uncertainty / coverage_factor, dof};
  if (auto s = check_reference_standard(r); !s) return s.error();
  return r;
}

Status check_reference_standard(const ReferenceStandardUncertainty& reference) {
  if (!(std::isfinite(reference.u) && reference.u >= 0)) {
    return Error{"reference standard: standard uncertainty must be a finite number >= 0, got " +
                 detail::number_text(reference.u)};
  }
  if (!(reference.dof > 0)) {
    return Error{"reference standard: degrees of freedom must be > 0 (or infinite), got " +
                 detail::number_text(reference.dof)};
  }
  return ok_status();
}

}  // namespace rigcal::metrology
