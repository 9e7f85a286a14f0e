#pragma once
// The realistic setting, one false alert a year at one pair per second (ARL0 = 3.15e7 pairs), is far
// beyond Monte Carlo in bounded time. Its ARL0 is therefore stated from the designs, which the ARL
// solvers (detect/arl.hpp) compute to 1e-9 relative for the CUSUM and 1e-4 for the EWMA under the
// designs' assumptions; this reads the designs back from a real engine and evaluates their zero-state
// ARL1 for offset steps (a pure offset change shifts the offset innovation's mean by exactly the step in
// sigma and leaves the slope innovation alone, so the solvers apply exactly).
#include <cstdint>
#include <string>
#include <vector>

#include "rigcal/engine/engine_tables.hpp"
#include "study.hpp"

namespace rigcal::study {

// The engine's design for `setting` (after its learning phase on an in-control stream), and the
// analytic ARL1 in pairs from the start of monitoring for each offset step (in sigma): the offset CUSUM
// or EWMA's two-sided ARL at that mean; for the anytime test the pairs its design rule needs
// (anytime_detection_pairs).
RealisticDesign realistic_design(const StudyChannel& channel, const std::string& label, const DetectorSetting& setting,
                                 const std::vector<double>& offset_steps_sigma, std::uint64_t seed,
                                 engine::EngineTables& tables);

// Channel ARL0 in pairs of a CUSUM or EWMA design when the configured sigma is `factor` times the true
// one (i.i.d. normal noise): the innovations are then N(0, 1 / factor^2), which for the CUSUM is the
// standard chart with k and h multiplied by factor, for the EWMA the one with L multiplied by factor. The
// offset and slope detectors combine as 1/ARL0 = 1/ARL0_offset + 1/(2 ARL0_slope), the design's rule.
double misconfigured_arl0(const engine::DriftDesign& design, double factor);

// The design rule of mixture.hpp for a change of length delta: the t at which
// (1/2) rho^2 t^2 delta^2 / (1 + rho^2 t) - log(1 + rho^2 t) reaches log(1/alpha), the drift replacing
// the noise and V_t ~ t I. Measured from the test's reset; +inf if not reached within 1e12 pairs.
double anytime_detection_pairs(double alpha, double rho, double delta);

}  // namespace rigcal::study
