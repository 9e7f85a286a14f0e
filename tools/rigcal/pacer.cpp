#include "pacer.hpp"

namespace rigcal::tool {

Pacer::Clock::time_point Pacer::due(const FeedItem& item, Clock::time_point now) {
  if (mode_ == Mode::asap) return now;
  if (!anchored_) {
    anchored_ = true;
    anchor_ = now;
    anchor_sim_ = item.sim_time.value_or(0);
  }
  if (mode_ == Mode::rate) {
    const auto offset = std::chrono::duration<double>(static_cast<double>(paced_++) / per_s_);
    return anchor_ + std::chrono::duration_cast<Clock::duration>(offset);
  }
  // Simulated clock; a record without a simulated time goes at once.
  if (!item.sim_time) return now;
  return anchor_ + std::chrono::nanoseconds(*item.sim_time - anchor_sim_);
}

}  // namespace rigcal::tool
