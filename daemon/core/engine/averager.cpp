#include "rigcal/engine/averager.hpp"

#include <algorithm>
#include <cmath>

namespace rigcal::engine {

double Block::block_sd() const { return m > 1 ? std::sqrt(m2 / static_cast<double>(m - 1)) : 0.0; }

namespace {
std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  std::int64_t q = a / b;
  if ((a % b != 0) && ((a < 0) != (b < 0))) --q;
  return q;
}
}  // namespace

void Averager::start(protocol::TimeNs t) {
  Block b;
  b.first = b.last = t;
  if (block_readings_ == 0) {
    b.start = floor_div(t, bucket_ns_) * bucket_ns_;
    b.end = b.start + bucket_ns_;
  } else {
    b.start = b.end = t;
  }
  open_ = b;
}

std::optional<Block> Averager::add(protocol::TimeNs t, double value, double raw) {
  std::optional<Block> closed;
  if (open_ && block_readings_ == 0 && t >= open_->end) {
    closed = open_;
    open_.reset();
  }
  if (!open_) start(t);
  Block& b = *open_;
  b.m += 1;
  const double inv_m = 1.0 / static_cast<double>(b.m);
  const double d = value - b.mean;
  b.mean += d * inv_m;
  b.m2 += d * (value - b.mean);
  b.mean_raw += (raw - b.mean_raw) * inv_m;
  b.first = std::min(b.first, t);
  b.last = std::max(b.last, t);
  if (block_readings_ > 0) {
    b.start = b.first;
    b.end = b.last;
    if (b.m >= block_readings_) {
      closed = open_;
      open_.reset();
    }
  }
  return closed;
}

std::optional<Block> Averager::close_open() {
  std::optional<Block> closed = open_;
  open_.reset();
  return closed;
}

}  // namespace rigcal::engine
