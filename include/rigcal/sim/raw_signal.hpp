#pragma once
// The raw signal a sensor or reference would put out for an engineering value: the inverse of
// metrology::linearise. The simulator uses it to emit, say, a Pt100's resistance or a transmitter's
// loop current, which rigcald then linearises back; so raw_signal and linearise must round-trip.
//   none          the value itself
//   thermocouple  emf in mV with the reference junction at cold_junction_c: E(t) - E(t_cj)
//   rtd           Callendar-Van Dusen resistance in ohm
//   current_loop  4 + 16 (value - value_at_4ma) / (value_at_20ma - value_at_4ma) mA
// Errors (never NaN) for non-finite values, unusable parameters and values outside the kind's range
// (for a current loop: outside the NE 43 measuring range 3.8 .. 20.5 mA).
#include "rigcal/metrology/linearisation.hpp"
#include "rigcal/result.hpp"

namespace rigcal::sim {

Result<double> raw_signal(const metrology::Linearisation& lin, double value);

}  // namespace rigcal::sim
