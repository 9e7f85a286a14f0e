#pragma once
// Two-sided CUSUM (Page 1954) of standardised innovations, in the tabular form of Montgomery,
// Introduction to Statistical Quality Control, and the NIST/SEMATECH e-Handbook section 6.3.2.3:
//     C+_t = max(0, C+_{t-1} + z_t - k),    C-_t = max(0, C-_{t-1} - z_t - k),    C+_0 = C-_0 = 0,
// in alarm while C+ > h (upward shift) or C- > h (downward shift). With z_t ~ N(mu, 1) i.i.d. its
// average run length is cusum_arl_two_sided(k, h, mu) (arl.hpp); design_cusum picks k and h.
//
// No reset on alarm: the statistics keep running, so an alert lasts while the evidence does and clears
// by itself once the fault is fixed. Optionally the statistics are capped (cap > h; 2h is a good
// choice) to bound that clearing time. Uncapped, a fault of mean mu lasting T innovations leaves C+
// near (mu - k) T, which then drains at about k per in-control innovation: a day-long fault at 1 Hz
// would keep the alert up for days. Capped, the drain from cap to h takes about (cap - h) / k
// innovations (10 at k = 0.5, h = 5, cap = 2h). A cap above h never binds before the first alarm, so
// the ARL design is unaffected; it must be strictly above h, or the capped statistic could never exceed
// h and alarm.
//
// Thread-safety: none; one detector per channel, used from one strand.
#include <limits>

#include "rigcal/result.hpp"

namespace rigcal::detect {

class Cusum {
 public:
  // The complete state, for checkpoints.
  struct State {
    double upper = 0;  // C+
    double lower = 0;  // C-
  };

  static constexpr double no_cap = std::numeric_limits<double>::infinity();

  // REQUIRES: k >= 0 and h > 0, both finite; cap > h (no_cap: unbounded). Throws
  // std::invalid_argument otherwise (a programming error; use create() for configured values).
  Cusum(double k, double h, double cap = no_cap);
  // The same, with an Error naming the offending parameter instead of an exception.
  static Result<Cusum> create(double k, double h, double cap = no_cap);

  // Feeds one innovation and returns in_alarm() after it.
  // REQUIRES: z finite (throws std::invalid_argument: a non-finite z would silently zero the statistics).
  bool update(double z);
  void reset() { state_ = {}; }

  double upper() const { return state_.upper; }
  double lower() const { return state_.lower; }
  bool upper_alarm() const { return state_.upper > h_; }
  bool lower_alarm() const { return state_.lower > h_; }
  bool in_alarm() const { return upper_alarm() || lower_alarm(); }

  double k() const { return k_; }
  double h() const { return h_; }
  double cap() const { return cap_; }

  State state() const { return state_; }
  // Fails (leaving the detector unchanged) unless both statistics are finite, >= 0 and <= cap.
  Status restore(const State& s);

 private:
  double k_;
  double h_;
  double cap_;
  State state_;
};

}  // namespace rigcal::detect
