#pragma once
// Outlier screening before the fit: a single spike (a misread reference, a dropped digit) must not
// reach the fit or the detectors, but a real, lasting change must not be screened away either.
//
// Rule: once the fit has its minimum pairs, each new pair's externally studentised prediction
// residual r = (y - yhat(x)) / (s sqrt(1 + h(x))) is computed against the fit that does not contain
// it (h the leverage). |r| > limit holds the pair back. If max_consecutive pairs in a row are held,
// they are a level change, not spikes: all of them are released, in order, into the fit. If a pair
// with |r| <= limit arrives while some are held, the held ones were isolated spikes and are
// rejected as outliers (reject reason `outlier`, kept in the reject file).
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
  OutlierScreen(bool enabled, double limit, std::uint32_t max_consecutive)
      : enabled_(enabled), limit_(limit), max_consecutive_(max_consecutive) {}

  // Studentised prediction residual of (x, y) against `fit`, with a floor on s (the sensor's
  // resolution/sqrt(12)) so that a noiseless fit does not call every step an outlier.
  static double studentised_residual(const stats::LineFit& fit, double x, double y, double s_floor);

  enum class Verdict { pass, hold };
  // Decides about a pair with residual r. On `pass` the caller must first take rejected() (the held
  // spikes, if any) then process the pair. On `hold` with released() non-empty, the caller processes
  // released() in order (the held pairs plus this one).
  Verdict offer(const HeldPair& pair);
  std::vector<HeldPair> take_rejected();
  std::vector<HeldPair> take_released();

  bool enabled() const { return enabled_; }
  double limit() const { return limit_; }
  const std::vector<HeldPair>& held() const { return held_; }
  void restore_held(std::vector<HeldPair> held) { held_ = std::move(held); }
  void clear() {
    held_.clear();
    rejected_.clear();
    released_.clear();
  }

 private:
  bool enabled_;
  double limit_;
  std::uint32_t max_consecutive_;
  std::vector<HeldPair> held_, rejected_, released_;
};

}  // namespace rigcal::engine
