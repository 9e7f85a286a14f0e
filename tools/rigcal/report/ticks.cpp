#include "ticks.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <fmt/format.h>

#include "rigcal/protocol/timestamp.hpp"

namespace rigcal::report {

namespace {

// Tolerance, in steps, for deciding that a value lies on a tick: absorbs the rounding of value/step.
constexpr double on_tick = 1e-9;

// lo == hi (one distinct value) or a reversed extent: give the axis some room around the value.
void widen_degenerate(double& lo, double& hi) {
  if (hi > lo) return;
  const double centre = 0.5 * (lo + hi);
  const double pad = centre != 0 ? std::abs(centre) * 0.05 : 1.0;
  lo = centre - pad;
  hi = centre + pad;
}

std::string superscript(int n) {
  static constexpr std::array<const char*, 10> digits = {"\u2070", "\u00b9", "\u00b2", "\u00b3", "\u2074",
                                                         "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
  std::string out = n < 0 ? "\u207b" : "";
  for (char c : std::to_string(std::abs(n))) out += digits[static_cast<std::size_t>(c - '0')];
  return out;
}

std::string decade_label(int exponent) {
  if (exponent == 0) return "1";
  if (exponent == 1) return "10";
  return "10" + superscript(exponent);
}

std::string utc_label(double t_s, double step_s) {
  const auto t = static_cast<std::int64_t>(std::floor(t_s));
  const std::int64_t days = (t >= 0 ? t : t - 86399) / 86400;
  const std::int64_t secs = t - days * 86400;
  std::int64_t y = 0;
  unsigned m = 0, d = 0;
  protocol::civil_from_days(days, y, m, d);
  const auto hh = secs / 3600, mm = secs / 60 % 60, ss = secs % 60;
  if (step_s >= 86400) return fmt::format("{:04}-{:02}-{:02}", y, m, d);
  if (step_s >= 60) return fmt::format("{:02}-{:02} {:02}:{:02}", m, d, hh, mm);
  return fmt::format("{:02}:{:02}:{:02}", hh, mm, ss);
}

// Steps a UTC axis may use, in seconds: whole seconds, minutes, hours, days and weeks.
constexpr std::array<double, 24> time_steps = {1,    2,    5,     10,    15,    30,    60,     120,
                                               300,  600,  900,   1800,  3600,  7200,  10800,  21600,
                                               43200, 86400, 172800, 432000, 604800, 1209600, 2592000, 7776000};

}  // namespace

double nice_step(double span, int target_intervals) {
  const double raw = span / std::max(1, target_intervals);
  const double decade = std::pow(10.0, std::floor(std::log10(raw)));
  const double f = raw / decade;
  const double nice = f < 1.5 ? 1 : f < 3.5 ? 2 : f < 7.5 ? 5 : 10;
  return nice * decade;
}

std::string tick_label(double value, double step) {
  if (std::abs(value) < step * on_tick) value = 0;  // -0.000 and 1e-17 are both 0 on this axis
  const double magnitude = std::max(std::abs(value), step);
  const int step_exp = static_cast<int>(std::floor(std::log10(step) + on_tick));
  if (magnitude >= 1e6 || magnitude < 1e-4) {
    const int mag_exp = static_cast<int>(std::floor(std::log10(magnitude) + on_tick));
    return fmt::format("{:.{}e}", value, std::max(0, mag_exp - step_exp));
  }
  return fmt::format("{:.{}f}", value, std::max(0, -step_exp));
}

TickSet linear_ticks(double lo, double hi, int target_intervals) {
  widen_degenerate(lo, hi);
  TickSet set;
  set.step = nice_step(hi - lo, target_intervals);
  const double first = std::floor(lo / set.step + on_tick);
  const double last = std::ceil(hi / set.step - on_tick);
  set.lo = first * set.step;
  set.hi = last * set.step;
  for (double k = first; k <= last + 0.5; k += 1) set.ticks.push_back({k * set.step, tick_label(k * set.step, set.step)});
  return set;
}

TickSet log10_ticks(double lo, double hi) {
  if (!(hi > lo)) hi = lo * 10;
  const int a = static_cast<int>(std::floor(std::log10(lo) + on_tick));
  const int b = std::max(a + 1, static_cast<int>(std::ceil(std::log10(hi) - on_tick)));
  TickSet set;
  set.lo = std::pow(10.0, a);
  set.hi = std::pow(10.0, b);
  set.step = 1;
  for (int e = a; e <= b; ++e) {
    const double decade = std::pow(10.0, e);
    set.ticks.push_back({decade, decade_label(e), true});
    if (e < b)
      for (double f : {2.0, 5.0}) set.ticks.push_back({f * decade, "", false});
  }
  return set;
}

TickSet time_ticks(double lo_s, double hi_s, int target_intervals) {
  if (!(hi_s > lo_s)) {
    lo_s -= 30;
    hi_s += 30;
  }
  const double wanted = (hi_s - lo_s) / std::max(1, target_intervals);
  double step = time_steps.back();
  for (double s : time_steps)
    if (s >= wanted) {
      step = s;
      break;
    }
  if (wanted > time_steps.back()) step = nice_step((hi_s - lo_s) / 86400, target_intervals) * 86400;  // whole days
  TickSet set;
  set.step = step;
  const double first = std::floor(lo_s / step + on_tick);
  const double last = std::ceil(hi_s / step - on_tick);
  set.lo = first * step;
  set.hi = last * step;
  for (double k = first; k <= last + 0.5; k += 1) set.ticks.push_back({k * step, utc_label(k * step, step)});
  return set;
}

}  // namespace rigcal::report
