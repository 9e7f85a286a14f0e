// Batch York fit: the iteration of York et al. (2004), section III, steps 1-8.
#include "rigcal/stats/york_fit.hpp"

#include <algorithm>
#include <cmath>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "york_fit_common.hpp"

namespace rigcal::stats {

namespace {

// Sums over the pairs are formed in extended precision so that the iteration can meet a relative
// tolerance of 1e-15 without stalling on its own rounding.
using Real = long double;

std::string at(const char* name, std::size_t i) { return std::string(name) + "[" + std::to_string(i) + "]"; }

std::optional<Error> check_sizes(std::size_t n, std::size_t n_ux, std::size_t n_y, std::size_t n_uy,
                                 std::size_t n_r, const char* ux_name, const char* uy_name) {
  if (n_ux != n || n_y != n || n_uy != n || (n_r != 0 && n_r != n))
    return Error{std::string("York fit: x, ") + ux_name + ", y, " + uy_name +
                 " (and r_xy when given) must have the same length"};
  if (n < 3) return Error{"too few pairs for a York fit: have " + std::to_string(n) + ", need at least 3"};
  return std::nullopt;
}

std::optional<Error> check_values(std::span<const double> v, const char* name) {
  for (std::size_t i = 0; i < v.size(); ++i)
    if (!std::isfinite(v[i])) return Error{"York fit: " + at(name, i) + " is not a finite number"};
  return std::nullopt;
}

std::optional<Error> check_correlations(std::span<const double> r) {
  for (std::size_t i = 0; i < r.size(); ++i)
    if (!(std::abs(r[i]) < 1.0))
      return Error{"York fit: " + at("r_xy", i) + " must be a correlation strictly between -1 and 1"};
  return std::nullopt;
}

// Weights w = 1/u^2 from standard uncertainties; `inverse` false when they are weights already. The
// weight must be a positive finite double: an uncertainty whose 1/u^2 overflows or underflows is refused
// rather than carried as an infinite or zero weight.
Result<std::vector<Real>> to_weights(std::span<const double> v, const char* name, bool inverse) {
  std::vector<Real> w(v.size());
  for (std::size_t i = 0; i < v.size(); ++i) {
    const double wi = inverse ? 1.0 / (v[i] * v[i]) : v[i];
    if (!(v[i] > 0) || !std::isfinite(v[i]) || !(wi > 0) || !std::isfinite(wi))
      return Error{"York fit: " + at(name, i) + " must be positive and finite" +
                   (inverse ? " with 1/u^2 representable" : "")};
    w[i] = wi;
  }
  return w;
}

// The data centred once on their unweighted means, with per-pair weights w(X_i), w(Y_i) and
// correlations, and the scratch state of one pass of the iteration at a trial slope.
class YorkIteration {
 public:
  YorkIteration(std::span<const double> x, std::vector<Real> wx, std::span<const double> y,
                std::vector<Real> wy, std::span<const double> r);

  Real sxx() const { return sxx_; }  // unweighted sum (X - mean)^2
  Real sxy() const { return sxy_; }
  Real syy() const { return syy_; }

  // Steps 3-5 of York (2004) at slope b: W_i, the W-weighted means, U_i, V_i and beta_i. Returns the
  // improved slope sum W beta V / sum W beta U (non-finite when the denominator vanishes).
  Real improved_slope(Real b);
  // Steps 7-8 at the final slope: intercept, adjusted points, York's uncertainties and S.
  detail::YorkSolution solution(Real b, int iterations);

 private:
  std::size_t n_;
  std::vector<Real> dx_, dy_, wx_, wy_, r_;
  Real x0_ = 0, y0_ = 0, sxx_ = 0, sxy_ = 0, syy_ = 0;
  // Filled by improved_slope():
  std::vector<Real> w_, beta_;  // York's W_i and beta_i
  Real sum_w_ = 0, mean_dx_ = 0, mean_dy_ = 0;
};

YorkIteration::YorkIteration(std::span<const double> x, std::vector<Real> wx, std::span<const double> y,
                             std::vector<Real> wy, std::span<const double> r)
    : n_(x.size()),
      dx_(n_),
      dy_(n_),
      wx_(std::move(wx)),
      wy_(std::move(wy)),
      r_(n_, 0.0L),
      w_(n_),
      beta_(n_) {
  for (std::size_t i = 0; i < n_; ++i) {
    x0_ += x[i];
    y0_ += y[i];
    if (!r.empty()) r_[i] = r[i];
  }
  x0_ /= static_cast<Real>(n_);
  y0_ /= static_cast<Real>(n_);
  for (std::size_t i = 0; i < n_; ++i) {
    dx_[i] = x[i] - x0_;
    dy_[i] = y[i] - y0_;
  }
  // Second pass removes the rounding of the first mean (two-pass centring).
  Real cx = 0, cy = 0;
  for (std::size_t i = 0; i < n_; ++i) {
    cx += dx_[i];
    cy += dy_[i];
  }
  cx /= static_cast<Real>(n_);
  cy /= static_cast<Real>(n_);
  x0_ += cx;
  y0_ += cy;
  for (std::size_t i = 0; i < n_; ++i) {
    dx_[i] -= cx;
    dy_[i] -= cy;
    sxx_ += dx_[i] * dx_[i];
    sxy_ += dx_[i] * dy_[i];
    syy_ += dy_[i] * dy_[i];
  }
}

Real YorkIteration::improved_slope(Real b) {
  sum_w_ = mean_dx_ = mean_dy_ = 0;
  for (std::size_t i = 0; i < n_; ++i) {
    const Real alpha = std::sqrt(wx_[i] * wy_[i]);
    // York (2004) eq. (4); positive for |r| < 1 (it is (sqrt wX - b r sqrt wY)^2 + b^2 wY (1 - r^2)).
    w_[i] = wx_[i] * wy_[i] / (wx_[i] + b * b * wy_[i] - 2 * b * r_[i] * alpha);
    sum_w_ += w_[i];
    mean_dx_ += w_[i] * dx_[i];
    mean_dy_ += w_[i] * dy_[i];
  }
  mean_dx_ /= sum_w_;
  mean_dy_ /= sum_w_;
  Real num = 0, den = 0;
  for (std::size_t i = 0; i < n_; ++i) {
    const Real alpha = std::sqrt(wx_[i] * wy_[i]);
    const Real u = dx_[i] - mean_dx_;
    const Real v = dy_[i] - mean_dy_;
    beta_[i] = w_[i] * (u / wy_[i] + b * v / wx_[i] - (b * u + v) * r_[i] / alpha);
    num += w_[i] * beta_[i] * v;
    den += w_[i] * beta_[i] * u;
  }
  return num / den;
}

detail::YorkSolution YorkIteration::solution(Real b, int iterations) {
  improved_slope(b);  // W_i, means and beta_i at the final slope
  // Adjusted reference values x_i = Xbar + beta_i; their W-weighted mean sits beta_bar from Xbar.
  Real beta_bar = 0;
  for (std::size_t i = 0; i < n_; ++i) beta_bar += w_[i] * beta_[i];
  beta_bar /= sum_w_;
  Real sum_w_uu = 0, chi_square = 0;  // sum W u^2 and York's S
  for (std::size_t i = 0; i < n_; ++i) {
    const Real u_adj = beta_[i] - beta_bar;
    sum_w_uu += w_[i] * u_adj * u_adj;
    const Real resid = (dy_[i] - mean_dy_) - b * (dx_[i] - mean_dx_);
    chi_square += w_[i] * resid * resid;
  }
  const Real mean_x = x0_ + mean_dx_;
  const Real mean_y = y0_ + mean_dy_;
  detail::YorkSolution s;
  s.count = n_;
  s.dof = static_cast<double>(n_) - 2.0;
  s.b = static_cast<double>(b);
  s.a = static_cast<double>(mean_y - b * mean_x);
  s.var_b = static_cast<double>(1.0L / sum_w_uu);
  s.sum_weights = static_cast<double>(sum_w_);
  s.mean_x_adjusted = static_cast<double>(mean_x + beta_bar);
  s.mean_y_adjusted = static_cast<double>(mean_y + b * beta_bar);
  s.chi_square = static_cast<double>(chi_square);
  s.iterations = iterations;
  return s;
}

// A fixed point that the iteration map g pushes away from (|g'| >= 1) is reached only when the data
// make it exact, e.g. the OLS start b = 0 of points with no x-y covariance at all. It is then not a
// minimum of S but a maximum (the minimum is the vertical line) or a flat direction. A genuine minimum
// with |g'| this close to 1 would need tens of millions of updates and fail to converge anyway. (With
// constant weights g' = lambda (cxx cyy - cxy^2) / (lambda cxx + b cxy)^2; see york_fit_moments.cpp.)
bool is_repelling(YorkIteration& it, Real b, Real slope_scale) {
  const Real step = 1e-6L * std::max(std::abs(b), slope_scale);
  const Real derivative = (it.improved_slope(b + step) - it.improved_slope(b - step)) / (2 * step);
  return std::isfinite(derivative) && std::abs(derivative) >= 1 - 1e-6L;
}

Result<YorkFit> fit(std::span<const double> x, std::vector<Real> wx, std::span<const double> y,
                    std::vector<Real> wy, std::span<const double> r, const YorkOptions& options) {
  if (!(options.tolerance > 0) || options.max_iterations < 1)
    return Error{"York fit: tolerance must be positive and max_iterations at least 1"};
  YorkIteration it(x, std::move(wx), y, std::move(wy), r);
  if (!(it.sxx() > 0))
    return Error{"no spread in the reference values: every pair has the same reference value"};
  const Real slope_scale = std::sqrt(it.syy() / it.sxx());
  Real b = it.sxy() / it.sxx();  // York (2004) step 1: the ordinary least-squares slope
  for (int k = 1; k <= options.max_iterations; ++k) {
    const Real b_new = it.improved_slope(b);
    if (!std::isfinite(b_new))
      return Error{"York fit: slope undetermined (the best line is vertical or the data fix no direction)"};
    const bool converged = std::abs(b_new - b) <= options.tolerance * std::max(std::abs(b_new), slope_scale);
    b = b_new;
    if (!converged) continue;
    if (is_repelling(it, b, slope_scale))
      return Error{"York fit: slope undetermined (the best line is vertical or the data fix no direction)"};
    return detail::complete_york_fit(it.solution(b, k));
  }
  return Error{"York fit did not converge in " + std::to_string(options.max_iterations) +
               " iterations: the data hardly determine the line"};
}

std::optional<Error> check_common(std::span<const double> x, std::span<const double> y,
                                  std::span<const double> r) {
  if (auto e = check_values(x, "x")) return e;
  if (auto e = check_values(y, "y")) return e;
  if (auto e = check_values(r, "r_xy")) return e;
  return check_correlations(r);
}

}  // namespace

Result<YorkFit> york_fit(std::span<const double> x, std::span<const double> u_x, std::span<const double> y,
                         std::span<const double> u_y, std::span<const double> r_xy,
                         const YorkOptions& options) {
  if (auto e = check_sizes(x.size(), u_x.size(), y.size(), u_y.size(), r_xy.size(), "u_x", "u_y")) return *e;
  if (auto e = check_common(x, y, r_xy)) return *e;
  auto wx = to_weights(u_x, "u_x", true);
  if (!wx) return wx.error();
  auto wy = to_weights(u_y, "u_y", true);
  if (!wy) return wy.error();
  return fit(x, std::move(wx).value(), y, std::move(wy).value(), r_xy, options);
}

Result<YorkFit> york_fit_from_weights(std::span<const double> x, std::span<const double> w_x,
                                      std::span<const double> y, std::span<const double> w_y,
                                      std::span<const double> r_xy, const YorkOptions& options) {
  if (auto e = check_sizes(x.size(), w_x.size(), y.size(), w_y.size(), r_xy.size(), "w_x", "w_y")) return *e;
  if (auto e = check_common(x, y, r_xy)) return *e;
  auto wx = to_weights(w_x, "w_x", false);
  if (!wx) return wx.error();
  auto wy = to_weights(w_y, "w_y", false);
  if (!wy) return wy.error();
  return fit(x, std::move(wx).value(), y, std::move(wy).value(), r_xy, options);
}

}  // namespace rigcal::stats
