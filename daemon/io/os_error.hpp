#pragma once
// OS errors wrapped once, with the file or endpoint they concern: "journal-0000000000000007.rgj:
// write: No space left on device".
#include <cerrno>
#include <cstring>
#include <string>

namespace rigcal::io {

inline std::string os_error(const std::string& context, int err = errno) {
  return context + ": " + std::strerror(err);
}

}  // namespace rigcal::io
