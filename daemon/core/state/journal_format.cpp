#include "rigcal/state/journal_format.hpp"

#include <cstring>

#include "rigcal/state/crc32c.hpp"

namespace rigcal::state {

void JournalEncoder::start_segment() {
  channels_.clear();
  streams_.clear();
  fresh_channels_.clear();
  fresh_streams_.clear();
  payload_ = BinaryWriter{};
  entries_ = 0;
}

std::uint32_t JournalEncoder::id_for(Dictionary& dict, std::vector<std::string>& fresh, JournalEntryType type,
                                     std::string_view name) {
  if (name.empty()) return 0;
  const auto it = dict.find(name);
  if (it != dict.end()) return it->second;
  const auto id = static_cast<std::uint32_t>(dict.size() + 1);
  dict.emplace(std::string(name), id);
  fresh.emplace_back(name);
  payload_.u8(static_cast<std::uint8_t>(type));
  payload_.u32(id);
  payload_.text(name);
  return id;
}

void JournalEncoder::pair(std::string_view channel, std::string_view stream, std::uint64_t seq, protocol::TimeNs t,
                          double x, double y) {
  const std::uint32_t c = id_for(channels_, fresh_channels_, JournalEntryType::channel, channel);
  const std::uint32_t s = id_for(streams_, fresh_streams_, JournalEntryType::stream, stream);
  // One append of the whole entry (the journal's most frequent one) instead of seven.
  char entry[41];
  entry[0] = static_cast<char>(JournalEntryType::pair);
  std::memcpy(entry + 1, &c, 4);
  std::memcpy(entry + 5, &s, 4);
  std::memcpy(entry + 9, &seq, 8);
  std::memcpy(entry + 17, &t, 8);
  std::memcpy(entry + 25, &x, 8);
  std::memcpy(entry + 33, &y, 8);
  payload_.raw(entry, sizeof entry);
  ++entries_;
}

void JournalEncoder::reading(std::string_view channel, std::string_view stream, std::uint64_t seq, protocol::TimeNs t,
                             double y) {
  const std::uint32_t c = id_for(channels_, fresh_channels_, JournalEntryType::channel, channel);
  const std::uint32_t s = id_for(streams_, fresh_streams_, JournalEntryType::stream, stream);
  payload_.u8(static_cast<std::uint8_t>(JournalEntryType::reading));
  payload_.u32(c);
  payload_.u32(s);
  payload_.u64(seq);
  payload_.i64(t);
  payload_.f64(y);
  ++entries_;
}

void JournalEncoder::tick(protocol::TimeNs t) {
  payload_.u8(static_cast<std::uint8_t>(JournalEntryType::tick));
  payload_.i64(t);
  ++entries_;
}

void JournalEncoder::reset(std::string_view channel, protocol::TimeNs t) {
  const std::uint32_t c = id_for(channels_, fresh_channels_, JournalEntryType::channel, channel);
  payload_.u8(static_cast<std::uint8_t>(JournalEntryType::reset));
  payload_.u32(c);
  payload_.i64(t);
  ++entries_;
}

void JournalEncoder::finish_frame(std::string& out) {
  if (payload_.size() == 0) return;
  const std::string& p = payload_.buffer();
  BinaryWriter header;
  header.u32(journal_magic);
  header.u32(static_cast<std::uint32_t>(p.size()));
  header.u32(crc32c(p));
  out.append(header.buffer());
  out.append(p);
  payload_ = BinaryWriter{};
  entries_ = 0;
  fresh_channels_.clear();
  fresh_streams_.clear();
}

void JournalEncoder::abandon_frame() {
  for (const auto& n : fresh_channels_) channels_.erase(n);
  for (const auto& n : fresh_streams_) streams_.erase(n);
  fresh_channels_.clear();
  fresh_streams_.clear();
  payload_ = BinaryWriter{};
  entries_ = 0;
}

namespace {

// Names defined so far in the segment. unordered_map keeps references to its elements valid across
// inserts, so entries can view the names.
struct Dictionaries {
  std::unordered_map<std::uint32_t, std::string> channels, streams;
};

struct RawEntry {
  JournalEntry entry;
  std::uint32_t channel = 0, stream = 0;
};

struct Definition {
  bool channel = false;
  std::uint32_t id = 0;
  std::string name;
};

// First step: parse one frame's payload without touching the dictionaries. False if malformed.
bool parse_payload(std::string_view payload, std::vector<RawEntry>& out, std::vector<Definition>& defs) {
  BinaryReader r(payload);
  while (!r.at_end()) {
    RawEntry raw;
    JournalEntry& e = raw.entry;
    e.type = static_cast<JournalEntryType>(r.u8());
    switch (e.type) {
      case JournalEntryType::channel:
      case JournalEntryType::stream: {
        Definition d;
        d.channel = e.type == JournalEntryType::channel;
        d.id = r.u32();
        d.name = r.text(256);
        if (!r.ok() || d.id == 0) return false;
        defs.push_back(std::move(d));
        continue;
      }
      case JournalEntryType::pair:
      case JournalEntryType::reading:
        raw.channel = r.u32();
        raw.stream = r.u32();
        e.seq = r.u64();
        e.time = r.i64();
        if (e.type == JournalEntryType::pair) e.reference_raw = r.f64();
        e.sensor_raw = r.f64();
        if (raw.channel == 0) return false;
        break;
      case JournalEntryType::tick:
        e.time = r.i64();
        break;
      case JournalEntryType::reset:
        raw.channel = r.u32();
        e.time = r.i64();
        if (raw.channel == 0) return false;
        break;
      default:
        return false;
    }
    if (!r.ok()) return false;
    out.push_back(raw);
  }
  return r.ok();
}

// Second step: resolve ids against the dictionaries (after the frame's definitions were added).
bool resolve(Dictionaries& dict, RawEntry& raw) {
  if (raw.channel != 0) {
    const auto it = dict.channels.find(raw.channel);
    if (it == dict.channels.end()) return false;
    raw.entry.channel = it->second;
  }
  if (raw.stream != 0) {
    const auto it = dict.streams.find(raw.stream);
    if (it == dict.streams.end()) return false;
    raw.entry.stream = it->second;
  }
  return true;
}

}  // namespace

JournalReadReport read_journal_segment(std::string_view bytes, const std::function<void(const JournalEntry&)>& on_entry) {
  JournalReadReport rep;
  Dictionaries dict;
  std::size_t pos = 0;
  auto problem = [&rep](std::size_t at, const std::string& what) {
    rep.problems.push_back("at byte " + std::to_string(at) + ": " + what);
  };
  // Looks for the next frame magic after `from`; returns bytes.size() if none.
  auto resync = [&bytes](std::size_t from) {
    for (std::size_t i = from; i + 4 <= bytes.size(); ++i) {
      std::uint32_t m;
      std::memcpy(&m, bytes.data() + i, 4);
      if (m == journal_magic) return i;
    }
    return bytes.size();
  };
  while (pos < bytes.size()) {
    if (bytes.size() - pos < journal_frame_header_bytes) {
      rep.torn_tail = true;
      problem(pos, "segment ends inside a frame header (torn write)");
      break;
    }
    BinaryReader h(bytes.substr(pos, journal_frame_header_bytes));
    const std::uint32_t magic = h.u32(), len = h.u32(), crc = h.u32();
    if (magic != journal_magic || len > journal_max_frame_bytes) {
      const std::size_t next = resync(pos + 1);
      problem(pos, "no frame header here; skipped " + std::to_string(next - pos) + " bytes");
      rep.skipped_bytes += next - pos;
      ++rep.corrupt_frames;
      pos = next;
      continue;
    }
    if (bytes.size() - pos - journal_frame_header_bytes < len) {
      rep.torn_tail = true;
      problem(pos, "segment ends inside a frame of " + std::to_string(len) + " bytes (torn write)");
      break;
    }
    const std::string_view payload = bytes.substr(pos + journal_frame_header_bytes, len);
    std::vector<RawEntry> entries;
    std::vector<Definition> defs;
    bool good = crc32c(payload) == crc && parse_payload(payload, entries, defs);
    if (good) {
      // Add this frame's definitions; take them out again if the frame turns out unusable, so a
      // corrupt frame leaves the dictionaries as they were.
      std::vector<std::pair<bool, std::uint32_t>> added;
      for (Definition& d : defs) {
        auto& map = d.channel ? dict.channels : dict.streams;
        if (map.emplace(d.id, std::move(d.name)).second) added.emplace_back(d.channel, d.id);
      }
      for (RawEntry& e : entries) good = good && resolve(dict, e);
      if (!good)
        for (const auto& [channel, id] : added) (channel ? dict.channels : dict.streams).erase(id);
    }
    if (!good) {
      const std::size_t next = resync(pos + 1);
      problem(pos, crc32c(payload) != crc ? "frame checksum mismatch; frame skipped" : "malformed frame skipped");
      rep.skipped_bytes += next - pos;
      ++rep.corrupt_frames;
      pos = next;
      continue;
    }
    for (const RawEntry& e : entries) on_entry(e.entry);
    rep.entries += entries.size();
    ++rep.frames;
    pos += journal_frame_header_bytes + len;
    rep.valid_bytes = pos;
  }
  return rep;
}

}  // namespace rigcal::state
