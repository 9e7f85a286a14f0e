#pragma once
// A channel's running calibration: a LineAccumulator under one memory policy.
//
//  - cumulative: every pair since the last reset.
//  - window: the last N pairs. The oldest pair is removed exactly (the inverse of its addition);
//    to keep rounding from piling up over months of slides, the state is rebuilt from the window's
//    own pairs after every 4N removals (amortised cost: a quarter of an addition per pair), so it
//    never carries the rounding of more than 5N updates, nor the cancellation left by a pair of extreme
//    magnitude (say a misread 1e9 that outlier screening let through) for more than 4N pairs after it
//    has left the window.
//  - forgetting: each new pair first multiplies the weight of everything held by lambda; the
//    effective sample size (1 + lambda) / (1 - lambda) in the limit replaces n (see line_fit.hpp).
//
// Memory: 16 bytes per windowed pair (24 with stored weights), nothing per pair otherwise.
#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

#include "rigcal/result.hpp"
#include "rigcal/stats/line_accumulator.hpp"
#include "rigcal/stats/line_fit.hpp"

namespace rigcal::stats {

struct MemoryPolicy {
  enum class Kind { cumulative, window, forgetting };
  Kind kind = Kind::cumulative;
  std::size_t window_pairs = 0;    // window: N >= 3
  double forgetting_factor = 1.0;  // forgetting: 0 < lambda < 1

  static MemoryPolicy cumulative() { return {}; }
  static MemoryPolicy window(std::size_t n) { return {Kind::window, n, 1.0}; }
  static MemoryPolicy forgetting(double lambda) { return {Kind::forgetting, 0, lambda}; }
  friend bool operator==(const MemoryPolicy&, const MemoryPolicy&) = default;
};

class StreamingLineFit {
 public:
  static constexpr std::uint64_t rebuild_every_windows = 4;

  // weighted: store each pair's weight (needed to remove it from a window later).
  explicit StreamingLineFit(MemoryPolicy policy, bool weighted = false);

  // REQUIRES: x, y finite, w finite and > 0 (w == 1 unless weighted).
  void add(double x, double y, double w = 1.0);
  void reset();

  const MemoryPolicy& policy() const { return policy_; }
  bool weighted() const { return weighted_; }
  const LineMoments& moments() const { return acc_.moments(); }
  Result<LineFit> summary(Model model) const { return summarize(acc_.moments(), model); }

  // Window contents, oldest first (empty for the other policies). Used by checkpoints and reports.
  std::size_t window_size() const { return size_; }
  void window_pair(std::size_t i, double& x, double& y, double& w) const;

  // Checkpoint support: the complete state is the moments, the window contents (oldest first) and
  // the removal counter that schedules rebuilds.
  std::uint64_t removals_since_rebuild() const { return removals_; }
  // REQUIRES: xs/ys/ws sizes equal and <= window capacity; ws empty unless weighted.
  Status restore(const LineMoments& m, std::span<const double> xs, std::span<const double> ys,
                 std::span<const double> ws, std::uint64_t removals_since_rebuild);

 private:
  void rebuild();
  // Doubles per slot of the ring: x, y, and the weight when weighted.
  std::size_t stride() const { return weighted_ ? 3 : 2; }
  std::size_t capacity() const { return ring_.size() / stride(); }
  void put(std::size_t slot, double x, double y, double w);
  void get(std::size_t slot, double& x, double& y, double& w) const;

  MemoryPolicy policy_;
  bool weighted_;
  LineAccumulator acc_;
  // Ring buffer for the window policy, one slot per pair. One array rather than one per
  // coordinate: every channel has a fit, and each array costs a vector and an allocation.
  std::vector<double> ring_;
  std::size_t head_ = 0;  // slot of the oldest pair
  std::size_t size_ = 0;
  std::uint64_t removals_ = 0;
};

}  // namespace rigcal::stats
