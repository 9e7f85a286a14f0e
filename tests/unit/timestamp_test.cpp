// UTC timestamps of the line protocol, checked against glibc's timegm() as the independent reference.
#include <catch2/catch.hpp>
#include <ctime>
#include <random>

#include "rigcal/protocol/timestamp.hpp"

using namespace rigcal::protocol;

namespace {
TimeNs seconds(std::int64_t s) { return s * 1'000'000'000; }
std::int64_t timegm_of(int y, int mo, int d, int h, int mi, int s) {
  std::tm tm{};
  tm.tm_year = y - 1900;
  tm.tm_mon = mo - 1;
  tm.tm_mday = d;
  tm.tm_hour = h;
  tm.tm_min = mi;
  tm.tm_sec = s;
  return static_cast<std::int64_t>(timegm(&tm));
}
}  // namespace

TEST_CASE("RFC 3339 UTC timestamps agree with timegm() over 1970-2199, leap days included") {
  std::mt19937 rng(1);
  std::uniform_int_distribution<int> year(1970, 2199), month(1, 12), day(1, 28), hour(0, 23), minute(0, 59);
  for (int i = 0; i < 20000; ++i) {
    const int y = year(rng), mo = month(rng), d = day(rng), h = hour(rng), mi = minute(rng), s = minute(rng);
    char text[40];
    std::snprintf(text, sizeof text, "%04d-%02d-%02dT%02d:%02d:%02dZ", y, mo, d, h, mi, s);
    const ParsedTime t = parse_timestamp(text);
    REQUIRE(t.time.has_value());
    CHECK(*t.time == seconds(timegm_of(y, mo, d, h, mi, s)));
    CHECK(format_rfc3339(*t.time, 0) == text);
  }
  CHECK(*parse_timestamp("2024-02-29T12:00:00Z").time == seconds(timegm_of(2024, 2, 29, 12, 0, 0)));
  CHECK(*parse_timestamp("2000-02-29T00:00:00Z").time == seconds(timegm_of(2000, 2, 29, 0, 0, 0)));
}

TEST_CASE("fractions, zone forms and epoch seconds") {
  const TimeNs base = seconds(timegm_of(2026, 12, 1, 8, 15, 30));
  CHECK(*parse_timestamp("2026-12-01T08:15:30.125Z").time == base + 125'000'000);
  CHECK(*parse_timestamp("2026-12-01T08:15:30.000000001Z").time == base + 1);
  CHECK(*parse_timestamp("2026-12-01t08:15:30.5+00:00").time == base + 500'000'000);
  CHECK(*parse_timestamp("1764576930").time == seconds(1764576930));
  CHECK(*parse_timestamp("1764576930.25").time == seconds(1764576930) + 250'000'000);
  CHECK(format_rfc3339(base + 125'000'000) == "2026-12-01T08:15:30.125Z");
  CHECK(format_rfc3339(base + 1, 9) == "2026-12-01T08:15:30.000000001Z");
}

TEST_CASE("timestamps that are not unambiguous UTC are refused with a reason") {
  struct Case {
    const char* text;
    const char* reason;
  };
  const Case cases[] = {
      {"2026-12-01T08:15:30", "no time zone: UTC timestamps must end in 'Z'"},
      {"2026-12-01T08:15:30+01:00", "time zone other than UTC: send UTC timestamps ending in 'Z'"},
      {"2026-02-29T00:00:00Z", "day out of range for the month"},
      {"2026-13-01T00:00:00Z", "month out of range"},
      {"2026-12-01T24:00:00Z", "hour out of range"},
      {"2026-12-31T23:59:60Z", "second out of range (leap seconds are not accepted)"},
      {"1969-12-31T23:59:59Z", "year before 1970"},
      {"2026-12-01 08:15:30Z", "expected 'T' between date and time"},
      {"2026-12-01T08:15:30.Z", "no digits after the decimal point"},
      {"2026-12-01T08:15:30.1234567891Z", "more than 9 fractional digits"},
      {"2300-01-01T00:00:00Z", "timestamp beyond the year 2200"},
      {"99999999999", "epoch seconds beyond the year 2200"},
      {"-5", "not a timestamp"},
      {"12abc", "unexpected characters in epoch seconds"},
      {"", "not a timestamp"},
  };
  for (const auto& c : cases) {
    INFO(c.text);
    const ParsedTime t = parse_timestamp(c.text);
    CHECK_FALSE(t.time.has_value());
    CHECK(std::string(t.error.reason) == c.reason);
  }
}
