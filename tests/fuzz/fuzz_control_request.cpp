// Any bytes as a control-socket request line: parsed or refused with an ERR line, never a crash.
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "rigcal/protocol/control_request.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view line(reinterpret_cast<const char*>(data), size);
  using namespace rigcal::protocol;
  const ControlRequest r = parse_control_request(line);
  if (!r.ok && r.error.rfind("ERR ", 0) != 0) std::abort();
  if (r.ok && r.verb == ControlVerb::reset && r.channel.empty()) std::abort();
  if (r.ok && r.channel.find_first_of(" \t") != std::string::npos) std::abort();
  const ControlAuth a = parse_control_auth(line);
  if (a.ok && a.secret.empty()) std::abort();
  return 0;
}
