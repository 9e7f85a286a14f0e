#include "secrets.hpp"

#include <openssl/crypto.h>
#include <openssl/evp.h>
#include <sys/stat.h>

#include <fstream>

#include "rigcal/protocol/auth_secret.hpp"

namespace rigcal::service {

namespace {
void sha256(std::string_view s, unsigned char (&out)[32]) {
  unsigned int len = 0;
  EVP_Digest(s.data(), s.size(), out, &len, EVP_sha256(), nullptr);
}
}  // namespace

bool secrets_equal(std::string_view a, std::string_view b) {
  unsigned char da[32], db[32];
  sha256(a, da);
  sha256(b, db);
  return CRYPTO_memcmp(da, db, sizeof da) == 0;
}

Result<std::string> read_secret_file(const std::string& path) {
  struct stat st{};
  if (::stat(path.c_str(), &st) != 0) return Error{path + ": cannot read the secret file"};
  if (st.st_mode & S_IROTH) return Error{path + ": secret file is readable by every user; chmod o-r it"};
  std::ifstream in(path);
  std::string line;
  // Only the first line is read: what follows it does not change the secret.
  if (!in || !std::getline(in, line)) return Error{path + ": cannot read the secret file"};
  return protocol::auth_secret_from_text(line, path);
}

}  // namespace rigcal::service
