#pragma once
// Average run lengths (ARL) of the CUSUM and EWMA detectors (cusum.hpp, ewma.hpp) when their innovations
// are i.i.d. N(mu, 1), and the designs that pick their parameters for a target in-control ARL0.
//
// The ARL is the expected number of innovations up to and including the first alarm, starting from
// the zero state (statistics 0) with the shift present from the first innovation. mu is in units of
// the innovation's standard deviation; mu = 0 gives ARL0, the mean time between false alarms.
//
// Methods and accuracy
//  - One-sided CUSUM: the ARL integral equation (Page 1954; Goel & Wu 1971)
//        L(u) = 1 + L(0) Phi(k - u - mu) + integral_0^h L(v) phi(v - u + k - mu) dv,
//    solved by the Nystroem method with Gauss-Legendre quadrature (Vance 1986; Knoth's R package spc
//    uses the same method): 10-node panels at most 2 sigma wide, the atom at 0 an extra unknown. The
//    solution is analytic on [0, h], so the quadrature converges geometrically: doubling the panels
//    changes nothing above 1e-9, and an independent, twice-extrapolated Brook & Evans (1972) chain
//    agrees to its own accuracy (1e-9 at h = 4, a few 1e-6 at h = 17, ARL 1.5e8).
//  - Two-sided CUSUM: 1/ARL = 1/ARL+ + 1/ARL- (Van Dobben de Bruyn 1968, as used by Lucas & Crosier
//    1982 and Montgomery's tables; attribution from memory). It is exact while C+ and C- cannot both be
//    positive before an alarm, i.e. h <= 2k; otherwise it is an approximation whose error at the usual
//    parameters is far below Monte Carlo resolution (the tests check k = 0.5, h = 4 by simulation).
//  - EWMA: the Markov chain of Lucas & Saccucci (1990): the band between the limits cut into m cells,
//    the statistic replaced by its cell's centre. Its error falls as 1/m^2 with the cell width, so the
//    result is Richardson-extrapolated from m and 2m + 1 cells, m chosen so that a cell is at most 0.2
//    lambda wide (the width of the kernel) and 31 <= m <= 301. Measured against an independent Nystroem
//    solution of Crowder's (1987) integral equation, the in-control error is below 2e-5 at ARL0 ~ 1e3,
//    2e-4 at 1e6 - 1e7, 4e-4 at 1e9 and 8e-4 at 3e10 (worst at lambda = 0.02; the extrapolation errs
//    low); out of control it is far smaller (1e-6 at ARL ~ 100).
//  - ARLs above 1e12 are returned as +infinity: the linear systems cannot resolve the exit
//    probabilities behind them, and at one innovation per second 1e12 is 30 000 years.
//
// Costs: one CUSUM ARL takes microseconds (h ~ 5) to a few milliseconds (h ~ 60); one EWMA ARL 0.1-15 ms.
// Designs (measured on one core): design_cusum < 1 ms at ARL0 = 500, up to 40 ms for ARL0 <= 1e8 and
// shifts >= 0.25 sigma, 140 ms at 1e10 and 0.25 sigma; design_ewma 10-20 ms at ARL0 = 500, 30-85 ms up to
// 1e8, 50-120 ms at 1e10. Run them at start-up and cache by (target, shift).
// Thread-safety: all functions are pure and may be called concurrently.
#include "rigcal/result.hpp"

namespace rigcal::detect {

// Largest target ARL0 the designs accept: beyond it the solvers lose the accuracy the design promises.
inline constexpr double max_design_arl0 = 1e10;
// Largest CUSUM decision interval the solver takes: its cost grows as h^3 (70 ms per ARL at h = 200;
// designing for a 0.1-sigma shift at ARL0 = 1e10, h = 183, takes about 1 s). Shifts of 0.25 sigma and
// more stay below h = 80 for every accepted target.
inline constexpr double max_cusum_h = 200;

// ARL of the upper one-sided CUSUM C+ (reference k, decision interval h; alarm at C+ > h). The lower
// statistic C- at mean mu has the ARL of C+ at -mu. Errors: k < 0, h <= 0, h > max_cusum_h, or any
// argument non-finite.
Result<double> cusum_arl_one_sided(double k, double h, double mu);

// ARL of the two-sided tabular CUSUM (C+ and C- with the same k and h), by 1/ARL = 1/ARL+ + 1/ARL-.
Result<double> cusum_arl_two_sided(double k, double h, double mu);

// ARL of the two-sided EWMA with fixed asymptotic limits +-L sqrt(lambda / (2 - lambda)), W_0 = 0.
// Errors: lambda outside [0.01, 1] (below 0.01 the chain needs more cells than is reasonable), L <= 0,
// or any argument non-finite.
Result<double> ewma_arl(double lambda, double L, double mu);

// The decision interval h giving the two-sided CUSUM with reference k the in-control ARL0 target.
// Errors: k < 0 or non-finite; target not finite, <= 1 or above max_design_arl0; target below the
// ARL0 that k alone gives as h -> 0 (1 / (2 Phi(-k))).
Result<double> cusum_decision_interval(double k, double target_arl0);

// The limit multiplier L giving the EWMA with weight lambda the in-control ARL0 target.
// Errors: lambda outside [0.01, 1]; target not finite, <= 1 or above max_design_arl0.
Result<double> ewma_limit_multiplier(double lambda, double target_arl0);

struct CusumDesign {
  double k =
      0;  // reference value: shift / 2, the optimal choice for that shift (Page 1954; Moustakides 1986)
  double h = 0;     // decision interval, solved for the target ARL0
  double arl0 = 0;  // achieved two-sided ARL0 (equals the target to ~1e-9 relative)
  double arl1 = 0;  // two-sided ARL at the design shift
};
// CUSUM for detecting a mean shift of shift_sigma (innovation standard deviations) with in-control
// ARL0 = target_arl0. Errors: shift not finite or <= 0; target as for cusum_decision_interval.
Result<CusumDesign> design_cusum(double target_arl0, double shift_sigma);

struct EwmaDesign {
  double lambda = 0;  // weight, from the grid below
  double L = 0;       // limit multiplier, solved for the target ARL0
  double arl0 = 0;    // achieved ARL0 (the target to ~1e-5 relative)
  double arl1 = 0;    // ARL at the design shift: the smallest over the grid
  // The best lambda is the grid's smallest: the optimum is probably below it and the EWMA is then
  // well behind the CUSUM (ARL0 = 3.15e7, shift 0.25: ARL1 3891 against the CUSUM's 432). Prefer the
  // CUSUM for such a design.
  bool lambda_at_grid_edge = false;
};
// The lambda grid design_ewma searches: 0.02 ... 0.5, roughly geometric. ARL1 is flat near its minimum
// in lambda (Lucas & Saccucci 1990, Figure 2), so a finer grid buys little.
inline constexpr double ewma_design_lambdas[] = {0.02, 0.03, 0.04, 0.05, 0.075, 0.1,
                                                 0.15, 0.2,  0.25, 0.3,  0.4,   0.5};
// EWMA for detecting a mean shift of shift_sigma with in-control ARL0 = target_arl0: for each lambda of
// the grid, L by root-finding; the lambda with the smallest ARL1 wins. Errors as for design_cusum.
Result<EwmaDesign> design_ewma(double target_arl0, double shift_sigma);

}  // namespace rigcal::detect
