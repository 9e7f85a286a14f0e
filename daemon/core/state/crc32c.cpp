#include "rigcal/state/crc32c.hpp"

#include <array>
#include <cstring>

namespace rigcal::state {

namespace {

constexpr std::uint32_t poly = 0x82F63B78u;

struct Tables {
  std::uint32_t t[8][256];
};

constexpr Tables make_tables() {
  Tables tables{};
  for (std::uint32_t i = 0; i < 256; ++i) {
    std::uint32_t c = i;
    for (int k = 0; k < 8; ++k) c = (c & 1) ? (c >> 1) ^ poly : c >> 1;
    tables.t[0][i] = c;
  }
  for (std::uint32_t i = 0; i < 256; ++i)
    for (int s = 1; s < 8; ++s) tables.t[s][i] = (tables.t[s - 1][i] >> 8) ^ tables.t[0][tables.t[s - 1][i] & 0xFF];
  return tables;
}

constexpr Tables tables = make_tables();

#if defined(__x86_64__)
// SSE 4.2's crc32 instruction computes exactly this polynomial (Castagnoli), 8 bytes per step:
// several times faster than the tables. Chosen at run time, so the binary still runs without it.
__attribute__((target("sse4.2"))) std::uint32_t crc32c_sse42(const unsigned char* p, std::size_t size,
                                                              std::uint32_t crc) {
  std::uint64_t c = ~crc;
  for (; size >= 8; p += 8, size -= 8) {
    std::uint64_t word;
    std::memcpy(&word, p, 8);
    c = __builtin_ia32_crc32di(c, word);
  }
  auto c32 = static_cast<std::uint32_t>(c);
  while (size--) c32 = __builtin_ia32_crc32qi(c32, *p++);
  return ~c32;
}

const bool have_sse42 = [] {
  __builtin_cpu_init();  // needed before __builtin_cpu_supports in a static initializer
  return __builtin_cpu_supports("sse4.2") != 0;
}();
#endif

}  // namespace

std::uint32_t crc32c(const void* data, std::size_t size, std::uint32_t crc) {
#if defined(__x86_64__)
  if (have_sse42) return crc32c_sse42(static_cast<const unsigned char*>(data), size, crc);
#endif
  return crc32c_portable(data, size, crc);
}

std::uint32_t crc32c_portable(const void* data, std::size_t size, std::uint32_t crc) {
  const auto* p = static_cast<const unsigned char*>(data);
  crc = ~crc;
  while (size >= 8) {
    std::uint64_t word;
    std::memcpy(&word, p, 8);  // little-endian host assumed (x86-64, aarch64)
    word ^= crc;
    crc = tables.t[7][word & 0xFF] ^ tables.t[6][(word >> 8) & 0xFF] ^ tables.t[5][(word >> 16) & 0xFF] ^
          tables.t[4][(word >> 24) & 0xFF] ^ tables.t[3][(word >> 32) & 0xFF] ^ tables.t[2][(word >> 40) & 0xFF] ^
          tables.t[1][(word >> 48) & 0xFF] ^ tables.t[0][word >> 56];
    p += 8;
    size -= 8;
  }
  while (size--) crc = (crc >> 8) ^ tables.t[0][(crc ^ *p++) & 0xFF];
  return ~crc;
}

}  // namespace rigcal::state
