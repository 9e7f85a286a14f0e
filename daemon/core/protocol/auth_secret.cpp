#include "rigcal/protocol/auth_secret.hpp"

namespace rigcal::protocol {

Result<std::string> auth_secret_from_text(std::string_view text, std::string_view source) {
  constexpr std::string_view blanks = " \t\r\n";
  const auto first = text.find_first_not_of(blanks);
  if (first == std::string_view::npos) return Error{std::string(source) + ": the secret file is empty"};
  const std::string_view word = text.substr(first, text.find_last_not_of(blanks) - first + 1);
  if (word.find_first_of(blanks) != std::string_view::npos)
    return Error{std::string(source) + ": the secret must be one word (AUTH takes a single argument)"};
  return std::string(word);
}

}  // namespace rigcal::protocol
