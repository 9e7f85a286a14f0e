// Number formatting shared by the report's tables.
#include <algorithm>
#include <cmath>
#include <cstdarg>
#include <cstdio>

#include "report.hpp"
#include "report_format.hpp"

namespace rigcal::study {

std::string format(const char* f, ...) {
  char buf[512];
  va_list args;
  va_start(args, f);
  std::vsnprintf(buf, sizeof buf, f, args);
  va_end(args);
  return buf;
}

std::string format_estimate(double value, double standard_error) {
  if (!std::isfinite(value)) return "inf";
  // Digits after the point: enough to show the standard error to two significant digits, at most 2.
  int decimals = 0;
  if (standard_error > 0 && std::isfinite(standard_error)) {
    decimals = static_cast<int>(std::ceil(-std::log10(standard_error))) + 1;
    decimals = std::max(0, std::min(2, decimals));
  } else if (std::abs(value) < 100) {
    decimals = 1;
  }
  if (!(standard_error > 0) || !std::isfinite(standard_error)) return format("%.*f", decimals, value);
  return format("%.*f ± %.*f", decimals, value, decimals, standard_error);
}

std::string format_arl(const ArlEstimate& e) {
  if (e.runs == 0) return "–";
  if (e.alarms == 0) return format("> %.3g (no alert in %llu runs)", e.lower_bound_95, static_cast<unsigned long long>(e.runs));
  std::string s = format_estimate(e.arl, e.standard_error);
  if (e.alarms < 10)
    s += format(" (%llu alert%s)", static_cast<unsigned long long>(e.alarms), e.alarms == 1 ? "" : "s");
  return s;
}

std::string format_delay(const DelayEstimate& d) {
  if (d.runs == 0) return "– (all false alerts)";
  std::string s = format_estimate(d.mean, d.standard_error);
  if (d.censored > 0) s = "≥ " + s;
  if (d.runs < 10) s += format(" (%llu run%s)", static_cast<unsigned long long>(d.runs), d.runs == 1 ? "" : "s");
  return s;
}

std::string format_probability(const Proportion& p) {
  if (p.runs == 0) return "–";
  return format("%.3f ± %.3f", p.p, p.standard_error);
}

}  // namespace rigcal::study
