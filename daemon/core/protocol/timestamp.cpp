#include "rigcal/protocol/timestamp.hpp"

#include <cstdio>

namespace rigcal::protocol {

std::int64_t days_from_civil(std::int64_t y, unsigned m, unsigned d) {
  y -= m <= 2;
  const std::int64_t era = (y >= 0 ? y : y - 399) / 400;
  const auto yoe = static_cast<unsigned>(y - era * 400);
  const unsigned doy = (153 * (m > 2 ? m - 3 : m + 9) + 2) / 5 + d - 1;
  const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
  return era * 146097 + static_cast<std::int64_t>(doe) - 719468;
}

void civil_from_days(std::int64_t z, std::int64_t& y, unsigned& m, unsigned& d) {
  z += 719468;
  const std::int64_t era = (z >= 0 ? z : z - 146096) / 146097;
  const auto doe = static_cast<unsigned>(z - era * 146097);
  const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
  const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
  const unsigned mp = (5 * doy + 2) / 153;
  d = doy - (153 * mp + 2) / 5 + 1;
  m = mp < 10 ? mp + 3 : mp - 9;
  y = static_cast<std::int64_t>(yoe) + era * 400 + (m <= 2);
}

namespace {

constexpr std::int64_t ns_per_s = 1'000'000'000;
// Latest accepted time: 2262 would overflow int64 nanoseconds; stop well before.
constexpr std::int64_t max_seconds = 7'258'118'400;  // 2200-01-01T00:00:00Z

bool digits(std::string_view s, std::size_t pos, std::size_t n, unsigned& out) {
  if (pos + n > s.size()) return false;
  out = 0;
  for (std::size_t i = pos; i < pos + n; ++i) {
    const char c = s[i];
    if (c < '0' || c > '9') return false;
    out = out * 10 + static_cast<unsigned>(c - '0');
  }
  return true;
}

bool is_leap(std::int64_t y) { return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0; }

unsigned days_in_month(std::int64_t y, unsigned m) {
  static constexpr unsigned days[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  return m == 2 && is_leap(y) ? 29 : days[m - 1];
}

// Fraction after a '.', up to 9 digits, as nanoseconds; advances pos.
bool fraction_ns(std::string_view s, std::size_t& pos, std::int64_t& ns, const char*& error) {
  ns = 0;
  if (pos >= s.size() || s[pos] != '.') return true;
  ++pos;
  std::size_t n = 0;
  while (pos < s.size() && s[pos] >= '0' && s[pos] <= '9') {
    if (++n > 9) {
      error = "more than 9 fractional digits";
      return false;
    }
    ns = ns * 10 + (s[pos] - '0');
    ++pos;
  }
  if (n == 0) {
    error = "no digits after the decimal point";
    return false;
  }
  static constexpr std::int64_t scale[10] = {1'000'000'000, 100'000'000, 10'000'000, 1'000'000, 100'000,
                                             10'000,        1'000,       100,        10,        1};
  ns *= scale[n];  // n digits of a fraction: scaled to nine
  return true;
}

ParsedTime fail(const char* reason) { return ParsedTime{std::nullopt, TimestampError{reason}}; }

ParsedTime parse_epoch(std::string_view s) {
  std::int64_t seconds = 0;
  std::size_t pos = 0;
  while (pos < s.size() && s[pos] >= '0' && s[pos] <= '9') {
    seconds = seconds * 10 + (s[pos] - '0');
    if (seconds > max_seconds) return fail("epoch seconds beyond the year 2200");
    ++pos;
  }
  if (pos == 0) return fail("not a timestamp");
  std::int64_t ns = 0;
  const char* error = "";
  if (!fraction_ns(s, pos, ns, error)) return fail(error);
  if (pos != s.size()) return fail("unexpected characters in epoch seconds");
  return ParsedTime{seconds * ns_per_s + ns, {""}};
}

ParsedTime parse_rfc3339(std::string_view s) {
  unsigned year = 0, month = 0, day = 0, hour = 0, minute = 0, second = 0;
  if (!digits(s, 0, 4, year) || s[4] != '-' || !digits(s, 5, 2, month) || s.size() < 10 || s[7] != '-' ||
      !digits(s, 8, 2, day))
    return fail("expected a date as YYYY-MM-DD");
  if (s.size() < 11 || (s[10] != 'T' && s[10] != 't')) return fail("expected 'T' between date and time");
  if (!digits(s, 11, 2, hour) || s.size() < 14 || s[13] != ':' || !digits(s, 14, 2, minute) || s.size() < 17 ||
      s[16] != ':' || !digits(s, 17, 2, second))
    return fail("expected a time as HH:MM:SS");
  if (year < 1970) return fail("year before 1970");
  if (month < 1 || month > 12) return fail("month out of range");
  if (day < 1 || day > days_in_month(year, month)) return fail("day out of range for the month");
  if (hour > 23) return fail("hour out of range");
  if (minute > 59) return fail("minute out of range");
  if (second > 59) return fail("second out of range (leap seconds are not accepted)");
  std::size_t pos = 19;
  std::int64_t ns = 0;
  const char* error = "";
  if (!fraction_ns(s, pos, ns, error)) return fail(error);
  const std::string_view zone = s.substr(pos);
  if (zone != "Z" && zone != "z" && zone != "+00:00" && zone != "-00:00") {
    if (zone.empty()) return fail("no time zone: UTC timestamps must end in 'Z'");
    return fail("time zone other than UTC: send UTC timestamps ending in 'Z'");
  }
  const std::int64_t days = days_from_civil(year, month, day);
  const std::int64_t secs = days * 86400 + std::int64_t{hour} * 3600 + std::int64_t{minute} * 60 + second;
  if (secs > max_seconds) return fail("timestamp beyond the year 2200");
  return ParsedTime{secs * ns_per_s + ns, {""}};
}

}  // namespace

ParsedTime parse_timestamp(std::string_view text) {
  if (text.size() >= 5 && text[4] == '-') return parse_rfc3339(text);
  return parse_epoch(text);
}

std::string format_rfc3339(TimeNs t, int fraction_digits) {
  std::int64_t secs = t / ns_per_s;
  std::int64_t ns = t % ns_per_s;
  if (ns < 0) {
    ns += ns_per_s;
    secs -= 1;
  }
  std::int64_t days = secs / 86400;
  std::int64_t rem = secs % 86400;
  if (rem < 0) {
    rem += 86400;
    days -= 1;
  }
  std::int64_t y = 0;
  unsigned m = 0, d = 0;
  civil_from_days(days, y, m, d);
  // Digits written by hand: snprintf cost more than the rest of a historian record's formatting.
  const auto hh = static_cast<unsigned>(rem / 3600), mm = static_cast<unsigned>(rem / 60 % 60),
             ss = static_cast<unsigned>(rem % 60);
  char buf[48];
  char* p = buf;
  auto digits = [&p](std::uint64_t v, int width) {
    for (int i = width - 1; i >= 0; --i, v /= 10) p[i] = static_cast<char>('0' + v % 10);
    p += width;
  };
  digits(static_cast<std::uint64_t>(y), 4);  // TimeNs spans the years 1677 to 2262
  *p++ = '-';
  digits(m, 2);
  *p++ = '-';
  digits(d, 2);
  *p++ = 'T';
  digits(hh, 2);
  *p++ = ':';
  digits(mm, 2);
  *p++ = ':';
  digits(ss, 2);
  if (fraction_digits > 0) {
    std::int64_t div = 1;
    for (int i = fraction_digits; i < 9; ++i) div *= 10;
    *p++ = '.';
    digits(static_cast<std::uint64_t>(ns / div), fraction_digits);
  }
  *p++ = 'Z';
  return std::string(buf, p);
}

}  // namespace rigcal::protocol
