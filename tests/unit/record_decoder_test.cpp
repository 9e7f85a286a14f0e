// The line protocol's record decoder: what each record means, and why each malformed one is refused.
#include <catch2/catch.hpp>
#include <charconv>
#include <cstring>
#include <random>
#include <string>

#include "rigcal/protocol/record.hpp"

using namespace rigcal::protocol;

TEST_CASE("a pair record carries channel, time, reference and sensor value") {
  const auto r = decode_record("P TT-101 2026-12-01T08:00:00.250Z 80.012 80.105");
  REQUIRE(r.ok);
  CHECK(r.record.kind == RecordKind::pair);
  CHECK(r.record.channel == "TT-101");
  CHECK(r.record.time == *parse_timestamp("2026-12-01T08:00:00.250Z").time);
  CHECK(r.record.reference == 80.012);
  CHECK(r.record.sensor == 80.105);
  CHECK_FALSE(r.record.seq.has_value());
}

TEST_CASE("a reading record, arrival time, sequence numbers, tabs and runs of blanks") {
  const auto r = decode_record("@42\tR  PT-204:PV\t-  +1.5e2");
  REQUIRE(r.ok);
  CHECK(r.record.kind == RecordKind::reading);
  CHECK(r.record.seq == 42u);
  CHECK(r.record.channel == "PT-204:PV");
  CHECK_FALSE(r.record.time.has_value());
  CHECK(r.record.sensor == 150.0);
}

TEST_CASE("comments, blank lines and session commands") {
  CHECK(decode_record("").record.kind == RecordKind::ignorable);
  CHECK(decode_record("   \t ").record.kind == RecordKind::ignorable);
  CHECK(decode_record("# calibration well A, PRT-07 \xC2\xB0" "C").record.kind == RecordKind::ignorable);
  const auto hello = decode_record("HELLO rig-a.sender-1");
  REQUIRE(hello.ok);
  CHECK(hello.record.kind == RecordKind::hello);
  CHECK(hello.record.argument == "rig-a.sender-1");
  CHECK(decode_record("AUTH s3cr3t").record.kind == RecordKind::auth);
}

TEST_CASE("malformed records are refused with a reason and a message naming the field") {
  struct Case {
    std::string line;
    RejectReason reason;
    const char* detail;
  };
  const Case cases[] = {
      {"X TT-101 - 1 2", RejectReason::unknown_record_type, "record type \"X\" is not P (pair), R (reading)"},
      {"P TT-101 - 1", RejectReason::missing_field, "pair needs 4 fields after the type, got 3"},
      {"P TT-101 - 1 2 3", RejectReason::extra_field, "pair takes 4 fields after the type"},
      {"R TT-101 -", RejectReason::missing_field, "reading needs 3 fields after the type, got 2"},
      {"P TT-101 - abc 2", RejectReason::bad_number, "reference: \"abc\" is not a decimal number"},
      {"P TT-101 - 1 2,5", RejectReason::bad_number, "sensor: \"2,5\" is not a decimal number"},
      {"P TT-101 - nan 2", RejectReason::not_finite, "reference: \"nan\" is not a finite number"},
      {"P TT-101 - 1 -inf", RejectReason::not_finite, "sensor: \"-inf\" is not a finite number"},
      {"P TT-101 - 1 1e999", RejectReason::not_finite, "sensor: \"1e999\" is not a finite number"},
      {"P TT-101 12:00 1 2", RejectReason::bad_timestamp, "time \"12:00\": unexpected characters in epoch seconds"},
      {"P TT-101 2026-12-01T08:00:00 1 2", RejectReason::bad_timestamp, "no time zone"},
      {"P TT#101 - 1 2", RejectReason::bad_channel_name, "channel \"TT#101\" must be 1-64 characters"},
      {"P " + std::string(65, 'A') + " - 1 2", RejectReason::bad_channel_name, "must be 1-64 characters"},
      {"@0 P TT-101 - 1 2", RejectReason::bad_sequence, "is not an integer from 1 to 2^63-1"},
      {"@x P TT-101 - 1 2", RejectReason::bad_sequence, "sequence \"@x\""},
      {"@9223372036854775808 P A - 1 2", RejectReason::bad_sequence, "2^63-1"},
      {"@5", RejectReason::missing_field, "a sequence number alone is not a record"},
      {"@5 HELLO s", RejectReason::unexpected_command, "HELLO takes no sequence number"},
      {"HELLO", RejectReason::missing_field, "HELLO needs one argument"},
      {"P TT-101 - 1 \xFF", RejectReason::bad_utf8, "not valid UTF-8"},
      {"# \xC0\xAF overlong", RejectReason::bad_utf8, "not valid UTF-8"},
      {"P TT-101 - 1\x01 2", RejectReason::control_character, "control character"},
      {std::string("P TT-101 - 1 2\0", 15), RejectReason::control_character, "control character"},
  };
  for (const auto& c : cases) {
    INFO(c.line);
    const auto r = decode_record(c.line);
    REQUIRE_FALSE(r.ok);
    CHECK(reject_reason_name(r.reason) == reject_reason_name(c.reason));
    CHECK_THAT(r.detail, Catch::Contains(c.detail));
  }
}

TEST_CASE("UTF-8 validation rejects surrogates, overlongs and truncated sequences") {
  CHECK(is_valid_utf8("plain"));
  CHECK(is_valid_utf8("\xC2\xB0" "C \xE2\x82\xAC \xF0\x9F\x94\xA5"));
  CHECK_FALSE(is_valid_utf8("\xED\xA0\x80"));          // U+D800 surrogate
  CHECK_FALSE(is_valid_utf8("\xE0\x80\xAF"));          // overlong '/'
  CHECK_FALSE(is_valid_utf8("\xF4\x90\x80\x80"));      // beyond U+10FFFF
  CHECK_FALSE(is_valid_utf8("\xE2\x82"));              // truncated
  CHECK_FALSE(is_valid_utf8("\x80"));                  // lone continuation byte
}

TEST_CASE("every reject reason has a stable name and a description") {
  for (std::size_t i = 0; i < reject_reason_count; ++i) {
    const auto r = static_cast<RejectReason>(i);
    CHECK_FALSE(reject_reason_name(r).empty());
    CHECK_FALSE(reject_reason_description(r).empty());
  }
  CHECK(reject_reason_name(RejectReason::unknown_channel) == "unknown_channel");
}

TEST_CASE("decimal values decode exactly as std::from_chars reads them") {
  // The decoder reads short plain decimals itself (Clinger's exact fast path) and leaves the rest to
  // std::from_chars; both must give the same double, bit for bit.
  std::mt19937_64 rng(11);
  std::uniform_int_distribution<int> digit(0, 9), int_digits(1, 12), frac_digits(0, 10), sign(0, 2);
  for (int i = 0; i < 20000; ++i) {
    std::string v = sign(rng) == 0 ? "-" : "";
    for (int k = int_digits(rng); k > 0; --k) v += static_cast<char>('0' + digit(rng));
    if (const int f = frac_digits(rng); f > 0) {
      v += '.';
      for (int k = f; k > 0; --k) v += static_cast<char>('0' + digit(rng));
    }
    double expected = 0;
    std::from_chars(v.data(), v.data() + v.size(), expected);
    const auto d = decode_record("P TT-101 - " + v + " " + v);
    REQUIRE(d.ok);
    CHECK(std::memcmp(&d.record.reference, &expected, sizeof expected) == 0);
  }
  for (const char* v : {"5.", ".5", "1e3", "-0", "0.1", "123456789012345678", "-.25", "+7.5", "00012.50"}) {
    double expected = 0;
    const std::string_view t = v[0] == '+' ? v + 1 : v;
    std::from_chars(t.data(), t.data() + t.size(), expected);
    const auto d = decode_record(std::string("P TT-101 - ") + v + " 1");
    REQUIRE(d.ok);
    CHECK(std::memcmp(&d.record.reference, &expected, sizeof expected) == 0);
  }
}

TEST_CASE("tabs, control characters and UTF-8 are still classified byte by byte") {
  CHECK(decode_record("P\tTT-101\t-\t1.5\t2.5").ok);
  CHECK(decode_record("P TT-101 - 1.5 2.5 # caf\xc3\xa9").reason == RejectReason::extra_field);
  CHECK(decode_record("P TT-101 - 1.5 2.5\x01").reason == RejectReason::control_character);
  CHECK(decode_record("P TT-101 - 1.5 2.5\x7f").reason == RejectReason::control_character);
  CHECK(decode_record("P TT-101 - 1.5 2.5\xff").reason == RejectReason::bad_utf8);
}
