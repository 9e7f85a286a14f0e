#pragma once
// Shared secrets for sender and control-client authentication.
#include <string>
#include <string_view>

#include "rigcal/result.hpp"

namespace rigcal::service {

// Equal secrets, compared in time independent of where they differ and of their lengths (both are
// hashed with SHA-256 first, then the digests compared with CRYPTO_memcmp).
bool secrets_equal(std::string_view a, std::string_view b);

// The first line of a secret file, without its newline. Refuses an empty secret, and a file that
// other users may read (mode & 0004).
Result<std::string> read_secret_file(const std::string& path);

}  // namespace rigcal::service
