#pragma once
// Numbers in error messages and report sentences: 7 significant digits, enough to show a range limit
// such as 54.88636 mV next to an offending reading, and "nan"/"inf" spelled out for non-finite input.
#include <cstdio>
#include <string>

namespace rigcal::metrology::detail {

inline std::string number_text(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.7g", v);
  return buf;
}

// A probability or coverage as a percentage for sentences: 0.95 -> "95 %", 0.9545 -> "95.45 %".
inline std::string percent_text(double fraction) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g %%", 100.0 * fraction);
  return buf;
}

}  // namespace rigcal::metrology::detail
