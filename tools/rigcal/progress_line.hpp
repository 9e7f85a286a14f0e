#pragma once
// One updating status line on stderr while records are delivered, when stderr is a terminal (and
// nothing at all otherwise, so that logs and pipes see only the final line).
#include <chrono>
#include <cstdint>
#include <optional>
#include <string>

namespace rigcal::tool {

struct ProgressFigures {
  std::uint64_t sent = 0;
  std::uint64_t acknowledged = 0;  // serial: equal to sent
  std::uint64_t rejected = 0;
  std::uint64_t done = 0;          // records finished with (settled, or held already)
  std::optional<std::uint64_t> total;
  bool acknowledgements = true;    // false on a serial line
};

class ProgressLine {
 public:
  using Clock = std::chrono::steady_clock;

  // Enabled when stderr is a terminal.
  ProgressLine();
  bool enabled() const { return enabled_; }
  // Redraws the line, at most a few times a second.
  void update(const ProgressFigures& f, Clock::time_point now);
  // Removes the line (before the final line, a warning or an error is printed).
  void clear();

 private:
  bool enabled_;
  bool shown_ = false;
  Clock::time_point started_, last_draw_;
  std::uint64_t last_done_ = 0;
  double rate_per_s_ = 0;  // smoothed
};

}  // namespace rigcal::tool
