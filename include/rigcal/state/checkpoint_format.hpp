#pragma once
// The checkpoint: the complete engine state at a journal segment boundary, so that a restart
// restores it and replays only the segments after it.
//
//   u32 magic "RGC1" | u32 layout version | u64 checkpoint number | u64 first segment to replay |
//   i64 time written | u64 stream count, then (text name, u64 high-water seq) each |
//   u64 channel count, then (text id, u64 configuration fingerprint, text state blob) each |
//   u32 CRC-32C of everything before it
//
// A checkpoint whose CRC does not match is refused as a whole (the caller falls back to the
// previous checkpoint and a longer replay).
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/result.hpp"

namespace rigcal::state {

inline constexpr std::uint32_t checkpoint_magic = 0x31434752u;  // "RGC1"
inline constexpr std::uint32_t checkpoint_layout_version = 1;

struct CheckpointStream {
  std::string name;
  std::uint64_t high_water = 0;
};

struct CheckpointChannel {
  std::string id;
  std::uint64_t fingerprint = 0;
  std::string blob;  // ChannelEngine::save
};

struct Checkpoint {
  std::uint64_t number = 0;
  std::uint64_t first_segment = 0;  // replay journal segments >= this
  protocol::TimeNs written = 0;
  std::vector<CheckpointStream> streams;
  std::vector<CheckpointChannel> channels;
};

std::string encode_checkpoint(const Checkpoint& c);
Result<Checkpoint> decode_checkpoint(std::string_view bytes);

}  // namespace rigcal::state
