#pragma once
// What a straight-line calibration state answers: coefficients, standard errors, covariance,
// residual standard deviation, R^2.
//
// Conventions (each matches statsmodels WLS and the NIST StRD certified values):
//  - line model y = b0 + b1 x: dof = n - 2; through-origin model y = b1 x: dof = n - 1.
//  - s^2 = sum w r^2 / dof: the residual variance of a pair of unit weight.
//  - through the origin, R^2 is uncentred: 1 - SSR / sum w y^2 (NIST's convention for NoInt1/2).
//  - exponential forgetting: n is the Kish effective sample size a1^2/a2 and all weights are rescaled
//    by a1/a2 so that they sum to n when the precision weights are 1. This treats the forgotten pairs as
//    n equally weighted ones; it is exact for the cumulative and window policies and, under forgetting,
//    accurate when the spread of reference values does not change with the pairs' age (the variance of
//    the slope is then s^2 sum a^2 (x - xbar)^2 / (sum a (x - xbar)^2)^2, to which this reduces).
#include <cstdint>
#include <optional>

#include "rigcal/result.hpp"
#include "rigcal/stats/line_accumulator.hpp"

namespace rigcal::stats {

enum class Model { line, through_origin };

struct LineFit {
  Model model = Model::line;
  std::uint64_t count = 0;  // pairs held
  double n = 0;             // sample size used for dof (effective sample size under forgetting)
  double dof = 0;
  double b0 = 0;  // intercept (0 for the through-origin model)
  double b1 = 0;  // slope
  double s = 0;   // residual standard deviation
  double se_b0 = 0;
  double se_b1 = 0;
  double cov_b0_b1 = 0;
  double corr_b0_b1 = 0;         // 0 for the through-origin model
  std::optional<double> r2;      // absent when the sensor readings have no spread at all
  double ssr = 0;                // residual sum of squares (effective weights)
  double sum_w = 0;              // total weight (= n for unit weights)
  double mean_x = 0;             // weighted mean of the reference values
  double mean_y = 0;             // weighted mean of the sensor readings
  double sxx = 0;  // line: sum w (x - mean_x)^2; through origin: sum w x^2 (effective weights)

  // Fitted sensor reading at reference value x, computed about the centroid (stable at offsets).
  double predict(double x) const;
  // Variance factor of the fitted line at x: Var(predict(x)) = s^2 * leverage(x).
  double leverage(double x) const;
  // Root mean square deviation of the reference values from their mean (weighted).
  double reference_spread() const;
};

// Fails (with a message) when the fit has no uncertainty: too few pairs for the model, no spread in
// the reference values, or results that overflow a double.
Result<LineFit> summarize(const LineMoments& m, Model model);

}  // namespace rigcal::stats
