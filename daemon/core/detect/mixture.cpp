#include "rigcal/detect/mixture.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

#include "format_number.hpp"

namespace rigcal::detect {
namespace {

Status check_parameters(double alpha, double rho) {
  if (!std::isfinite(alpha) || alpha <= 0 || alpha >= 1) {
    return Error{"mixture test alpha must be in (0, 1), got " + detail::format_number(alpha)};
  }
  if (!std::isfinite(rho) || rho <= 0)
    return Error{"mixture prior scale rho must be finite and > 0, got " + detail::format_number(rho)};
  return ok_status();
}

// V_t from the state: V = [[n, n mean], [n mean, m2 + n mean^2]], det V = n m2 exactly.
struct Gram {
  double v00, v01, v11, det;
};
Gram gram(const NormalMixtureTest::State& s) {
  const double n = static_cast<double>(s.n);
  return {n, n * s.mean_d, s.m2_d + n * s.mean_d * s.mean_d, n * s.m2_d};
}

// log det(I + rho^2 V) = log(1 + rho^2 tr V + rho^4 det V), with log1p for the early pairs.
double log_det_prior(const Gram& g, double rho2) {
  return std::log1p(rho2 * (g.v00 + g.v11) + rho2 * rho2 * g.det);
}

// x' (V + r I)^-1 x for x = (x0, x1); det(V + r I) = det V + r tr V + r^2 has no cancellation.
double inverse_form(const Gram& g, double r, double x0, double x1) {
  const double det = g.det + r * (g.v00 + g.v11) + r * r;
  return ((g.v11 + r) * x0 * x0 - 2 * g.v01 * x0 * x1 + (g.v00 + r) * x1 * x1) / det;
}

// The ellipse (theta - c)' Q (theta - c) <= R^2 with Q = V (V + r I)^-1 V has shadows R sqrt(diag Q^-1)
// on the axes, Q^-1 = V^-1 + r V^-2; in line units Q^-1 maps as T Q^-1 T' with the LineScale's T.
struct Shape {
  double m00, m01, m11;
};
Shape inverse_shape(const Gram& g, double r) {
  const double w00 = g.v11 / g.det, w01 = -g.v01 / g.det, w11 = g.v00 / g.det;  // V^-1
  return {w00 + r * (w00 * w00 + w01 * w01), w01 + r * (w00 * w01 + w01 * w11),
          w11 + r * (w01 * w01 + w11 * w11)};
}

}  // namespace

NormalMixtureTest::NormalMixtureTest(double alpha, double rho)
    : alpha_(alpha), rho_(rho), log_threshold_(-std::log(alpha)) {
  if (auto s = check_parameters(alpha, rho); !s) throw std::invalid_argument(s.error().message);
}

Result<NormalMixtureTest> NormalMixtureTest::create(double alpha, double rho) {
  if (auto s = check_parameters(alpha, rho); !s) return s.error();
  return NormalMixtureTest(alpha, rho);
}

bool NormalMixtureTest::update(double e, double d) {
  if (!std::isfinite(e) || !std::isfinite(d))
    throw std::invalid_argument("NormalMixtureTest::update: non-finite input");
  ++state_.n;
  const double delta = d - state_.mean_d;
  state_.mean_d += delta / static_cast<double>(state_.n);
  state_.m2_d += delta * (d - state_.mean_d);
  state_.s0 += e;
  state_.s1 += e * d;
  if (!state_.rejected && log_martingale() >= log_threshold_) state_.rejected = true;
  return state_.rejected;
}

double NormalMixtureTest::log_martingale() const {
  const Gram g = gram(state_);
  const double rho2 = rho_ * rho_;
  return 0.5 * inverse_form(g, 1.0 / rho2, state_.s0, state_.s1) - 0.5 * log_det_prior(g, rho2);
}

ConfidenceRegion NormalMixtureTest::confidence_region(const LineScale& scale) const {
  const Gram g = gram(state_);
  ConfidenceRegion c;
  c.s0_ = state_.s0;
  c.s1_ = state_.s1;
  c.v00_ = g.v00;
  c.v01_ = g.v01;
  c.v11_ = g.v11;
  c.det_v_ = g.det;
  c.r_ = 1.0 / (rho_ * rho_);
  c.radius2_ = 2 * log_threshold_ + log_det_prior(g, rho_ * rho_);
  c.scale_ = scale;
  return c;
}

Status NormalMixtureTest::restore(const State& s) {
  if (!std::isfinite(s.mean_d) || !std::isfinite(s.m2_d) || !std::isfinite(s.s0) || !std::isfinite(s.s1) ||
      s.m2_d < 0) {
    return Error{"mixture test checkpoint holds non-finite or negative sums"};
  }
  if (s.n == 0 && (s.mean_d != 0 || s.m2_d != 0 || s.s0 != 0 || s.s1 != 0)) {
    return Error{"mixture test checkpoint has sums but no pairs"};
  }
  state_ = s;
  return ok_status();
}

bool ConfidenceRegion::contains(double intercept_change, double slope_change) const {
  // Back to theta: theta_1 = db1 s_x / sigma, theta_0 = (db0 + db1 x_c) / sigma.
  const double t1 = slope_change * scale_.x_spread / scale_.sigma;
  const double t0 = (intercept_change + slope_change * scale_.x_centre) / scale_.sigma;
  const double r0 = s0_ - (v00_ * t0 + v01_ * t1);
  const double r1 = s1_ - (v01_ * t0 + v11_ * t1);
  return inverse_form(Gram{v00_, v01_, v11_, det_v_}, r_, r0, r1) <= radius2_;
}

double ConfidenceRegion::theta0_centre() const { return (v11_ * s0_ - v01_ * s1_) / det_v_; }
double ConfidenceRegion::theta1_centre() const { return (v00_ * s1_ - v01_ * s0_) / det_v_; }

double ConfidenceRegion::centre_slope() const { return scale_.sigma * theta1_centre() / scale_.x_spread; }
double ConfidenceRegion::centre_intercept() const {
  return scale_.sigma * theta0_centre() - scale_.x_centre * centre_slope();
}

double ConfidenceRegion::half_width_slope() const {
  if (!bounded()) return std::numeric_limits<double>::infinity();
  const Shape m = inverse_shape(Gram{v00_, v01_, v11_, det_v_}, r_);
  return std::sqrt(radius2_ * m.m11) * scale_.sigma / scale_.x_spread;
}

double ConfidenceRegion::half_width_intercept() const {
  if (!bounded()) return std::numeric_limits<double>::infinity();
  const Shape m = inverse_shape(Gram{v00_, v01_, v11_, det_v_}, r_);
  const double c = scale_.x_centre / scale_.x_spread;  // db0 = sigma (theta_0 - c theta_1)
  return std::sqrt(radius2_ * (m.m00 - 2 * c * m.m01 + c * c * m.m11)) * scale_.sigma;
}

}  // namespace rigcal::detect
