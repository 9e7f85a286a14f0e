#include "rigcal/sim/raw_signal.hpp"

#include <cmath>
#include <string>

#include "../metrology/number_text.hpp"
#include "rigcal/metrology/current_loop.hpp"
#include "rigcal/metrology/rtd.hpp"
#include "rigcal/metrology/thermocouple.hpp"

namespace rigcal::sim {

namespace {

using metrology::detail::number_text;

Result<double> loop_current_ma(const metrology::CurrentLoopRange& range, double value) {
  if (auto s = metrology::check_current_loop_range(range); !s) return s.error();
  if (!std::isfinite(value)) return Error{"value is not a finite number"};
  const double i = 4.0 + 16.0 * (value - range.value_at_4ma) / (range.value_at_20ma - range.value_at_4ma);
  if (i < metrology::ne43::measuring_low_ma || i > metrology::ne43::measuring_high_ma)
    return Error{"value " + number_text(value) + " needs " + number_text(i) +
                 " mA, outside the 4-20 mA measuring range 3.8 .. 20.5 mA (NAMUR NE 43)"};
  return i;
}

Result<double> thermocouple_emf(const metrology::Linearisation& lin, double t_c) {
  auto e = metrology::thermocouple_emf_mv(lin.thermocouple_type, t_c);
  if (!e) return e.error();
  auto cj = metrology::thermocouple_emf_mv(lin.thermocouple_type, lin.cold_junction_c);
  if (!cj) return Error{"cold junction: " + cj.error().message};
  return *e - *cj;
}

}  // namespace

Result<double> raw_signal(const metrology::Linearisation& lin, double value) {
  switch (lin.kind) {
    case metrology::Linearisation::Kind::none:
      if (!std::isfinite(value)) return Error{"value is not a finite number"};
      return value;
    case metrology::Linearisation::Kind::thermocouple:
      return thermocouple_emf(lin, value);
    case metrology::Linearisation::Kind::rtd:
      return metrology::rtd_resistance_ohm(lin.r0_ohm, value, lin.cvd);
    case metrology::Linearisation::Kind::current_loop:
      return loop_current_ma(lin.loop_range, value);
  }
  return Error{"unknown linearisation kind"};
}

}  // namespace rigcal::sim
