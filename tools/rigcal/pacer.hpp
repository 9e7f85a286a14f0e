#pragma once
// When each record may be written: as fast as possible, at a fixed rate, or on the simulated clock
// (a record stamped 10 s after the first goes 10 s after it). The first record paced anchors the
// schedule, so a resumed run starts at once with what is left. A sender held up (a reconnect) is
// behind schedule afterwards and catches up at full speed, as a rig's buffer empties after an outage.
#include <chrono>
#include <optional>

#include "record_feed.hpp"

namespace rigcal::tool {

class Pacer {
 public:
  using Clock = std::chrono::steady_clock;

  static Pacer as_fast_as_possible() { return Pacer(Mode::asap, 0); }
  // REQUIRES: per_s > 0.
  static Pacer rate(double per_s) { return Pacer(Mode::rate, per_s); }
  static Pacer simulated_clock() { return Pacer(Mode::simulated_clock, 0); }

  // The time at which `item` may be written, asked once per item, in order.
  Clock::time_point due(const FeedItem& item, Clock::time_point now);
  // The configured rate, when there is one (for the ETA).
  std::optional<double> rate_per_s() const {
    return mode_ == Mode::rate ? std::optional<double>(per_s_) : std::nullopt;
  }
  bool as_fast_as_possible_mode() const { return mode_ == Mode::asap; }

 private:
  enum class Mode { asap, rate, simulated_clock };
  Pacer(Mode mode, double per_s) : mode_(mode), per_s_(per_s) {}

  Mode mode_;
  double per_s_;
  bool anchored_ = false;
  Clock::time_point anchor_;
  protocol::TimeNs anchor_sim_ = 0;
  std::uint64_t paced_ = 0;
};

}  // namespace rigcal::tool
