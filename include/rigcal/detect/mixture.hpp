#pragma once
// Anytime-valid joint test of the intercept and slope: the normal-mixture (Robbins) martingale of the
// Gaussian linear model of the standardised deviations.
//
// Model. e_i = z_i, the offset innovation (innovations.hpp), and regressors u_i = (1, d_i) with
// d_i = (x_i - x_c) / s_x, known before e_i is seen. In control e_i ~ N(0, 1) i.i.d.; a line change
// makes e_i ~ N(theta' u_i, 1) with theta = ((db0 + db1 x_c) / sigma, db1 s_x / sigma): the change at the
// reference centre and the change across one spread, both in noise standard deviations.
//
// Derivation (checked against direct numerical integration in mixture_test.cpp). With
// S_t = sum e_i u_i and V_t = sum u_i u_i', the likelihood ratio of theta against 0 after t pairs is
//     Lambda_t(theta) = exp(theta' S_t - theta' V_t theta / 2),
// for each theta a non-negative martingale of mean 1 under control. Averaging over theta ~ N(0, rho^2 I):
//     M_t = (2 pi rho^2)^-1 integral exp(theta' S - theta' (V + rho^-2 I) theta / 2) dtheta
//         = (2 pi rho^2)^-1 (2 pi) det(V + rho^-2 I)^-1/2 exp(S' (V + rho^-2 I)^-1 S / 2)
//         = det(I + rho^2 V_t)^-1/2 exp(S_t' (V_t + rho^-2 I)^-1 S_t / 2),
// (the last step: rho^-2 det(V + rho^-2 I)^-1/2 = det(rho^2 V + I)^-1/2 in two dimensions). A mixture
// of mean-1 martingales is one (Fubini), so Ville's inequality gives
//     P(M_t >= 1/alpha for some t, ever) <= alpha    while the sensor is in control.
// The test rejects (alarms) the first time M_t >= 1/alpha, and stays rejected until reset.
//
// Sources (section and theorem numbers from memory): Robbins (1970), "Statistical methods related to
// the law of the iterated logarithm", Ann. Math. Statist. 41, the normal-mixture boundary; Lai (1976),
// "On confidence sequences", Ann. Statist. 4; Howard, Ramdas, McAuliffe & Sekhon (2021), "Time-uniform,
// nonparametric, nonasymptotic confidence sequences", Ann. Statist. 49, section 3 (normal mixture,
// scalar case); Abbasi-Yadkori, Pal & Szepesvari (2011), "Improved algorithms for linear stochastic
// bandits", NeurIPS, Theorem 1: ||S_t - V_t theta||^2 over (V_t + lambda I)^-1 <= 2 log(det(V_t +
// lambda I)^1/2 lambda^-1 / delta) for all t with probability 1 - delta, which with lambda = rho^-2 is
// exactly M_t(theta) < 1/delta, and holds for any conditionally 1-sub-Gaussian noise, not only normal.
//
// Known weakness: a guarantee, not the fastest detector. After T pairs in control S_t holds noise of
// size sqrt(T) and the boundary has grown like sqrt(T log T), so a shift arriving then needs on the
// order of sqrt(T log T) / |theta| further pairs, against a fixed ~2 log(1/alpha) / |theta|^2 for a
// CUSUM. Restart it (reset) at each as-left calibration, and rely on the ARL-designed CUSUM/EWMA for
// prompt detection. The guarantee also rests on sigma: a configured sigma smaller than the true one
// inflates every e_i and voids it.
//
// Thread-safety: none; one test per channel, used from one strand.
#include <cstdint>

#include "rigcal/result.hpp"

namespace rigcal::detect {

// Maps the standardised theta to line changes (db0, db1): db1 = sigma theta_1 / s_x,
// db0 = sigma theta_0 - x_c db1. The default is the identity (the region in theta units).
struct LineScale {
  double sigma = 1;
  double x_centre = 0;
  double x_spread = 1;
};

// The confidence sequence's set at time t: the line changes not rejected,
//     { theta : (S_t - V_t theta)' (V_t + rho^-2 I)^-1 (S_t - V_t theta) <= R_t^2 },
//     R_t^2 = 2 log(1/alpha) + log det(I + rho^2 V_t),
// which covers the true change at every t at once with probability >= 1 - alpha (Ville again, for the
// martingale of e_i - theta' u_i). An ellipse about the least-squares estimate V_t^-1 S_t, bounded once
// V_t is invertible (two distinct reference values); the test rejects exactly when it excludes 0.
class ConfidenceRegion {
 public:
  // In the units of the LineScale the region was made with.
  bool contains(double intercept_change, double slope_change) const;
  bool bounded() const { return det_v_ > 0; }
  // The least-squares estimate of the change. REQUIRES: bounded().
  double centre_intercept() const;
  double centre_slope() const;
  // Half-lengths of the ellipse's shadow on each axis (simultaneous intervals); +inf when unbounded.
  double half_width_intercept() const;
  double half_width_slope() const;

 private:
  friend class NormalMixtureTest;
  ConfidenceRegion() = default;
  double theta0_centre() const;
  double theta1_centre() const;

  double s0_ = 0, s1_ = 0;              // S_t
  double v00_ = 0, v01_ = 0, v11_ = 0;  // V_t
  double det_v_ = 0;                    // det V_t, kept from the centred sums (no cancellation)
  double r_ = 1;                        // rho^-2
  double radius2_ = 0;                  // R_t^2
  LineScale scale_;
};

class NormalMixtureTest {
 public:
  // The complete state, for checkpoints. d enters through its running mean and centred sum of squares
  // (Welford), which keep det V_t accurate over months of pairs.
  struct State {
    std::uint64_t n = 0;
    double mean_d = 0;
    double m2_d = 0;  // sum (d_i - mean_d)^2
    double s0 = 0;    // sum e_i
    double s1 = 0;    // sum e_i d_i
    bool rejected = false;
  };

  // REQUIRES: 0 < alpha < 1 and rho > 0, both finite. Throws std::invalid_argument otherwise (a
  // programming error; use create() for configured values). rho from design_mixture.
  NormalMixtureTest(double alpha, double rho);
  static Result<NormalMixtureTest> create(double alpha, double rho);

  // Feeds one pair's e = z and d = (x - x_c) / s_x; returns rejected(). REQUIRES: e, d finite (throws).
  bool update(double e, double d);
  void reset() { state_ = {}; }

  double log_martingale() const;                           // log M_t (0 before the first pair)
  double log_threshold() const { return log_threshold_; }  // log(1/alpha)
  // M_s >= 1/alpha at some s since the last reset. Latched: the rejection is the event Ville bounds.
  bool rejected() const { return state_.rejected; }
  std::uint64_t count() const { return state_.n; }

  ConfidenceRegion confidence_region(const LineScale& scale = {}) const;

  double alpha() const { return alpha_; }
  double rho() const { return rho_; }

  State state() const { return state_; }
  // Fails (leaving the test unchanged) on non-finite sums or a negative m2_d.
  Status restore(const State& s);

 private:
  double alpha_;
  double rho_;
  double log_threshold_;
  State state_;
};

struct MixtureDesign {
  double rho = 0;              // prior scale of the mixture, in the units of theta
  double detection_pairs = 0;  // pairs a shift of the design size needs to reach 1/alpha (see below)
};
// rho for detecting a line change of length shift_sigma (line_shift_sigma, innovations.hpp) soonest.
// Rule: with the design's V_t ~ t I (d has mean square 1 and, about the median, mean near 0) and S_t
// replaced by its drift t theta, log M_t = (1/2) rho^2 t^2 delta^2 / (1 + rho^2 t) - log(1 + rho^2 t);
// rho minimises the t at which that reaches log(1/alpha). In the variables rho / delta and t delta^2
// the problem does not involve delta, so rho = c(alpha) delta and t = m(alpha) / delta^2
// (c = 0.64 and m = 11.5 at alpha = 0.05; c = 0.67, m = 20.5 at alpha = 0.001). Errors: alpha outside
// (0, 1); shift not finite or <= 0.
Result<MixtureDesign> design_mixture(double alpha, double shift_sigma);

}  // namespace rigcal::detect
