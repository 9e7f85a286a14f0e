#include "rigcal/stats/streaming_fit.hpp"

namespace rigcal::stats {

StreamingLineFit::StreamingLineFit(MemoryPolicy policy, bool weighted) : policy_(policy), weighted_(weighted) {
  if (policy_.kind == MemoryPolicy::Kind::window) ring_.resize(policy_.window_pairs * stride());
}

void StreamingLineFit::put(std::size_t slot, double x, double y, double w) {
  double* p = &ring_[slot * stride()];
  p[0] = x;
  p[1] = y;
  if (weighted_) p[2] = w;
}

void StreamingLineFit::get(std::size_t slot, double& x, double& y, double& w) const {
  const double* p = &ring_[slot * stride()];
  x = p[0];
  y = p[1];
  w = weighted_ ? p[2] : 1.0;
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
  const std::size_t cap = capacity();
  if (size_ == cap) {
    double old_x, old_y, old_w;
    get(head_, old_x, old_y, old_w);
    acc_.remove(old_x, old_y, old_w);
    put(head_, x, y, w);
    head_ = head_ + 1 == cap ? 0 : head_ + 1;
    acc_.add(x, y, w);
    if (++removals_ >= rebuild_every_windows * cap) rebuild();
    return;
  }
  std::size_t tail = head_ + size_;
  if (tail >= cap) tail -= cap;
  put(tail, x, y, w);
  ++size_;
  acc_.add(x, y, w);
}

void StreamingLineFit::rebuild() {
  acc_.reset();
  const std::size_t cap = capacity();
  double x, y, w;
  for (std::size_t i = 0, j = head_; i < size_; ++i, j = (j + 1 == cap ? 0 : j + 1)) {
    get(j, x, y, w);
    acc_.add(x, y, w);
  }
  removals_ = 0;
}

void StreamingLineFit::reset() {
  acc_.reset();
  head_ = size_ = 0;
  removals_ = 0;
}

void StreamingLineFit::window_pair(std::size_t i, double& x, double& y, double& w) const {
  std::size_t j = head_ + i;
  if (j >= capacity()) j -= capacity();
  get(j, x, y, w);
}

Status StreamingLineFit::restore(const LineMoments& m, std::span<const double> xs, std::span<const double> ys,
                                 std::span<const double> ws, std::uint64_t removals) {
  if (xs.size() != ys.size() || (weighted_ && ws.size() != xs.size()) || (!weighted_ && !ws.empty()))
    return Error{"window arrays of unequal length"};
  if (xs.size() > capacity()) return Error{"more window pairs than the window holds"};
  if (policy_.kind == MemoryPolicy::Kind::window && m.count != xs.size())
    return Error{"window pair count disagrees with the fit state"};
  reset();
  for (std::size_t i = 0; i < xs.size(); ++i) put(i, xs[i], ys[i], weighted_ ? ws[i] : 1.0);
  size_ = xs.size();
  removals_ = removals;
  acc_ = LineAccumulator::from_moments(m);
  return ok_status();
}

}  // namespace rigcal::stats
