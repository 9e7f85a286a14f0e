#pragma once
// Outlier screening before the fit: a single spike (a misread reference, a dropped digit) must not
// reach the fit or the detectors, but a real, lasting change must not be screened away either.
//
// Rule: once the fit has its minimum pairs, each new pair's externally studentised prediction
// residual r = (y - yhat(x)) / (s sqrt(1 + h(x))) is computed against the fit that does not contain
// it (h the leverage). |r| > limit holds the pair back and, if none is held yet, opens an episode of
// `episode_pairs` pairs. If `max_held` pairs are held within the episode, they are a real change, not
// spikes (a gain change flags the pairs far from the centre while those near it still pass): all of
// them are released, in order, into the fit. If the episode ends with fewer held, they were isolated
// spikes and are rejected as outliers (reject reason `outlier`, kept in the reject file). Pairs that
// pass go on to the fit at once either way.
// Under normal errors with limit 6 an in-control pair is held with probability ~2e-9.
#include <cstdint>
#include <vector>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/stats/line_fit.hpp"

namespace rigcal::engine {

struct HeldPair {
  protocol::TimeNs time = 0;
  double x = 0, y = 0;          // engineering units
  double x_raw = 0, y_raw = 0;  // as received
  double residual = 0;          // studentised residual when held
};

class OutlierScreen {
 public:
  OutlierScreen(bool enabled, double limit, std::uint32_t max_held, std::uint32_t episode_pairs)
      : limit_(limit), max_held_(max_held), episode_pairs_(episode_pairs), enabled_(enabled) {}

  // Studentised prediction residual of (x, y) against `fit`, with a floor on s (the sensor's
  // resolution/sqrt(12)) so that a noiseless fit does not call every step an outlier.
  static double studentised_residual(const stats::LineFit& fit, double x, double y, double s_floor);

  enum class Verdict { pass, hold };
  // Decides about a pair with residual r. After every offer the caller takes rejected() (spikes
  // whose episode ended) and, on `pass`, processes the pair; on `hold` with released() non-empty it
  // processes released() in order (the held pairs, this one last).
  Verdict offer(const HeldPair& pair);
  std::vector<HeldPair> take_rejected();
  std::vector<HeldPair> take_released();

  bool enabled() const { return enabled_; }
  double limit() const { return limit_; }
  const std::vector<HeldPair>& held() const { return held_; }
  std::uint32_t episode_left() const { return episode_left_; }
  void restore(std::vector<HeldPair> held, std::uint32_t episode_left) {
    held_ = std::move(held);
    episode_left_ = episode_left;
  }
  void clear() {
    held_.clear();
    rejected_.clear();
    released_.clear();
    episode_left_ = 0;
  }

 private:
  double limit_;
  std::uint32_t max_held_;
  std::uint32_t episode_pairs_;
  std::uint32_t episode_left_ = 0;  // pairs left in the open episode (0: none open)
  bool enabled_;                    // after the 4-byte members, where it costs no padding
  std::vector<HeldPair> held_, rejected_, released_;
};

}  // namespace rigcal::engine
