// Byte-level state encoding: CRC-32C check values and a reader that cannot overrun its input.
#include <catch2/catch.hpp>
#include <string>

#include "rigcal/state/binary_codec.hpp"
#include "rigcal/state/crc32c.hpp"

using namespace rigcal::state;

TEST_CASE("CRC-32C matches the RFC 3720 check values") {
  // RFC 3720 (iSCSI), appendix B.4: 32 bytes of zeros -> 0x8A9136AA, 32 bytes of 0xFF -> 0x62A8AB43,
  // bytes 0x00..0x1F ascending -> 0x46DD794E.
  CHECK(crc32c(std::string(32, '\0')) == 0x8A9136AAu);
  CHECK(crc32c(std::string(32, '\xFF')) == 0x62A8AB43u);
  std::string ascending;
  for (int i = 0; i < 32; ++i) ascending.push_back(static_cast<char>(i));
  CHECK(crc32c(ascending) == 0x46DD794Eu);
  // The usual check value for "123456789" (common practice, no single source): 0xE3069283.
  CHECK(crc32c("123456789") == 0xE3069283u);
}

TEST_CASE("CRC-32C: the crc32 instruction and the tables agree") {
  CHECK(crc32c_portable("123456789", 9) == 0xE3069283u);
  std::string data;
  for (int n = 0; n < 300; ++n) {
    CHECK(crc32c(data) == crc32c_portable(data.data(), data.size()));
    CHECK(crc32c(data, 0x12345678u) == crc32c_portable(data.data(), data.size(), 0x12345678u));
    data.push_back(static_cast<char>(n * 37 + 11));
  }
}

TEST_CASE("CRC-32C continues across pieces and sees every bit flip") {
  const std::string data = "P TT-101 2026-12-01T08:00:00Z 80.0 80.1\n";
  CHECK(crc32c(data.substr(13), crc32c(data.substr(0, 13))) == crc32c(data));
  for (std::size_t i = 0; i < data.size(); ++i) {
    std::string flipped = data;
    flipped[i] = static_cast<char>(flipped[i] ^ 0x10);
    CHECK(crc32c(flipped) != crc32c(data));
  }
}

TEST_CASE("binary values round-trip and a short input fails cleanly") {
  BinaryWriter w;
  w.u8(7);
  w.u32(0xDEADBEEF);
  w.i64(-42);
  w.f64(0.1);
  w.text("TT-101");
  w.boolean(true);
  BinaryReader r(w.buffer());
  CHECK(r.u8() == 7);
  CHECK(r.u32() == 0xDEADBEEF);
  CHECK(r.i64() == -42);
  CHECK(r.f64() == 0.1);
  CHECK(r.text() == "TT-101");
  CHECK(r.boolean());
  CHECK(r.ok());
  CHECK(r.at_end());
  for (std::size_t cut = 0; cut < w.size(); ++cut) {
    BinaryReader shortened(std::string_view(w.buffer()).substr(0, cut));
    shortened.u8();
    shortened.u32();
    shortened.i64();
    shortened.f64();
    shortened.text();
    shortened.boolean();
    CHECK_FALSE(shortened.ok());
  }
}

TEST_CASE("a corrupt length or count cannot make the reader allocate or overrun") {
  BinaryWriter w;
  w.u32(0xFFFFFFF0u);  // a text length far beyond the input
  BinaryReader r(w.buffer());
  CHECK(r.text().empty());
  CHECK_FALSE(r.ok());
  BinaryWriter c;
  c.u64(1ull << 60);
  BinaryReader rc(c.buffer());
  CHECK(rc.count(16) == 0);
  CHECK_FALSE(rc.ok());
}
