// The line splitter fed the same bytes in random chunks must deliver the same lines as when fed
// whole, never a line longer than max_line_bytes, and hold at most max_line_bytes + 1 bytes.
// Input: byte 0 picks max_line_bytes (1..256), the next 8 bytes seed the chunking, the rest is data.
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <random>
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/protocol/line_splitter.hpp"

namespace {
struct Seen {
  std::string text;
  std::uint64_t number;
  bool too_long;
  bool operator==(const Seen&) const = default;
};

std::vector<Seen> split(std::string_view data, std::size_t max, std::uint64_t seed, bool chunked) {
  rigcal::protocol::LineSplitter s(max);
  std::vector<Seen> out;
  auto on_line = [&](const rigcal::protocol::Line& l) {
    if (l.text.size() > max) std::abort();
    out.push_back({std::string(l.text), l.number, l.too_long});
  };
  std::mt19937_64 rng(seed);
  while (!data.empty()) {
    const std::size_t n = chunked ? std::min<std::size_t>(data.size(), 1 + rng() % 64) : data.size();
    s.feed(data.substr(0, n), on_line);
    if (s.buffered_bytes() > max + 1) std::abort();
    data.remove_prefix(n);
  }
  s.finish(on_line);
  return out;
}
}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size < 9) return 0;
  const std::size_t max = 1 + data[0] % 256;
  std::uint64_t seed = 0;
  std::memcpy(&seed, data + 1, 8);
  const std::string_view bytes(reinterpret_cast<const char*>(data + 9), size - 9);
  const auto whole = split(bytes, max, seed, false);
  const auto chunked = split(bytes, max, seed, true);
  if (whole != chunked) std::abort();
  for (std::size_t i = 0; i < whole.size(); ++i)
    if (whole[i].number != i + 1) std::abort();
  return 0;
}
