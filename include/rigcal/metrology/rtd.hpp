#pragma once
// Platinum resistance thermometers (Pt100, Pt1000, any R0) by the Callendar-Van Dusen equation of
// IEC 60751:2008 (also ASTM E1137, DIN EN 60751):
//   R(t) = R0 (1 + A t + B t^2 + C (t - 100) t^3)   for -200 degC <= t < 0 degC
//   R(t) = R0 (1 + A t + B t^2)                      for    0 degC <= t <= 850 degC
// The IEC coefficients are the defaults of CvdCoefficients; a calibrated sensor brings its own.
//
// Error bounds of this implementation (the equation itself is the definition; the IEC table is R(t)
// rounded to 0.01 ohm and is reproduced at every check point in the tests):
//   - forward: rounding only (relative ~1e-16);
//   - inverse for R >= R0: closed-form root of the quadratic, written without cancellation;
//     measured round-trip error below 1e-12 degC;
//   - inverse for R < R0: safeguarded Newton iteration on the quartic, started from the quadratic
//     root, stopped once the Newton step is below 1e-9 degC (that last step is still applied);
//     measured round-trip error below 1e-12 degC.
// Every function that returns Result gives an Error, never NaN, for non-finite arguments, for
// R0 <= 0, for coefficients under which R does not rise with t over -200..850 degC, or for t or R
// outside the range. Nothing is clamped or extrapolated.
#include "rigcal/result.hpp"

namespace rigcal::metrology {

inline constexpr double rtd_min_c = -200.0;
inline constexpr double rtd_max_c = 850.0;
inline constexpr double pt100_r0_ohm = 100.0;
inline constexpr double pt1000_r0_ohm = 1000.0;

// Callendar-Van Dusen coefficients; defaults are IEC 60751's (alpha = 0.00385 /degC sensors).
// C is used only below 0 degC.
struct CvdCoefficients {
  double a_per_c = 3.9083e-3;
  double b_per_c2 = -5.775e-7;
  double c_per_c4 = -4.183e-12;
};

// Ok if r0_ohm is finite and positive, the coefficients are finite, and R(t) increases strictly over
// -200..850 degC (so that every R in range has exactly one temperature).
Status check_rtd_parameters(double r0_ohm, const CvdCoefficients& cvd = {});

// R(t) in ohm. Error outside -200..850 degC (see the header comment for the other errors).
Result<double> rtd_resistance_ohm(double r0_ohm, double t_c, const CvdCoefficients& cvd = {});

// Temperature in degC for a resistance r_ohm in [R(-200 degC), R(850 degC)]: the inverse of
// rtd_resistance_ohm to the bounds stated above. Error outside that range.
Result<double> rtd_temperature_c(double r0_ohm, double r_ohm, const CvdCoefficients& cvd = {});

// dR/dt in ohm/degC at t_c: the sensitivity coefficient that turns a resistance resolution or
// uncertainty into degC (u(t) = u(R) / (dR/dt)).
// REQUIRES: t_c in -200..850 degC and check_rtd_parameters(r0_ohm, cvd) ok; otherwise the result is
// NaN, so that it cannot enter an uncertainty budget looking like a valid coefficient.
double rtd_sensitivity_ohm_per_c(double r0_ohm, double t_c, const CvdCoefficients& cvd = {});

}  // namespace rigcal::metrology
