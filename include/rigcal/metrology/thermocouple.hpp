#pragma once
// ITS-90 thermocouple reference functions for types K, J and T: emf in millivolts (reference junction
// at 0 degC) against the temperature t90 in degC, as defined in NIST Monograph 175 (Burns et al., 1993;
// NIST Standard Reference Database 60) and IEC 60584-1:2013.
//
// The reference function E(t) is the definition; the printed tables are E(t) rounded to 0.001 mV, so
// this implementation reproduces them to the table's resolution (checked at every tabulated check
// point in the tests). Its own error as a model of a real thermocouple is a matter for the sensor's
// tolerance class (IEC 60584-1), not for this code.
//
// Ranges of the reference functions:   type K  -270 .. 1372 degC   (-6.457738 .. 54.88636 mV)
//                                      type J  -210 .. 1200 degC   (-8.095380 .. 69.55318 mV)
//                                      type T  -270 ..  400 degC   (-6.257505 .. 20.87197 mV)
// Every function that returns Result gives an Error, never NaN, for a non-finite argument or one
// outside these ranges. Nothing is clamped or extrapolated.
#include <string_view>

#include "rigcal/result.hpp"

namespace rigcal::metrology {

enum class ThermocoupleType { K, J, T };

// "K", "J" or "T".
std::string_view thermocouple_type_name(ThermocoupleType type);

// The range of the reference function, in temperature and in emf (the emf limits are E(t_min_c) and
// E(t_max_c) to double precision, not the rounded printed limits).
struct ThermocoupleRange {
  double t_min_c;
  double t_max_c;
  double emf_min_mv;
  double emf_max_mv;
};
ThermocoupleRange thermocouple_range(ThermocoupleType type);

// Emf of the thermocouple with its reference junction at 0 degC: the ITS-90 reference polynomial of
// the subrange holding t90_c, plus type K's exponential term a0 exp(a1 (t - a2)^2) at 0 degC and above.
// Error outside the type's range or for a non-finite t90_c.
Result<double> thermocouple_emf_mv(ThermocoupleType type, double t90_c);

// The Newton iteration of thermocouple_temperature_c stops once |E(t) - emf| is below this, and then
// applies that last correction too.
inline constexpr double thermocouple_inverse_tolerance_mv = 1e-9;

// Temperature for an emf measured with the reference junction at 0 degC: the exact inverse of
// thermocouple_emf_mv. Starts from the published inverse polynomial (below its range, types K and T
// under -200 degC, from the middle of the remaining bracket) and refines by safeguarded Newton
// iteration on the reference function.
// Error bound: |t - E^-1(emf)| <= thermocouple_inverse_tolerance_mv / S(t) before the final Newton
// correction: <= 5.3e-8 degC wherever S >= 0.019 mV/degC (all of type J; K and T above -170 degC),
// <= 1.4e-6 degC at worst (type K at -270 degC, S = 7.3e-4 mV/degC). Measured round trip t -> E -> t on a
// 0.01 degC grid over each full range: 6.6e-11 degC (K), 1.9e-11 degC (J), 4.1e-8 degC (T, near -270 degC,
// where the degree-14 polynomial's terms cancel to ~4e-11 mV and S is 1e-3 mV/degC). The published subranges
// do not meet exactly: type J jumps by 7.5e-8 mV at 760 degC and type K by 2.0e-9 mV at 0 degC. An emf inside
// such a gap has no exact inverse and gives the boundary temperature, an error of at most gap/S = 1.2e-6 degC
// (J) and 5e-8 degC (K). So the conversion error is that of the reference function itself, to about 1e-6
// degC. Error for an emf outside [emf_min_mv, emf_max_mv] of thermocouple_range, or non-finite.
Result<double> thermocouple_temperature_c(ThermocoupleType type, double emf_mv);

// Cold-junction compensation: the reference junction is at cold_junction_c rather than 0 degC, so
// the thermocouple's emf against 0 degC is measured_emf_mv + E(cold_junction_c), and the temperature
// is the inverse of that sum. Error if cold_junction_c is outside the type's range, if the
// compensated emf is outside it, or for non-finite arguments.
// For an uncertainty budget: dt/d(measured emf) = 1/S(t), dt/d(cold_junction_c) = S(t_cj)/S(t).
Result<double> thermocouple_temperature_c(ThermocoupleType type, double measured_emf_mv,
                                          double cold_junction_c);

// The published inverse polynomial alone, t90 = sum d_i E^i of the subrange holding emf_mv. Its error
// against the reference function is the published band (K: -0.02..0.04, -0.05..0.04, -0.05..0.06;
// J: -0.05..0.03, -0.04..0.04, -0.04..0.03; T: -0.02..0.04, -0.03..0.03 degC per subrange). Defined
// over the inverse's published temperature range, i.e. emf E(-200 degC) .. E(1372 degC) for K,
// E(-210) .. E(1200) for J and E(-200) .. E(400) for T; Error outside it. Use it only to check
// against the published bands; thermocouple_temperature_c is the conversion.
Result<double> thermocouple_temperature_inverse_polynomial_c(ThermocoupleType type, double emf_mv);

// Seebeck coefficient S = dE/dt of the reference function at t90_c, in mV/degC: the sensitivity
// coefficient that turns an emf resolution or uncertainty into degC (u(t) = u(E) / S).
// REQUIRES: t90_c inside the type's range; outside it (or for NaN) the result is NaN, because no
// value would be a valid sensitivity there and a silent finite number could enter an uncertainty
// budget unnoticed.
double thermocouple_seebeck_mv_per_c(ThermocoupleType type, double t90_c);

}  // namespace rigcal::metrology
