#include "html_text.hpp"

#include <cmath>
#include <fmt/format.h>

namespace rigcal::report {

std::string escape_html(std::string_view text) {
  std::string out;
  out.reserve(text.size() + text.size() / 8);
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: {
        const auto u = static_cast<unsigned char>(c);
        if ((u < 0x20 && c != '\t' && c != '\n' && c != '\r') || u == 0x7f)
          out += "\xEF\xBF\xBD";
        else
          out += c;
      }
    }
  }
  return out;
}

std::string exact_number(double v) {
  if (std::isnan(v)) return "nan";
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  return fmt::format("{}", v);  // fmt's default for double is the shortest round-trip form
}

std::string exact_number_list(std::span<const double> values) {
  std::string out;
  for (std::size_t i = 0; i < values.size(); ++i) {
    if (i) out += ' ';
    out += exact_number(values[i]);
  }
  return out;
}

}  // namespace rigcal::report
