#pragma once
// What rigcald saw of one channel, rebuilt for a journal report: the channel's journal entries (pairs,
// readings, resets and the clock ticks) are replayed through a fresh ChannelEngine built from the
// daemon's configuration, the same code the daemon runs, so the report shows the drift detector's
// design and state, every alert raised and cleared, the tolerance and the calibration-due forecast as
// the daemon computed them. The replay starts at the oldest segment kept: with journal.retain: remove,
// history older than the previous checkpoint is gone, and the history section says so.
#include <optional>
#include <string>
#include <vector>

#include "rigcal/config/config.hpp"
#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/result.hpp"

namespace rigcal::report {

struct HistoryEvent {
  protocol::TimeNs time = 0;
  std::string kind;   // drift, tolerance, calibration_due
  std::string event;  // raised, cleared
  std::string detector, test;
  std::string message;
  std::optional<protocol::TimeNs> due_by;
};

struct MonitoringHistory {
  std::optional<protocol::TimeNs> first_pair, last_pair;
  std::uint64_t pairs = 0, readings = 0, outliers = 0, averages = 0, resets = 0;
  std::vector<HistoryEvent> events;
  // The drift detector at the end of the replay.
  std::string detector, phase, problem;
  double sigma = 0;
  bool sigma_learned = false;
  double arl0_pairs = 0, arl1_offset_pairs = 0, arl1_slope_pairs = 0;
  bool drift_alert = false;
  // The calibration-due forecast at the end.
  std::string due_low, due_high;  // status words, with the reason
  std::optional<protocol::TimeNs> due_by;
  bool due_alert = false;
  bool tolerance_alert = false;
  bool oldest_segment_is_not_the_start = false;  // segments were retired: history is partial
};

// Replays the channel's entries of every segment (live and archived) up to `until` (exclusive).
// Error: the segments cannot be listed or read.
Result<MonitoringHistory> replay_monitoring(const std::string& state_directory, const config::Config& cfg,
                                            const config::ChannelConfig& channel,
                                            std::optional<protocol::TimeNs> until);

}  // namespace rigcal::report
