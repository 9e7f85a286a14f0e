#include "rigcal/engine/alert_machine.hpp"

namespace rigcal::engine {

AlertTransition AlertMachine::update(bool finding, protocol::TimeNs t) {
  State& s = state_;
  if (finding) {
    if (s.present_run == 0) s.run_start = t;
    if (s.present_run < UINT32_MAX) ++s.present_run;
    s.absent_run = 0;
    if (!s.raised && s.present_run >= timing_.raise_after && t - s.run_start >= timing_.raise_after_ns) {
      s.raised = true;
      s.since = t;
      return AlertTransition::raised;
    }
  } else {
    if (s.absent_run == 0) s.run_start = t;
    if (s.absent_run < UINT32_MAX) ++s.absent_run;
    s.present_run = 0;
    if (s.raised && s.absent_run >= timing_.clear_after && t - s.run_start >= timing_.clear_after_ns) {
      s.raised = false;
      s.since = t;
      return AlertTransition::cleared;
    }
  }
  return AlertTransition::none;
}

}  // namespace rigcal::engine
