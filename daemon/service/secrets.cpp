#include "secrets.hpp"

#include <openssl/crypto.h>
#include <openssl/evp.h>
#include <sys/stat.h>

#include <fstream>

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
  if (!in || !std::getline(in, line)) return Error{path + ": cannot read the secret file"};
  // The same rule as rigcal's --secret-file: surrounding blanks dropped, one word, because AUTH takes
  // a single argument: a secret with a space in it could never be sent, and every sender would be
  // refused.
  const auto first = line.find_first_not_of(" \t\r");
  if (first == std::string::npos) return Error{path + ": the secret is empty"};
  line = line.substr(first, line.find_last_not_of(" \t\r") - first + 1);
  if (line.find_first_of(" \t") != std::string::npos)
    return Error{path + ": the secret must be one word (AUTH takes a single argument)"};
  return line;
}

}  // namespace rigcal::service
