// Any bytes as a journal segment: the reader skips what is corrupt, never reads out of bounds, and
// its report is consistent with the input (valid_bytes within it, entries counted as delivered).
// Byte 0 chooses: even = the bytes as a segment; odd = the bytes as one frame's payload, framed
// with a correct header and CRC so that the entry parser behind the checksum is reached too.
#include <cstdint>
#include <cstdlib>
#include <string>
#include <string_view>

#include "rigcal/state/binary_codec.hpp"
#include "rigcal/state/crc32c.hpp"
#include "rigcal/state/journal_format.hpp"

namespace {
volatile unsigned name_bytes_seen = 0;  // keeps the reads below from being optimised away
}

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size < 1) return 0;
  std::string input(reinterpret_cast<const char*>(data + 1), size - 1);
  if (data[0] & 1) {
    rigcal::state::BinaryWriter w;
    w.u32(rigcal::state::journal_magic);
    w.u32(static_cast<std::uint32_t>(input.size()));
    w.u32(rigcal::state::crc32c(input));
    input = w.buffer() + input;
  }
  const std::string_view bytes(input);
  size = bytes.size();
  std::uint64_t delivered = 0;
  const auto report = rigcal::state::read_journal_segment(bytes, [&](const rigcal::state::JournalEntry& e) {
    ++delivered;
    // Names view the input or the reader's dictionary: they must be readable for the callback's
    // duration (ASan checks every byte touched here).
    unsigned sum = 0;
    for (const char c : e.channel) sum += static_cast<unsigned char>(c);
    for (const char c : e.stream) sum += static_cast<unsigned char>(c);
    name_bytes_seen = name_bytes_seen + sum;
  });
  if (report.valid_bytes > size || report.entries != delivered) std::abort();
  return 0;
}
