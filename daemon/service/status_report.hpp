#pragma once
// Answers of the control socket: the status of the daemon and its channels (JSON), and the
// counters in the OpenMetrics text format (counters end in _total; the exposition ends with # EOF).
#include <nlohmann/json.hpp>
#include <string>

#include "counters.hpp"
#include "rigcal/engine/engine.hpp"

namespace rigcal::service {

struct DaemonFacts {
  std::string version;
  protocol::TimeNs started = 0;
  protocol::TimeNs now = 0;
  std::string state_directory;
  std::uint64_t journal_segment = 0;
  std::uint64_t journal_appended = 0;
  std::uint64_t journal_durable = 0;
  bool journal_blocked = false;
  std::string journal_error;
  std::uint64_t checkpoint_number = 0;
  protocol::TimeNs checkpoint_time = 0;
  std::size_t historian_subscribers = 0;
  std::size_t streams = 0;
};

nlohmann::ordered_json channel_status_json(const engine::ChannelEngine& ch);
nlohmann::ordered_json status_json(const DaemonFacts& facts, const Counters& counters, const engine::Engine& engine);
std::string openmetrics_text(const DaemonFacts& facts, const Counters& counters, const engine::Engine& engine);

}  // namespace rigcal::service
