#pragma once
// EWMA of standardised innovations (Roberts 1959; Lucas & Saccucci 1990):
//     W_t = lambda z_t + (1 - lambda) W_{t-1},    W_0 = 0,
// in alarm while |W_t| > L sqrt(lambda / (2 - lambda)), the asymptotic standard deviation of W times L.
// With z_t ~ N(mu, 1) i.i.d. its average run length is ewma_arl(lambda, L, mu) (arl.hpp); design_ewma
// picks lambda and L.
//
// Limits: fixed at their asymptotic value from the first innovation, not the time-varying
// L sqrt(lambda / (2 - lambda) (1 - (1 - lambda)^(2t))). The narrower early limits would catch a fault
// present at start-up a few innovations sooner, but they raise the false-alarm rate while W settles
// and break the Markov-chain ARL, which (like the published tables of Lucas & Saccucci) is for fixed
// limits. A detector here restarts only at an as-left calibration and then runs for millions of
// innovations, so the start-up phase is immaterial to ARL0 and exactness is worth more.
//
// No cap is needed (unlike the CUSUM): W forgets geometrically, so after a fault of mean mu is fixed
// it falls inside the limit within log(limit / |mu|) / log(1 - lambda) innovations.
// Thread-safety: none; one detector per channel, used from one strand.
#include "rigcal/result.hpp"

namespace rigcal::detect {

class Ewma {
 public:
  // The complete state, for checkpoints.
  struct State {
    double w = 0;
  };

  // REQUIRES: 0 < lambda <= 1 and L > 0, both finite. Throws std::invalid_argument otherwise (a
  // programming error; use create() for configured values).
  Ewma(double lambda, double L);
  // The same, with an Error naming the offending parameter instead of an exception.
  static Result<Ewma> create(double lambda, double L);

  // Feeds one innovation and returns in_alarm() after it. REQUIRES: z finite (throws
  // std::invalid_argument: a non-finite z would poison W for good).
  bool update(double z);
  void reset() { state_ = {}; }

  double statistic() const { return state_.w; }
  double limit() const { return limit_; }  // L sqrt(lambda / (2 - lambda))
  bool upper_alarm() const { return state_.w > limit_; }
  bool lower_alarm() const { return state_.w < -limit_; }
  bool in_alarm() const { return upper_alarm() || lower_alarm(); }

  double lambda() const { return lambda_; }
  double L() const { return L_; }

  State state() const { return state_; }
  // Fails (leaving the detector unchanged) unless w is finite.
  Status restore(const State& s);

 private:
  double lambda_;
  double L_;
  double limit_;
  State state_;
};

}  // namespace rigcal::detect
