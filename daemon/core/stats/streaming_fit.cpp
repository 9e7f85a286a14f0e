#include "rigcal/stats/streaming_fit.hpp"

namespace rigcal::stats {

StreamingLineFit::StreamingLineFit(MemoryPolicy policy, bool weighted) : policy_(policy), weighted_(weighted) {
  if (policy_.kind == MemoryPolicy::Kind::window) {
    x_.resize(policy_.window_pairs);
    y_.resize(policy_.window_pairs);
    if (weighted_) w_.resize(policy_.window_pairs);
  }
}

void StreamingLineFit::add(double x, double y, double w) {
  switch (policy_.kind) {
    case MemoryPolicy::Kind::cumulative:
      acc_.add(x, y, w);
      return;
    case MemoryPolicy::Kind::forgetting:
      acc_.forget(policy_.forgetting_factor);
      acc_.add(x, y, w);
      return;
    case MemoryPolicy::Kind::window:
      break;
  }
  const std::size_t cap = x_.size();
  if (size_ == cap) {
    acc_.remove(x_[head_], y_[head_], weighted_ ? w_[head_] : 1.0);
    x_[head_] = x;
    y_[head_] = y;
    if (weighted_) w_[head_] = w;
    head_ = head_ + 1 == cap ? 0 : head_ + 1;
    acc_.add(x, y, w);
    if (++removals_ >= rebuild_every_windows * cap) rebuild();
    return;
  }
  std::size_t tail = head_ + size_;
  if (tail >= cap) tail -= cap;
  x_[tail] = x;
  y_[tail] = y;
  if (weighted_) w_[tail] = w;
  ++size_;
  acc_.add(x, y, w);
}

void StreamingLineFit::rebuild() {
  acc_.reset();
  const std::size_t cap = x_.size();
  for (std::size_t i = 0, j = head_; i < size_; ++i, j = (j + 1 == cap ? 0 : j + 1))
    acc_.add(x_[j], y_[j], weighted_ ? w_[j] : 1.0);
  removals_ = 0;
}

void StreamingLineFit::reset() {
  acc_.reset();
  head_ = size_ = 0;
  removals_ = 0;
}

void StreamingLineFit::window_pair(std::size_t i, double& x, double& y, double& w) const {
  std::size_t j = head_ + i;
  if (j >= x_.size()) j -= x_.size();
  x = x_[j];
  y = y_[j];
  w = weighted_ ? w_[j] : 1.0;
}

Status StreamingLineFit::restore(const LineMoments& m, std::span<const double> xs, std::span<const double> ys,
                                 std::span<const double> ws, std::uint64_t removals) {
  if (xs.size() != ys.size() || (weighted_ && ws.size() != xs.size()) || (!weighted_ && !ws.empty()))
    return Error{"window arrays of unequal length"};
  if (xs.size() > x_.size()) return Error{"more window pairs than the window holds"};
  if (policy_.kind == MemoryPolicy::Kind::window && m.count != xs.size())
    return Error{"window pair count disagrees with the fit state"};
  reset();
  for (std::size_t i = 0; i < xs.size(); ++i) {
    x_[i] = xs[i];
    y_[i] = ys[i];
    if (weighted_) w_[i] = ws[i];
  }
  size_ = xs.size();
  removals_ = removals;
  acc_ = LineAccumulator::from_moments(m);
  return ok_status();
}

}  // namespace rigcal::stats
