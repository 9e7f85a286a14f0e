#pragma once
// Axis ticks for the report's plots: "nice" values (1, 2 or 5 times a power of ten) on linear
// axes, decades on log axes and whole seconds, minutes, hours or days on UTC time axes, each with a
// label that has just enough digits to tell neighbouring ticks apart.
#include <string>
#include <vector>

namespace rigcal::report {

struct Tick {
  double value = 0;
  std::string label;
  bool major = true;  // minor ticks (log axes: 2 and 5 times a decade) get a grid line, no label
};

struct TickSet {
  double lo = 0;    // the axis domain: the data's extent widened to whole ticks
  double hi = 0;
  double step = 0;  // between major ticks (decades count as 1 on log axes)
  std::vector<Tick> ticks;
};

// The nice step (1, 2 or 5 x 10^k) that divides `span` into about `target_intervals` intervals.
// REQUIRES: span > 0 and finite, target_intervals >= 1.
double nice_step(double span, int target_intervals);

// Ticks at whole multiples of a nice step; the domain [lo, hi] is widened outwards to the nearest
// ticks. A degenerate extent (lo == hi, or lo > hi) is first widened around its value so that an axis
// can always be drawn. REQUIRES: lo, hi finite.
TickSet linear_ticks(double lo, double hi, int target_intervals = 5);

// Decades 10^a .. 10^b covering [lo, hi], with minor ticks at 2 and 5 times each decade.
// REQUIRES: 0 < lo, hi finite.
TickSet log10_ticks(double lo, double hi);

// Time axis, values in seconds since 1970-01-01T00:00:00Z: ticks at whole multiples of a step
// chosen from 1 s ... 1 year (multiples of days beyond), labelled in UTC as HH:MM:SS, MM-DD HH:MM or
// YYYY-MM-DD as the step requires.
TickSet time_ticks(double lo_s, double hi_s, int target_intervals = 5);

// Label of a linear tick `value` on an axis whose ticks are `step` apart: fixed notation with as
// many decimals as the step needs, or scientific notation for very large or very small magnitudes.
std::string tick_label(double value, double step);

}  // namespace rigcal::report
