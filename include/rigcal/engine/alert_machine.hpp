#pragma once
// Turns a stream of drift findings into alert transitions without flapping (ISA-18.2 / IEC 62682
// practice: on-delay and off-delay). An alert is raised only after the finding has been present for
// `raise_after` consecutive evaluations and at least `raise_after_ns`; it clears only after the
// finding has been absent for `clear_after` consecutive evaluations and at least `clear_after_ns`.
// Times are record times, so the same input always gives the same transitions (journal replay).
#include <cstdint>

#include "rigcal/protocol/timestamp.hpp"

namespace rigcal::engine {

struct AlertTiming {
  std::uint32_t raise_after = 1;
  std::int64_t raise_after_ns = 0;
  std::uint32_t clear_after = 1;
  std::int64_t clear_after_ns = 0;
};

enum class AlertTransition { none, raised, cleared };

class AlertMachine {
 public:
  struct State {
    bool raised = false;
    std::uint32_t present_run = 0;
    std::uint32_t absent_run = 0;
    protocol::TimeNs run_start = 0;  // time of the first evaluation of the current run
    protocol::TimeNs since = 0;      // time of the last transition
  };

  explicit AlertMachine(AlertTiming timing) : timing_(timing) {}
  AlertTransition update(bool finding, protocol::TimeNs t);
  void reset() { state_ = State{}; }

  bool raised() const { return state_.raised; }
  const State& state() const { return state_; }
  void restore(const State& s) { state_ = s; }

 private:
  AlertTiming timing_;
  State state_;
};

}  // namespace rigcal::engine
