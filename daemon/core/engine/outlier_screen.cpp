#include "rigcal/engine/outlier_screen.hpp"

#include <algorithm>
#include <cmath>

namespace rigcal::engine {

double OutlierScreen::studentised_residual(const stats::LineFit& fit, double x, double y, double s_floor) {
  const double s = std::max(fit.s, s_floor);
  if (!(s > 0)) return 0.0;
  return (y - fit.predict(x)) / (s * std::sqrt(1.0 + fit.leverage(x)));
}

OutlierScreen::Verdict OutlierScreen::offer(const HeldPair& pair) {
  const bool flagged = std::abs(pair.residual) > limit_;
  if (flagged) {
    if (held_.empty()) episode_left_ = episode_pairs_;
    held_.push_back(pair);
    if (held_.size() >= max_held_) {
      released_ = std::move(held_);
      held_.clear();
      episode_left_ = 0;
      return Verdict::hold;
    }
  }
  if (!held_.empty() && --episode_left_ == 0) {
    rejected_ = std::move(held_);
    held_.clear();
  }
  return flagged ? Verdict::hold : Verdict::pass;
}

std::vector<HeldPair> OutlierScreen::take_rejected() {
  std::vector<HeldPair> out;
  out.swap(rejected_);
  return out;
}

std::vector<HeldPair> OutlierScreen::take_released() {
  std::vector<HeldPair> out;
  out.swap(released_);
  return out;
}

}  // namespace rigcal::engine
