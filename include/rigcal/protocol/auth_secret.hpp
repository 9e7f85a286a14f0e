#pragma once
// The shared secret a sender or a control client sends with AUTH, as read from a secret file.
//
// AUTH takes a single argument, so the secret is one word: surrounding blanks and line ends are
// dropped, and a blank inside is refused, since such a secret could never be sent and every sender
// would be refused. rigcald (reading its listeners' and control socket's files) and rigcal (reading
// --secret-file) apply this one rule, so a file that one accepts the other accepts too.
#include <string>
#include <string_view>

#include "rigcal/result.hpp"

namespace rigcal::protocol {

// `text`: the file's content (or the part of it the caller reads); `source`: the file's path, which
// prefixes every error message.
Result<std::string> auth_secret_from_text(std::string_view text, std::string_view source);

}  // namespace rigcal::protocol
