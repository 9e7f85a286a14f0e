#pragma once
// Where the records that rigcal delivers come from: a record file (send) or the simulator
// (simulate). A feed hands out records in sequence order, one at a time, so that memory holds only
// what is unacknowledged, never the whole source.
#include <cstdint>
#include <optional>
#include <string>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/result.hpp"

namespace rigcal::tool {

struct FeedItem {
  std::uint64_t seq = 0;       // 1, 2, 3, ... in the order of the source
  std::string text;            // the record line without sequence number and line end
  std::uint64_t origin = 0;    // for messages: the line number in a file, the record number otherwise
  std::optional<protocol::TimeNs> sim_time;  // simulated time, for pacing on the simulated clock
};

class RecordFeed {
 public:
  virtual ~RecordFeed() = default;
  // The next record; nothing at the end; an Error when the source fails (unreadable, simulation error).
  virtual Result<std::optional<FeedItem>> next() = 0;
  // Number of records the source will give, when known (for the ETA).
  virtual std::optional<std::uint64_t> expected_total() const = 0;
  // Where a record came from, for messages: "demo.txt:17", "record 17".
  virtual std::string where(std::uint64_t origin) const = 0;
};

}  // namespace rigcal::tool
