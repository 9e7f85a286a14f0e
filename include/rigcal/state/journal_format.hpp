#pragma once
// The journal: every record rigcald accepts is appended here before it counts, so that a restart
// (even after kill -9 or a power cut) rebuilds exactly the state an uninterrupted run would have.
//
// A journal is a series of segment files, each self-contained. A segment is a sequence of frames:
//   u32 magic "RGJ1" | u32 payload bytes | u32 CRC-32C of payload | payload
// A payload is a sequence of entries, each starting with a u8 type:
//   1 channel  u32 id, text name       (defines an id for the rest of the segment)
//   2 stream   u32 id, text name       (stream id 0 means "no stream")
//   3 pair     u32 channel, u32 stream, u64 seq, i64 time_ns, f64 reference_raw, f64 sensor_raw
//   4 reading  u32 channel, u32 stream, u64 seq, i64 time_ns, f64 sensor_raw
//   5 tick     i64 time_ns             (the clock closed due averaging buckets at this time)
//   6 reset    u32 channel, i64 time_ns (an operator reset the channel: as-left)
// All integers little-endian; text is u32 length + bytes. Values are the raw ones received:
// linearisation and screening are re-derived on replay.
//
// Reading is defensive: a frame whose header, length or CRC is wrong is skipped, the reader
// searches forward for the next magic, and a torn frame at the end of a segment (a write cut short)
// is reported as such. Nothing in a corrupt segment can crash the reader (fuzzed).
#include <cstdint>
#include <functional>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/state/binary_codec.hpp"

namespace rigcal::state {

inline constexpr std::uint32_t journal_magic = 0x314A4752u;  // "RGJ1" in file byte order
inline constexpr std::size_t journal_frame_header_bytes = 12;
inline constexpr std::uint32_t journal_max_frame_bytes = 64u << 20;

enum class JournalEntryType : std::uint8_t { channel = 1, stream = 2, pair = 3, reading = 4, tick = 5, reset = 6 };

struct JournalEntry {
  JournalEntryType type{};
  std::string_view channel;  // pair, reading, reset
  std::string_view stream;   // pair, reading ("" when none)
  std::uint64_t seq = 0;     // 0 when the record carried none
  protocol::TimeNs time = 0;
  double reference_raw = 0;
  double sensor_raw = 0;
};

// Builds frames for one segment. Dictionary entries are emitted the first time a name is used in
// the segment; start_segment() forgets them.
class JournalEncoder {
 public:
  void start_segment();
  void pair(std::string_view channel, std::string_view stream, std::uint64_t seq, protocol::TimeNs t, double x,
            double y);
  void reading(std::string_view channel, std::string_view stream, std::uint64_t seq, protocol::TimeNs t, double y);
  void tick(protocol::TimeNs t);
  void reset(std::string_view channel, protocol::TimeNs t);

  bool empty() const { return payload_.size() == 0; }
  std::size_t pending_entries() const { return entries_; }
  // Appends the pending entries as one frame to `out` and clears them. No-op when empty.
  void finish_frame(std::string& out);
  // Drops the pending entries and any names they defined (a write that failed will be redone).
  void abandon_frame();

 private:
  // Looked up by string_view: a record's name is found without first being copied into a string.
  struct NameHash {
    using is_transparent = void;
    std::size_t operator()(std::string_view s) const { return std::hash<std::string_view>{}(s); }
  };
  using Dictionary = std::unordered_map<std::string, std::uint32_t, NameHash, std::equal_to<>>;
  std::uint32_t id_for(Dictionary& dict, std::vector<std::string>& fresh, JournalEntryType type, std::string_view name);
  Dictionary channels_, streams_;
  std::vector<std::string> fresh_channels_, fresh_streams_;  // defined in the pending frame
  BinaryWriter payload_;
  std::size_t entries_ = 0;
};

struct JournalReadReport {
  std::uint64_t frames = 0;
  std::uint64_t entries = 0;
  std::uint64_t corrupt_frames = 0;    // bad CRC or malformed payload, skipped
  std::uint64_t skipped_bytes = 0;     // bytes passed over while resynchronising
  bool torn_tail = false;              // the segment ends inside a frame
  std::size_t valid_bytes = 0;         // end offset of the last good frame
  std::vector<std::string> problems;   // one line each, with byte offsets
};

// Decodes one segment's bytes, calling on_entry for every entry of every good frame in order.
JournalReadReport read_journal_segment(std::string_view bytes, const std::function<void(const JournalEntry&)>& on_entry);

}  // namespace rigcal::state
