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

}  // namespace

std::uint32_t crc32c(const void* data, std::size_t size, std::uint32_t crc) {
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
