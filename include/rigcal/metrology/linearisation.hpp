#pragma once
// Conversion of a raw sensor signal to engineering units, applied to the sensor's and the reference's
// readings before the straight-line fit. A channel's configuration holds one Linearisation value;
// the kinds and what "raw" means for each:
//   none          raw is already in engineering units; returned unchanged.
//   thermocouple  raw is the measured emf in mV, reference junction at cold_junction_c; result in
//                 degC (ITS-90 reference function, thermocouple.hpp).
//   rtd           raw is the resistance in ohm; result in degC (Callendar-Van Dusen, rtd.hpp).
//   current_loop  raw is the loop current in mA; result in the range's engineering unit, NAMUR NE 43
//                 signal limits (current_loop.hpp).
// Error bounds, ranges and error messages are those of the underlying functions.
#include "rigcal/metrology/current_loop.hpp"
#include "rigcal/metrology/rtd.hpp"
#include "rigcal/metrology/thermocouple.hpp"
#include "rigcal/result.hpp"

namespace rigcal::metrology {

struct Linearisation {
  enum class Kind { none, thermocouple, rtd, current_loop };
  Kind kind = Kind::none;

  // Kind::thermocouple. The cold-junction temperature is a fixed value here (an isothermal block at
  // a known temperature, or 0 degC for an ice point).
  ThermocoupleType thermocouple_type = ThermocoupleType::K;
  double cold_junction_c = 0.0;

  // Kind::rtd. Pt100: r0_ohm = 100; Pt1000: 1000. cvd: IEC 60751 unless the sensor is calibrated.
  double r0_ohm = pt100_r0_ohm;
  CvdCoefficients cvd{};

  // Kind::current_loop. No usable default: a range left at {0, 0} fails check_linearisation.
  CurrentLoopRange loop_range{};

  static Linearisation none() { return {}; }
  static Linearisation thermocouple(ThermocoupleType type, double cold_junction_c);
  static Linearisation rtd(double r0_ohm, const CvdCoefficients& cvd = {});
  static Linearisation current_loop(const CurrentLoopRange& range);
};

// Ok if the parameters of the chosen kind are usable: cold junction finite and inside the type's
// range; RTD parameters as check_rtd_parameters; loop range as check_current_loop_range. Parameters of
// the other kinds are ignored. Meant for configuration loading, so that a bad value is reported once.
Status check_linearisation(const Linearisation& lin);

// Engineering value for a raw reading. Error for a non-finite raw value (every kind, none included),
// for a raw value outside the kind's range, or for unusable parameters.
Result<double> linearise(const Linearisation& lin, double raw);

// d engineering / d raw at the raw value: 1 for none, 1/S(t) degC/mV for a thermocouple (S the
// Seebeck coefficient at the converted temperature), 1/(dR/dt) degC/ohm for an RTD, units per mA for
// a current loop. Multiplies a raw-unit resolution or standard uncertainty into engineering units.
// REQUIRES: linearise(lin, raw) ok; otherwise NaN, which cannot pass for a valid coefficient.
double sensitivity(const Linearisation& lin, double raw);

}  // namespace rigcal::metrology
