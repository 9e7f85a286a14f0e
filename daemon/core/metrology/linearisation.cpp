#include "rigcal/metrology/linearisation.hpp"

#include <cmath>
#include <string>

#include "number_text.hpp"

namespace rigcal::metrology {

Linearisation Linearisation::thermocouple(ThermocoupleType type, double cold_junction_c) {
  Linearisation lin;
  lin.kind = Kind::thermocouple;
  lin.thermocouple_type = type;
  lin.cold_junction_c = cold_junction_c;
  return lin;
}

Linearisation Linearisation::rtd(double r0_ohm, const CvdCoefficients& cvd) {
  Linearisation lin;
  lin.kind = Kind::rtd;
  lin.r0_ohm = r0_ohm;
  lin.cvd = cvd;
  return lin;
}

Linearisation Linearisation::current_loop(const CurrentLoopRange& range) {
  Linearisation lin;
  lin.kind = Kind::current_loop;
  lin.loop_range = range;
  return lin;
}

Status check_linearisation(const Linearisation& lin) {
  switch (lin.kind) {
    case Linearisation::Kind::none:
      return ok_status();
    case Linearisation::Kind::thermocouple: {
      // A 0 mV reading means hot end = cold junction, which is always convertible once the junction's
      // temperature is usable; so this fails exactly for a bad junction, with the conversion's message.
      auto t = thermocouple_temperature_c(lin.thermocouple_type, 0.0, lin.cold_junction_c);
      if (!t) return t.error();
      return ok_status();
    }
    case Linearisation::Kind::rtd:
      return check_rtd_parameters(lin.r0_ohm, lin.cvd);
    case Linearisation::Kind::current_loop:
      return check_current_loop_range(lin.loop_range);
  }
  return Error{"unknown linearisation kind"};
}

Result<double> linearise(const Linearisation& lin, double raw) {
  switch (lin.kind) {
    case Linearisation::Kind::none:
      if (!std::isfinite(raw))
        return Error{"reading " + detail::number_text(raw) + " is not a finite number"};
      return raw;
    case Linearisation::Kind::thermocouple:
      return thermocouple_temperature_c(lin.thermocouple_type, raw, lin.cold_junction_c);
    case Linearisation::Kind::rtd:
      return rtd_temperature_c(lin.r0_ohm, raw, lin.cvd);
    case Linearisation::Kind::current_loop:
      return current_loop_value(lin.loop_range, raw);
  }
  return Error{"unknown linearisation kind"};
}

double sensitivity(const Linearisation& lin, double raw) {
  const auto value = linearise(lin, raw);
  if (!value) return std::nan("");
  switch (lin.kind) {
    case Linearisation::Kind::none:
      return 1.0;
    case Linearisation::Kind::thermocouple:
      return 1.0 / thermocouple_seebeck_mv_per_c(lin.thermocouple_type, *value);
    case Linearisation::Kind::rtd:
      return 1.0 / rtd_sensitivity_ohm_per_c(lin.r0_ohm, *value, lin.cvd);
    case Linearisation::Kind::current_loop:
      return current_loop_sensitivity_per_ma(lin.loop_range);
  }
  return std::nan("");
}

}  // namespace rigcal::metrology
