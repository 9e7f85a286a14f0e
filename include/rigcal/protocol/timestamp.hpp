#pragma once
// UTC timestamps as signed nanoseconds since the Unix epoch, parsed from and formatted to the forms
// the line protocol accepts:
//   - RFC 3339 / ISO 8601 in UTC: 2026-12-01T08:15:30Z, with optional fraction .1 to .999999999 and
//     'Z' or '+00:00' as the zone (any other offset is refused: rigcal keeps UTC only, so local time and
//     daylight-saving errors cannot enter);
//   - epoch seconds: 1764576930 or 1764576930.125 (digits only, at most 9 fractional digits).
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace rigcal::protocol {

using TimeNs = std::int64_t;  // nanoseconds since 1970-01-01T00:00:00Z

struct TimestampError {
  const char* reason;  // e.g. "month out of range"
};

// Exactly one of the two is set.
struct ParsedTime {
  std::optional<TimeNs> time;
  TimestampError error{""};
};

ParsedTime parse_timestamp(std::string_view text);

// 2026-12-01T08:15:30.125000000Z with `fraction_digits` (0, 3, 6 or 9) digits.
std::string format_rfc3339(TimeNs t, int fraction_digits = 3);

// Days since the epoch for a proleptic Gregorian date, and back (H. Hinnant's civil-date algorithms).
std::int64_t days_from_civil(std::int64_t y, unsigned m, unsigned d);
void civil_from_days(std::int64_t z, std::int64_t& y, unsigned& m, unsigned& d);

}  // namespace rigcal::protocol
