#include "rigcal/protocol/record.hpp"

#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstring>

namespace rigcal::protocol {

bool is_valid_utf8(std::string_view s) {
  const auto* p = reinterpret_cast<const unsigned char*>(s.data());
  const auto* end = p + s.size();
  while (p < end) {
    const unsigned c = *p;
    if (c < 0x80) {
      ++p;
      continue;
    }
    int extra = 0;
    unsigned cp = 0, min = 0;
    if ((c & 0xE0) == 0xC0) {
      extra = 1, cp = c & 0x1F, min = 0x80;
    } else if ((c & 0xF0) == 0xE0) {
      extra = 2, cp = c & 0x0F, min = 0x800;
    } else if ((c & 0xF8) == 0xF0) {
      extra = 3, cp = c & 0x07, min = 0x10000;
    } else {
      return false;
    }
    if (end - p <= extra) return false;
    for (int i = 1; i <= extra; ++i) {
      if ((p[i] & 0xC0) != 0x80) return false;
      cp = (cp << 6) | (p[i] & 0x3F);
    }
    if (cp < min || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return false;
    p += extra + 1;
  }
  return true;
}

namespace {
struct NameBytes {
  bool ok[256] = {};
  constexpr NameBytes() {
    for (int c = 0; c < 256; ++c)
      ok[c] = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' || c == '.' ||
              c == ':' || c == '/' || c == '-';
  }
};
constexpr NameBytes name_bytes;
}  // namespace

bool is_valid_channel_name(std::string_view s) {
  if (s.empty() || s.size() > max_channel_name_bytes) return false;
  for (unsigned char c : s)
    if (!name_bytes.ok[c]) return false;
  return true;
}

namespace {

DecodeResult reject(RejectReason reason, std::string detail) {
  DecodeResult r;
  r.reason = reason;
  r.detail = std::move(detail);
  return r;
}

// Returns 0 when every byte is printable ASCII or tab, 1 for other well-formed UTF-8 without control
// characters, -1 for a control character, -2 for malformed UTF-8.
// Eight bytes at a time first: true when none is a control character, DEL or >= 0x80 (every line
// of a well-behaved sender), without looking at each byte.
bool all_printable_ascii(std::string_view line) {
  constexpr std::uint64_t ones = 0x0101010101010101ull, highs = 0x8080808080808080ull;
  std::size_t i = 0;
  for (; i + 8 <= line.size(); i += 8) {
    std::uint64_t w;
    std::memcpy(&w, line.data() + i, 8);
    // High bit of a byte set when it is < 0x20, >= 0x7F (0x7F + 1 carries into it), or >= 0x80.
    if (((w - 0x20 * ones) | (w + ones) | w) & highs) return false;
  }
  for (; i < line.size(); ++i) {
    const auto c = static_cast<unsigned char>(line[i]);
    if (c < 0x20 || c >= 0x7F) return false;
  }
  return true;
}

int classify_bytes(std::string_view line) {
  if (all_printable_ascii(line)) return 0;  // tabs, controls and UTF-8 take the byte loop below
  bool ascii = true;
  for (unsigned char c : line) {
    if (c >= 0x80) {
      ascii = false;
    } else if ((c < 0x20 && c != '\t') || c == 0x7F) {
      return is_valid_utf8(line) ? -1 : -2;
    }
  }
  if (ascii) return 0;
  return is_valid_utf8(line) ? 1 : -2;
}

constexpr std::size_t max_tokens = 7;

// Index of the first space or tab at or after pos (line.size() if none), eight bytes at a time: a
// byte equal to the separator is a zero byte of w ^ separator, found by the classic has-zero test.
std::size_t next_separator(std::string_view line, std::size_t pos) {
  constexpr std::uint64_t ones = 0x0101010101010101ull, highs = 0x8080808080808080ull;
  for (; pos + 8 <= line.size(); pos += 8) {
    std::uint64_t w;
    std::memcpy(&w, line.data() + pos, 8);
    const std::uint64_t sp = w ^ (0x20 * ones), tab = w ^ (0x09 * ones);
    const std::uint64_t hit = ((sp - ones) & ~sp & highs) | ((tab - ones) & ~tab & highs);
    if (hit) return pos + static_cast<std::size_t>(__builtin_ctzll(hit) / 8);  // lowest address first
  }
  while (pos < line.size() && line[pos] != ' ' && line[pos] != '\t') ++pos;
  return pos;
}

std::size_t tokenize(std::string_view line, std::string_view (&tokens)[max_tokens + 1]) {
  std::size_t n = 0, pos = 0;
  while (pos < line.size() && n <= max_tokens) {
    while (pos < line.size() && (line[pos] == ' ' || line[pos] == '\t')) ++pos;
    if (pos >= line.size()) break;
    const std::size_t start = pos;
    pos = next_separator(line, pos);
    tokens[n++] = line.substr(start, pos - start);
  }
  return n;
}

std::string quoted(std::string_view s) {
  std::string out = "\"";
  out.append(s.substr(0, 40));
  if (s.size() > 40) out += "...";
  out += "\"";
  return out;
}

// [-]digits[.digits] with at most 15 significant digits: the integer of its digits and the power of
// ten are both exact doubles (< 2^53, <= 10^22), so one IEEE division rounds correctly and gives
// what std::from_chars gives (Clinger's fast path), at a fraction of its cost. False: use from_chars.
bool simple_decimal(std::string_view t, double& out) {
  static constexpr double pow10[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
  std::size_t i = 0;
  const bool negative = !t.empty() && t[0] == '-';
  if (negative) ++i;
  std::uint64_t digits = 0;
  int count = 0, fraction = -1;  // fraction: digits after the point (-1: no point yet)
  for (; i < t.size(); ++i) {
    const char c = t[i];
    if (c >= '0' && c <= '9') {
      if (++count > 15) return false;
      digits = digits * 10 + static_cast<std::uint64_t>(c - '0');
      if (fraction >= 0) ++fraction;
    } else if (c == '.' && fraction < 0 && count > 0) {
      fraction = 0;
    } else {
      return false;
    }
  }
  if (count == 0 || fraction == 0) return false;  // "", "-", "5." (from_chars decides those)
  const double v = static_cast<double>(digits) / pow10[fraction < 0 ? 0 : fraction];
  out = negative ? -v : v;
  return true;
}

bool parse_value(std::string_view tok, const char* field, double& out, DecodeResult& err) {
  std::string_view t = tok;
  if (!t.empty() && t.front() == '+') t.remove_prefix(1);
  if (simple_decimal(t, out)) return true;
  const auto [end, ec] = std::from_chars(t.data(), t.data() + t.size(), out);
  if (t.empty() || end != t.data() + t.size() || ec == std::errc::invalid_argument) {
    err = reject(RejectReason::bad_number, std::string(field) + ": " + quoted(tok) + " is not a decimal number");
    return false;
  }
  if (ec == std::errc::result_out_of_range || !std::isfinite(out)) {
    err = reject(RejectReason::not_finite, std::string(field) + ": " + quoted(tok) + " is not a finite number");
    return false;
  }
  return true;
}

}  // namespace

std::optional<std::uint64_t> peek_sequence(std::string_view line) {
  std::size_t pos = 0;
  while (pos < line.size() && (line[pos] == ' ' || line[pos] == '\t')) ++pos;
  if (pos >= line.size() || line[pos] != '@') return std::nullopt;
  std::size_t end = pos + 1;
  while (end < line.size() && line[end] >= '0' && line[end] <= '9') ++end;
  if (end == pos + 1 || end - pos - 1 > 19 || (end < line.size() && line[end] != ' ' && line[end] != '\t'))
    return std::nullopt;
  std::uint64_t seq = 0;
  const auto [p, ec] = std::from_chars(line.data() + pos + 1, line.data() + end, seq);
  if (ec != std::errc{} || seq == 0 || seq > static_cast<std::uint64_t>(INT64_MAX)) return std::nullopt;
  return seq;
}

DecodeResult decode_record(std::string_view line) {
  const int bytes = classify_bytes(line);
  if (bytes == -2) return reject(RejectReason::bad_utf8, "the line is not valid UTF-8");
  if (bytes == -1) return reject(RejectReason::control_character, "the line contains a control character");

  std::string_view tok[max_tokens + 1];
  const std::size_t n = tokenize(line, tok);
  DecodeResult r;
  if (n == 0 || tok[0].front() == '#') {
    r.ok = true;
    r.record.kind = RecordKind::ignorable;
    return r;
  }
  std::size_t i = 0;
  if (tok[0].front() == '@') {
    std::uint64_t seq = 0;
    const std::string_view digits = tok[0].substr(1);
    const auto [end, ec] = std::from_chars(digits.data(), digits.data() + digits.size(), seq);
    if (digits.empty() || ec != std::errc{} || end != digits.data() + digits.size() || seq == 0 ||
        seq > static_cast<std::uint64_t>(INT64_MAX))
      return reject(RejectReason::bad_sequence, "sequence " + quoted(tok[0]) + " is not an integer from 1 to 2^63-1");
    r.record.seq = seq;
    i = 1;
    if (n == 1) return reject(RejectReason::missing_field, "a sequence number alone is not a record");
  }
  const std::string_view type = tok[i];
  if (type == "HELLO" || type == "AUTH") {
    if (r.record.seq) return reject(RejectReason::unexpected_command, std::string(type) + " takes no sequence number");
    if (n < 2) return reject(RejectReason::missing_field, std::string(type) + " needs one argument");
    if (n > 2) return reject(RejectReason::extra_field, std::string(type) + " takes one argument");
    r.ok = true;
    r.record.kind = type == "HELLO" ? RecordKind::hello : RecordKind::auth;
    r.record.argument = tok[1];
    if (r.record.kind == RecordKind::hello && !is_valid_channel_name(tok[1]))
      return reject(RejectReason::bad_channel_name, "stream name " + quoted(tok[1]) +
                                                        " must be 1-64 characters from A-Z a-z 0-9 _ . : / -");
    return r;
  }
  std::size_t needed = 0;
  if (type == "P") {
    r.record.kind = RecordKind::pair;
    needed = 5;
  } else if (type == "R") {
    r.record.kind = RecordKind::reading;
    needed = 4;
  } else {
    return reject(RejectReason::unknown_record_type,
                  "record type " + quoted(type) + " is not P (pair), R (reading), HELLO or AUTH");
  }
  const std::size_t have = n - i;
  if (have < needed)
    return reject(RejectReason::missing_field, std::string(type == "P" ? "pair" : "reading") + " needs " +
                                                   std::to_string(needed - 1) + " fields after the type, got " +
                                                   std::to_string(have - 1));
  if (have > needed)
    return reject(RejectReason::extra_field, std::string(type == "P" ? "pair" : "reading") + " takes " +
                                                 std::to_string(needed - 1) + " fields after the type");
  const std::string_view channel = tok[i + 1];
  if (!is_valid_channel_name(channel))
    return reject(RejectReason::bad_channel_name,
                  "channel " + quoted(channel) + " must be 1-64 characters from A-Z a-z 0-9 _ . : / -");
  r.record.channel = channel;
  const std::string_view time = tok[i + 2];
  if (time != "-") {
    const ParsedTime t = parse_timestamp(time);
    if (!t.time) return reject(RejectReason::bad_timestamp, "time " + quoted(time) + ": " + t.error.reason);
    r.record.time = t.time;
  }
  DecodeResult err;
  if (r.record.kind == RecordKind::pair) {
    if (!parse_value(tok[i + 3], "reference", r.record.reference, err)) return err;
    if (!parse_value(tok[i + 4], "sensor", r.record.sensor, err)) return err;
  } else {
    if (!parse_value(tok[i + 3], "sensor", r.record.sensor, err)) return err;
  }
  r.ok = true;
  return r;
}

}  // namespace rigcal::protocol
