#include "rigcal/state/checkpoint_format.hpp"

#include "rigcal/state/binary_codec.hpp"
#include "rigcal/state/crc32c.hpp"

namespace rigcal::state {

std::string encode_checkpoint(const Checkpoint& c) {
  BinaryWriter w;
  w.u32(checkpoint_magic);
  w.u32(checkpoint_layout_version);
  w.u64(c.number);
  w.u64(c.first_segment);
  w.i64(c.written);
  w.u64(c.streams.size());
  for (const auto& s : c.streams) {
    w.text(s.name);
    w.u64(s.high_water);
  }
  w.u64(c.channels.size());
  for (const auto& ch : c.channels) {
    w.text(ch.id);
    w.u64(ch.fingerprint);
    w.text(ch.blob);
  }
  w.u32(crc32c(w.buffer()));
  return std::move(w.buffer());
}

Result<Checkpoint> decode_checkpoint(std::string_view bytes) {
  if (bytes.size() < 4 + 4 + 8 + 8 + 8 + 8 + 8 + 4) return Error{"checkpoint too short (" + std::to_string(bytes.size()) + " bytes)"};
  BinaryReader tail(bytes.substr(bytes.size() - 4));
  const std::uint32_t stored = tail.u32();
  const std::string_view body = bytes.substr(0, bytes.size() - 4);
  if (crc32c(body) != stored) return Error{"checkpoint checksum mismatch (file corrupted)"};
  BinaryReader r(body);
  if (r.u32() != checkpoint_magic) return Error{"not a rigcald checkpoint"};
  const std::uint32_t layout = r.u32();
  if (layout != checkpoint_layout_version)
    return Error{"checkpoint layout " + std::to_string(layout) + " is not the supported " +
                 std::to_string(checkpoint_layout_version)};
  Checkpoint c;
  c.number = r.u64();
  c.first_segment = r.u64();
  c.written = r.i64();
  const std::uint64_t streams = r.count(12);
  for (std::uint64_t i = 0; i < streams && r.ok(); ++i) {
    CheckpointStream s;
    s.name = r.text(256);
    s.high_water = r.u64();
    c.streams.push_back(std::move(s));
  }
  const std::uint64_t channels = r.count(16);
  for (std::uint64_t i = 0; i < channels && r.ok(); ++i) {
    CheckpointChannel ch;
    ch.id = r.text(256);
    ch.fingerprint = r.u64();
    ch.blob = r.text(std::size_t{1} << 31);
    c.channels.push_back(std::move(ch));
  }
  if (!r.ok() || !r.at_end()) return Error{"checkpoint is malformed"};
  return c;
}

}  // namespace rigcal::state
