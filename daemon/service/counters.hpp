#pragma once
// The daemon's counters, rendered as OpenMetrics by metrics.cpp. Plain integers: everything that
// changes them runs on the I/O thread.
#include <array>
#include <cstdint>
#include <map>
#include <string>

#include "rigcal/protocol/reject_reason.hpp"

namespace rigcal::service {

struct InputCounters {
  std::uint64_t lines = 0;
  std::uint64_t pairs = 0;
  std::uint64_t readings = 0;
  std::uint64_t duplicates = 0;  // resent records already held (dropped)
  std::uint64_t connections = 0;
  std::uint64_t refused_connections = 0;
  std::uint64_t bytes = 0;
  std::array<std::uint64_t, protocol::reject_reason_count> rejects{};
  std::uint64_t rejects_total() const {
    std::uint64_t t = 0;
    for (auto v : rejects) t += v;
    return t;
  }
};

struct Counters {
  std::map<std::string, InputCounters> inputs;  // by input name ("engine" for the engine's own rejects)
  std::uint64_t journal_frames = 0;
  std::uint64_t journal_bytes = 0;
  std::uint64_t journal_write_errors = 0;
  std::uint64_t journal_blocked_episodes = 0;
  std::uint64_t checkpoints = 0;
  std::uint64_t checkpoint_errors = 0;
  std::uint64_t historian_records = 0;
  std::uint64_t historian_dropped = 0;
  std::uint64_t historian_subscribers_dropped = 0;
  std::uint64_t alerts = 0;
  std::uint64_t hook_runs = 0;
  std::uint64_t hook_failures = 0;
  std::uint64_t reject_log_suppressed = 0;
  std::uint64_t reject_file_errors = 0;
  std::uint64_t reloads = 0;
  std::uint64_t reload_failures = 0;
};

}  // namespace rigcal::service
