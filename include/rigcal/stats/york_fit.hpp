#pragma once
// Straight line y = a + b x fitted with uncertainty in both variables: the best straight line of
// York (1966, 1968) and Williamson (1968), in the unified form of
//   D. York, N. M. Evensen, M. López Martínez, J. De Basabe Delgado (2004), "Unified equations for the
//   slope, intercept, and standard errors of the best straight line", Am. J. Phys. 72, 367-375;
//   J. H. Williamson (1968), "Least-squares fitting of a straight line", Can. J. Phys. 46, 1845-1847;
// which ISO/TS 28037:2010 (determination and use of straight-line calibration functions) treats as
// weighted total least squares, with the chi-square test of the model against chi^2(n - 2).
//
// When to use it instead of ordinary least squares (rigcal/stats/line_fit.hpp): OLS treats the
// reference values x as exact. When the reference standard's uncertainty u_x is not negligible next to
// the sensor's u_y, seen along the line (b u_x against u_y), OLS is biased: its slope is attenuated
// towards zero by var(x_true) / (var(x_true) + u_x^2) however many pairs are collected. This fit
// removes that bias and propagates both uncertainties into those of a and b. When b u_x << u_y the
// two fits agree.
//
// Conventions
//  - Inputs are standard uncertainties (k = 1) in the units of x and y; u_x and u_y are those of the
//    individual pair. r_xy is the correlation coefficient of the pair's x and y errors.
//  - u_a, u_b and cov_ab are York (2004)'s standard uncertainties: propagated from the STATED input
//    uncertainties alone, not rescaled by the scatter ("unscaled", a priori). They are right when the
//    stated uncertainties are right; the chi-square S tells whether they are.
//  - u_a_scaled, u_b_scaled and cov_ab_scaled are the same values multiplied by sqrt(S / dof) (by S/dof
//    for the covariance): the a posteriori convention (the "MSWD-expanded" errors of isotope
//    geochemistry). Report which one you use; never mix them.
//  - Both are first-order (linearised) uncertainties. When u_x is large next to the spread of the
//    reference values they understate the slope's actual scatter a little: by ~2 % in the simulation
//    of tests/unit/york_fit_test.cpp (u_x^2 = var(x_true) / 8.5), by ~6 % when u_x^2 = var(x_true) / 3.
//  - Other errors-in-variables codes differ again (some propagate the uncertainties through a WTLS
//    solver and give slightly different values); those are not computed here.
//
// Thread-safety: free functions over their arguments; no shared state.
#include <cstdint>
#include <span>

#include "rigcal/result.hpp"
#include "rigcal/stats/line_accumulator.hpp"
#include "rigcal/stats/line_fit.hpp"

namespace rigcal::stats {

struct YorkFit {
  std::uint64_t count = 0;  // pairs used
  double dof = 0;           // n - 2 (Kish effective n - 2 under forgetting, see york_fit_from_moments)
  double a = 0;             // intercept, units of y
  double b = 0;             // slope, units of y per unit of x
  // York (2004) standard uncertainties from the stated input uncertainties (unscaled):
  // u_b^2 = 1 / sum W_i u_i^2, u_a^2 = 1 / sum W_i + xbar^2 u_b^2, cov_ab = -xbar u_b^2 with xbar the
  // weighted mean of the adjusted reference values.
  double u_a = 0;
  double u_b = 0;
  double cov_ab = 0;
  double corr_ab = 0;  // cov_ab / (u_a u_b)
  // S = sum W_i (y_i - a - b x_i)^2: the minimised weighted sum of squared distances of the points
  // from their adjusted positions on the line; chi^2(dof)-distributed when the model and the stated
  // uncertainties are right.
  double chi_square = 0;
  double reduced_chi_square = 0;  // S / dof, the MSWD; close to 1 when the uncertainties are right
  // P(chi^2(dof) >= S), the ISO/TS 28037 model check: a small value (say < 0.05) says the scatter is
  // larger than the stated uncertainties allow (or the relation is not a straight line).
  double p_value = 1;
  // a posteriori uncertainties: the York values scaled by sqrt(S / dof).
  double u_a_scaled = 0;
  double u_b_scaled = 0;
  double cov_ab_scaled = 0;
  // Centroid of the adjusted points (the points' best-estimate positions on the line):
  // xbar = sum W_i x_i / sum W_i and the line's value there. The fitted line is least uncertain at
  // xbar, where its variance is 1 / sum_weights; for inverse prediction work about this point.
  double mean_x_adjusted = 0;
  double mean_y_adjusted = 0;
  double sum_weights = 0;  // sum W_i, units 1/y^2
  int iterations = 0;      // slope updates of the iteration (0 for the closed form)

  // Value of the line at x, evaluated about the adjusted centroid (stable at large offsets).
  double predict(double x) const { return mean_y_adjusted + b * (x - mean_x_adjusted); }
  // Unscaled standard uncertainty of predict(x): sqrt(1 / sum W + (x - xbar)^2 u_b^2), which equals
  // sqrt(u_a^2 + 2 x cov_ab + x^2 u_b^2) without its cancellation. Multiply by sqrt(S / dof) for the
  // scaled convention.
  double u_predict(double x) const;
};

struct YorkOptions {
  // Iteration stops when |b_new - b_old| <= tolerance * max(|b_new|, slope_scale), slope_scale being
  // the data's natural slope sqrt(sum (y - ybar)^2 / sum (x - xbar)^2): a relative change, kept
  // meaningful when the slope is zero. REQUIRES: tolerance > 0.
  double tolerance = 1e-15;
  // The iteration converges linearly; noisy data that hardly determine the line converge slowly.
  // Failing to converge within this many updates is an error. REQUIRES: >= 1.
  int max_iterations = 1000;
};

// Batch York fit. x, y: the pairs; u_x, u_y: their standard uncertainties (> 0, finite); r_xy: the
// error correlation of each pair (|r| < 1), empty meaning 0 for every pair.
// Algorithm: York et al. (2004), section III: start from the ordinary least-squares slope, then
// repeat W_i = w(X_i) w(Y_i) / (w(X_i) + b^2 w(Y_i) - 2 b r_i alpha_i), weighted means, U_i, V_i,
// beta_i and b = sum W beta V / sum W beta U until converged; sums are formed in extended precision
// about the data's mean.
// Errors (each message names the cause): sizes differ; fewer than 3 pairs; non-finite value;
// uncertainty or weight not positive and finite (or 1/u^2 not representable); |r| >= 1; no spread in the
// reference values; slope undetermined (a vertical or indeterminate line); no convergence; overflow.
Result<YorkFit> york_fit(std::span<const double> x, std::span<const double> u_x, std::span<const double> y,
                         std::span<const double> u_y, std::span<const double> r_xy = {},
                         const YorkOptions& options = {});

// The same fit with the uncertainties given as weights w = 1 / u^2 (units 1/x^2 and 1/y^2), the form in
// which York (1966) published the Pearson data. REQUIRES and errors as york_fit (weights > 0, finite).
Result<YorkFit> york_fit_from_weights(std::span<const double> x, std::span<const double> w_x,
                                      std::span<const double> y, std::span<const double> w_y,
                                      std::span<const double> r_xy = {}, const YorkOptions& options = {});

// Closed form of the York fit from streaming moments, for uncorrelated errors with the same u_x and
// u_y for every pair of unit precision weight (the daemon's case: u_x from the reference standard's
// certificate, u_y the sensor's noise). With constant weights York's line is Deming's regression with
// error-variance ratio lambda = u_y^2 / u_x^2 and needs no iteration; the derivation of the slope and
// of York's uncertainties from the co-moments is in daemon/core/stats/york_fit_moments.cpp.
// A pair held with precision weight w counts as having uncertainties u_x / sqrt(w) and u_y / sqrt(w).
// Under exponential forgetting the convention of line_fit.hpp applies: the weights are rescaled by
// a1/a2 and dof = a1^2/a2 - 2; the chi-square p-value is then an approximation.
// Equals york_fit() on the same pairs to rounding. Errors: fewer than 3 pairs (or dof <= 0); u_x or
// u_y not positive and finite; no spread in the reference values; slope undetermined; overflow.
Result<YorkFit> york_fit_from_moments(const LineMoments& m, double u_x, double u_y);

// The York fit expressed as a LineFit, so that every interval, verdict and inverse prediction of
// inference.hpp applies to it unchanged. The mapping keeps York's covariance exactly: s is the
// sensor's reading noise u_sensor (so the 1/m repeatability term of an inverse prediction is that of
// one reading), the centroid is York's adjusted centroid, and Sxx and sum_w are set so that
// s^2 / Sxx = u_b^2 and s^2 / sum_w = 1 / sum W_i (the variance of the line at the centroid).
// R^2 has no meaning here and is left out. REQUIRES: u_sensor > 0.
LineFit line_fit_from_york(const YorkFit& york, double u_sensor);

}  // namespace rigcal::stats
