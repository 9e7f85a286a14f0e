#pragma once
// Numbers in error messages (private to rigcal_core): six significant digits, "1e+10" rather than
// std::to_string's "10000000000.000000".
#include <sstream>
#include <string>

namespace rigcal::detect::detail {

inline std::string format_number(double v) {
  std::ostringstream out;
  out << v;
  return out.str();
}

}  // namespace rigcal::detect::detail
