#pragma once
// CRC-32C (Castagnoli polynomial 0x1EDC6F41, reflected 0x82F63B78), as used by iSCSI (RFC 3720) and
// ext4; detects torn or corrupted journal frames and checkpoints. The CPU's crc32 instruction where
// there is one (x86-64 with SSE 4.2), else tables (slicing by 8).
#include <cstddef>
#include <cstdint>
#include <string_view>

namespace rigcal::state {

// Continues a CRC over more bytes: crc32c(b, crc32c(a)) == crc32c(a + b). Start with 0.
std::uint32_t crc32c(const void* data, std::size_t size, std::uint32_t crc = 0);
inline std::uint32_t crc32c(std::string_view s, std::uint32_t crc = 0) { return crc32c(s.data(), s.size(), crc); }
// The table-driven computation alone (what crc32c uses without the instruction; tests compare both).
std::uint32_t crc32c_portable(const void* data, std::size_t size, std::uint32_t crc = 0);

}  // namespace rigcal::state
