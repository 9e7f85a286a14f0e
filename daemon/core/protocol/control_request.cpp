#include "rigcal/protocol/control_request.hpp"

#include <vector>

namespace rigcal::protocol {

namespace {

constexpr const char* usage = "ERR unknown_request expected: status [CHANNEL] | metrics | reset CHANNEL | checkpoint";

std::vector<std::string_view> words(std::string_view s) {
  std::vector<std::string_view> out;
  std::size_t i = 0;
  while (i < s.size()) {
    while (i < s.size() && (s[i] == ' ' || s[i] == '\t')) ++i;
    std::size_t j = i;
    while (j < s.size() && s[j] != ' ' && s[j] != '\t') ++j;
    if (j > i) out.push_back(s.substr(i, j - i));
    i = j;
  }
  return out;
}

ControlRequest refuse(std::string error) {
  ControlRequest r;
  r.error = std::move(error);
  return r;
}

ControlRequest accept(ControlVerb verb, std::string_view channel = {}) {
  ControlRequest r;
  r.ok = true;
  r.verb = verb;
  r.channel = std::string(channel);
  return r;
}

}  // namespace

ControlRequest parse_control_request(std::string_view line) {
  if (line.size() > max_control_request_bytes) return refuse("ERR request_too_long at most 4096 bytes");
  while (!line.empty() && (line.back() == '\r' || line.back() == '\n')) line.remove_suffix(1);
  const auto w = words(line);
  if (w.empty() || w.size() > 2) return refuse(usage);
  const std::string_view arg = w.size() == 2 ? w[1] : std::string_view();
  if (w[0] == "status") return accept(ControlVerb::status, arg);
  if (w[0] == "metrics" && arg.empty()) return accept(ControlVerb::metrics);
  if (w[0] == "checkpoint" && arg.empty()) return accept(ControlVerb::checkpoint);
  if (w[0] == "reset") {
    if (arg.empty()) return refuse("ERR reset name the channel to reset: reset CHANNEL");
    return accept(ControlVerb::reset, arg);
  }
  return refuse(usage);
}

ControlAuth parse_control_auth(std::string_view line) {
  while (!line.empty() && (line.back() == '\r' || line.back() == '\n')) line.remove_suffix(1);
  if (line.size() <= 5 || line.substr(0, 5) != "AUTH ") return {};
  return ControlAuth{true, line.substr(5)};
}

}  // namespace rigcal::protocol
