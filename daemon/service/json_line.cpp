#include "json_line.hpp"

#include <charconv>
#include <cmath>
#include <cstdlib>
#include <nlohmann/json.hpp>

namespace rigcal::service {

// nlohmann's dtoa_impl::format_buffer: digits d1..dk with the decimal point after n of them,
// fixed notation while -4 < n <= 15, else d.ddde+XX with at least two exponent digits.
void append_json_double(std::string& out, double v) {
  if (v == 0) {
    out += std::signbit(v) ? "-0.0" : "0.0";
    return;
  }
  char sci[32];
  const auto r = std::to_chars(sci, sci + sizeof sci, v, std::chars_format::scientific);
  std::string_view s(sci, static_cast<std::size_t>(r.ptr - sci));
  if (s.front() == '-') {
    out += '-';
    s.remove_prefix(1);
  }
  const auto e_at = s.find('e');
  char digits[24];
  int k = 0;
  for (char c : s.substr(0, e_at))
    if (c != '.') digits[k++] = c;
  const int n = std::atoi(std::string(s.substr(e_at + 1)).c_str()) + 1;  // d.ddd x 10^(n-1)
  const std::string_view d(digits, static_cast<std::size_t>(k));
  if (k <= n && n <= 15) {
    out.append(d).append(static_cast<std::size_t>(n - k), '0').append(".0");
  } else if (0 < n && n <= 15) {
    out.append(d.substr(0, static_cast<std::size_t>(n))).append(1, '.').append(d.substr(static_cast<std::size_t>(n)));
  } else if (-4 < n && n <= 0) {
    out.append("0.").append(static_cast<std::size_t>(-n), '0').append(d);
  } else {
    out += d.front();
    if (k > 1) out.append(1, '.').append(d.substr(1));
    const int e = n - 1;
    out += e < 0 ? "e-" : "e+";
    const int a = std::abs(e);
    if (a < 10) out += '0';
    out += std::to_string(a);
  }
}

void append_json_string(std::string& out, std::string_view s) {
  bool plain = true;
  for (unsigned char c : s) plain = plain && c >= 0x20 && c < 0x80 && c != '"' && c != '\\';
  if (!plain) {  // rare (configuration text): nlohmann's own escaping
    out += nlohmann::ordered_json(std::string(s)).dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
    return;
  }
  out += '"';
  out += s;
  out += '"';
}

void JsonLine::key(std::string_view k) {
  if (!first_) out_ += ',';
  first_ = false;
  if (k.empty()) return;
  append_json_string(out_, k);
  out_ += ':';
}

JsonLine& JsonLine::open(std::string_view k) {
  if (!k.empty() || !first_) key(k);
  out_ += '{';
  first_ = true;
  return *this;
}

JsonLine& JsonLine::close() {
  out_ += '}';
  first_ = false;
  return *this;
}

JsonLine& JsonLine::text(std::string_view k, std::string_view value) {
  key(k);
  append_json_string(out_, value);
  return *this;
}

JsonLine& JsonLine::number(std::string_view k, double value) {
  key(k);
  if (std::isfinite(value))
    append_json_double(out_, value);
  else
    out_ += "null";
  return *this;
}

JsonLine& JsonLine::unsigned_number(std::string_view k, std::uint64_t value) {
  key(k);
  char buf[24];
  out_.append(buf, std::to_chars(buf, buf + sizeof buf, value).ptr);
  return *this;
}

JsonLine& JsonLine::boolean(std::string_view k, bool value) {
  key(k);
  out_ += value ? "true" : "false";
  return *this;
}

JsonLine& JsonLine::null(std::string_view k) {
  key(k);
  out_ += "null";
  return *this;
}

}  // namespace rigcal::service
