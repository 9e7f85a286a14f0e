#pragma once
// The control socket's request line (one per connection, after an optional AUTH line):
//
//   status [CHANNEL] | metrics | reset CHANNEL | checkpoint
//
// Words are separated by spaces or tabs; a request has at most two words and is at most
// max_control_request_bytes long. Parsing is pure (bytes in, value out) so that it can be fuzzed;
// the daemon answers the parsed request.
#include <cstddef>
#include <string>
#include <string_view>

namespace rigcal::protocol {

inline constexpr std::size_t max_control_request_bytes = 4096;

enum class ControlVerb { status, metrics, reset, checkpoint };

struct ControlRequest {
  bool ok = false;
  ControlVerb verb = ControlVerb::status;
  std::string channel;  // status (optional), reset (required)
  std::string error;    // when !ok: "ERR <word> <text>" without the newline
};

ControlRequest parse_control_request(std::string_view line);

// "AUTH SECRET": ok and the secret (a view into `line`); anything else: !ok.
struct ControlAuth {
  bool ok = false;
  std::string_view secret;
};
ControlAuth parse_control_auth(std::string_view line);

}  // namespace rigcal::protocol
