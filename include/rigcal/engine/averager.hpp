#pragma once
// Groups a channel's sensor readings into averaging blocks: either every `block_readings` readings,
// or fixed UTC-aligned time buckets of `bucket_ns` (a bucket [k T, (k+1) T) of record time closes
// when a reading of a later bucket arrives). A block also closes, with what it has, when no reading
// has arrived for one bucket length of the daemon's clock (ChannelEngine::tick), so a sensor that
// stops does not leave its last block open forever; record time and the clock are never compared,
// so replaying old data works the same as live data. A reading that arrives late (an earlier bucket
// than the open one) joins the open block: blocks never reopen.
// The mean uses Welford's update; the block's own standard deviation is kept for diagnostics.
#include <cstdint>
#include <optional>

#include "rigcal/protocol/timestamp.hpp"

namespace rigcal::engine {

struct Block {
  protocol::TimeNs first = 0;  // earliest reading time in the block
  protocol::TimeNs last = 0;   // latest reading time
  protocol::TimeNs start = 0;  // nominal window: bucket start (buckets) or first reading (counts)
  protocol::TimeNs end = 0;    // bucket end (buckets) or last reading (counts)
  std::uint64_t m = 0;
  double mean = 0;      // mean indication, channel units
  double m2 = 0;        // sum of squared deviations from the mean
  double mean_raw = 0;  // mean of the raw signal as received
  double block_sd() const;
};

class Averager {
 public:
  Averager(std::uint64_t block_readings, std::int64_t bucket_ns) : block_readings_(block_readings), bucket_ns_(bucket_ns) {}

  // Adds a reading; returns the block it completed, if any (the completing reading of a count block
  // is in it; a reading of a later bucket starts the next block after closing the open one).
  std::optional<Block> add(protocol::TimeNs t, double value, double raw);
  // Closes the open block, whatever it holds (the channel went quiet).
  std::optional<Block> close_open();

  const std::optional<Block>& open() const { return open_; }
  void restore(std::optional<Block> b) { open_ = b; }
  void clear() { open_.reset(); }

 private:
  void start(protocol::TimeNs t);

  std::uint64_t block_readings_;
  std::int64_t bucket_ns_;
  std::optional<Block> open_;
};

}  // namespace rigcal::engine
