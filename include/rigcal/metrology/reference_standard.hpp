#pragma once
// The reference standard's own uncertainty, as its calibration certificate states it, in the
// reference (x) scale. It is Type B for rigcal (GUM 4.3): evaluated by the issuing laboratory, not
// from rigcal's data, and common to every pair and every snapshot taken against the same standard.
#include <limits>

#include "rigcal/result.hpp"

namespace rigcal::metrology {

struct ReferenceStandardUncertainty {
  double u = 0;  // standard uncertainty, reference units; 0 when the certificate is not stated
  // Degrees of freedom of u. A certificate quoting k = 2 for about 95 % without a dof is taken to
  // have nu large enough to count as infinite (GUM G.6.6); one with a small nu states it.
  double dof = std::numeric_limits<double>::infinity();
};

// u = U / k from a certificate's expanded uncertainty U (>= 0) and coverage factor k (> 0).
// Error if either is not finite or out of range, or dof is not > 0.
Result<ReferenceStandardUncertainty> reference_from_certificate(
    double expanded_uncertainty, double coverage_factor,
    double dof = std::numeric_limits<double>::infinity());

// Ok if u is finite and >= 0 and dof > 0 (or infinite).
Status check_reference_standard(const ReferenceStandardUncertainty& reference);

}  // namespace rigcal::metrology
