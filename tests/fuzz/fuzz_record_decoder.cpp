// Any bytes as one protocol line: decode_record and peek_sequence must never crash, and what they
// accept must be self-consistent (views inside the line, finite numbers, a valid channel name).
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "rigcal/protocol/record.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view line(reinterpret_cast<const char*>(data), size);
  using namespace rigcal::protocol;
  (void)peek_sequence(line);
  (void)is_valid_utf8(line);
  const DecodeResult d = decode_record(line);
  if (!d.ok) {
    if (d.detail.empty()) std::abort();  // every refusal says why
    return 0;
  }
  const Record& r = d.record;
  auto inside = [&](std::string_view v) {
    return v.empty() || (v.data() >= line.data() && v.data() + v.size() <= line.data() + line.size());
  };
  if (!inside(r.channel) || !inside(r.argument)) std::abort();
  if (r.kind == RecordKind::pair || r.kind == RecordKind::reading) {
    if (!is_valid_channel_name(r.channel)) std::abort();
    if (!std::isfinite(r.sensor) || !std::isfinite(r.reference)) std::abort();
    if (r.seq && *r.seq == 0) std::abort();
  }
  return 0;
}
