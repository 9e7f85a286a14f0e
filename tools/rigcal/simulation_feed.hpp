#pragma once
// The simulator's records as protocol lines, for rigcal simulate: up to a simulated duration or a
// number of records, numbered 1, 2, 3, ... in time order.
//   P CHANNEL TIME REFERENCE SENSOR    R CHANNEL TIME SENSOR
// TIME is RFC 3339 UTC with milliseconds, or '-' (arrival time); values carry the decimals of their
// resolution (shortest round-trip form when not rounded).
#include <optional>
#include <string>

#include "record_feed.hpp"
#include "rigcal/sim/simulator.hpp"

namespace rigcal::tool {

struct SimulationLimits {
  std::optional<double> duration_s;      // records stamped before start + duration
  std::optional<std::uint64_t> records;  // at most this many
};

std::string format_sim_record(const sim::Scenario& s, const sim::SimRecord& r, bool arrival_time);

class SimulationFeed final : public RecordFeed {
 public:
  // REQUIRES: limits has a duration, a record count or both.
  SimulationFeed(const sim::Scenario& scenario, std::uint64_t seed, protocol::TimeNs start_ns,
                 SimulationLimits limits, bool arrival_time);

  Result<std::optional<FeedItem>> next() override;
  std::optional<std::uint64_t> expected_total() const override;
  std::string where(std::uint64_t origin) const override { return "record " + std::to_string(origin); }

 private:
  sim::Simulator sim_;
  SimulationLimits limits_;
  bool arrival_time_;
  std::uint64_t emitted_ = 0;
  bool done_ = false;
};

}  // namespace rigcal::tool
