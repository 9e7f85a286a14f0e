#pragma once
// The rigcal line protocol, version 1: one record per text line, fields separated by spaces or tabs.
//
//   [@SEQ] P CHANNEL TIME REFERENCE SENSOR     a pair: reference value and sensor reading together
//   [@SEQ] R CHANNEL TIME SENSOR               a reading of the sensor alone (corrected and averaged)
//   # anything                                 comment; blank lines are ignored too
//   HELLO STREAM                               (TCP) names the sender's stream for resend/dedup
//   AUTH SECRET                                (TCP) shared-secret authentication, first line
//
// CHANNEL: 1-64 characters from A-Z a-z 0-9 _ . : / -     TIME: RFC 3339 UTC, epoch seconds, or '-'
// (the arrival time). REFERENCE and SENSOR: decimal numbers in the raw units the channel's
// configuration expects (before any linearisation). SEQ: 1 to 2^63-1, increasing within a stream.
// The full description with examples is in README.md ("Line protocol").
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "rigcal/protocol/reject_reason.hpp"
#include "rigcal/protocol/timestamp.hpp"

namespace rigcal::protocol {

enum class RecordKind : std::uint8_t { pair, reading, ignorable, hello, auth };

struct Record {
  RecordKind kind = RecordKind::ignorable;
  std::optional<std::uint64_t> seq;
  std::string_view channel;   // pair / reading
  std::optional<TimeNs> time;  // absent: take the arrival time
  double reference = 0;       // pair only
  double sensor = 0;
  std::string_view argument;  // hello: stream name; auth: secret
};

struct DecodeResult {
  bool ok = false;
  Record record;             // when ok
  RejectReason reason{};     // when !ok
  std::string detail;        // when !ok: what was wrong, naming the field
};

// Decodes one line (without its line ending). Views in the result point into `line`.
DecodeResult decode_record(std::string_view line);

// The @SEQ of a line, if it starts with a well-formed one (used to answer REJ for a malformed record).
std::optional<std::uint64_t> peek_sequence(std::string_view line);

// True if every byte sequence is well-formed UTF-8 (no overlongs, surrogates or code points > U+10FFFF).
bool is_valid_utf8(std::string_view s);

inline constexpr std::size_t max_channel_name_bytes = 64;
bool is_valid_channel_name(std::string_view s);

}  // namespace rigcal::protocol
