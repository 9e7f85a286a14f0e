#include "rigcal/metrology/rtd.hpp"

#include <algorithm>
#include <cmath>
#include <string>

#include "monotone_root.hpp"
#include "number_text.hpp"

namespace rigcal::metrology {

namespace {

// R/R0 - 1, the polynomial part of the Callendar-Van Dusen equation (IEC 60751:2008 clause 4.2).
double relative_change(const CvdCoefficients& k, double t) {
  double x = t * (k.a_per_c + t * k.b_per_c2);
  if (t < 0) x += k.c_per_c4 * (t - 100.0) * t * t * t;
  return x;
}

// d(R/R0)/dt.
double relative_slope(const CvdCoefficients& k, double t) {
  double s = k.a_per_c + 2.0 * k.b_per_c2 * t;
  if (t < 0) s += k.c_per_c4 * (4.0 * t - 300.0) * t * t;
  return s;
}

// Smallest d(R/R0)/dt below 0 degC: at the ends or where the cubic slope is stationary,
// 12 C t^2 - 600 C t + 2 B = 0.
double min_slope_below_zero(const CvdCoefficients& k) {
  double m = std::min(relative_slope(k, rtd_min_c), k.a_per_c);
  const double qa = 12.0 * k.c_per_c4;
  const double qb = -600.0 * k.c_per_c4;
  const double disc = qb * qb - 4.0 * qa * 2.0 * k.b_per_c2;
  if (qa != 0.0 && disc >= 0.0) {
    for (double sign : {-1.0, 1.0}) {
      const double t = (-qb + sign * std::sqrt(disc)) / (2.0 * qa);
      if (t > rtd_min_c && t < 0.0) m = std::min(m, relative_slope(k, t));
    }
  }
  return m;
}

std::string prefix(double r0_ohm) { return "RTD (R0 = " + detail::number_text(r0_ohm) + " ohm): "; }

// t >= 0 root of B t^2 + A t - x = 0 as 2x / (A + sqrt(A^2 + 4 B x)): the textbook form
// (-A + sqrt(...)) / 2B subtracts two nearly equal numbers because B is tiny, and fails for B = 0.
double quadratic_root(const CvdCoefficients& k, double x) {
  const double disc = std::max(0.0, k.a_per_c * k.a_per_c + 4.0 * k.b_per_c2 * x);
  return 2.0 * x / (k.a_per_c + std::sqrt(disc));
}

}  // namespace

Status check_rtd_parameters(double r0_ohm, const CvdCoefficients& cvd) {
  if (!(std::isfinite(r0_ohm) && r0_ohm > 0)) {
    return Error{"RTD: R0 " + detail::number_text(r0_ohm) + " ohm is not a finite positive resistance"};
  }
  if (!(std::isfinite(cvd.a_per_c) && std::isfinite(cvd.b_per_c2) && std::isfinite(cvd.c_per_c4))) {
    return Error{prefix(r0_ohm) + "Callendar-Van Dusen coefficients are not all finite numbers"};
  }
  const bool increasing =
      cvd.a_per_c > 0 && relative_slope(cvd, rtd_max_c) > 0 && min_slope_below_zero(cvd) > 0;
  if (!increasing) {
    return Error{prefix(r0_ohm) + "Callendar-Van Dusen coefficients A = " + detail::number_text(cvd.a_per_c) +
                 ", B = " + detail::number_text(cvd.b_per_c2) + ", C = " + detail::number_text(cvd.c_per_c4) +
                 " do not give a resistance that rises with temperature over -200 .. 850 degC"};
  }
  return ok_status();
}

Result<double> rtd_resistance_ohm(double r0_ohm, double t_c, const CvdCoefficients& cvd) {
  if (auto s = check_rtd_parameters(r0_ohm, cvd); !s) return s.error();
  if (!std::isfinite(t_c))
    return Error{prefix(r0_ohm) + "temperature " + detail::number_text(t_c) + " degC is not a finite number"};
  if (!(t_c >= rtd_min_c && t_c <= rtd_max_c)) {
    return Error{prefix(r0_ohm) + "temperature " + detail::number_text(t_c) +
                 " degC is outside the Callendar-Van Dusen range -200 .. 850 degC"};
  }
  return r0_ohm * (1.0 + relative_change(cvd, t_c));
}

Result<double> rtd_temperature_c(double r0_ohm, double r_ohm, const CvdCoefficients& cvd) {
  if (auto s = check_rtd_parameters(r0_ohm, cvd); !s) return s.error();
  if (!std::isfinite(r_ohm))
    return Error{prefix(r0_ohm) + "resistance " + detail::number_text(r_ohm) + " ohm is not a finite number"};
  const double r_lo = r0_ohm * (1.0 + relative_change(cvd, rtd_min_c));
  const double r_hi = r0_ohm * (1.0 + relative_change(cvd, rtd_max_c));
  if (!(r_ohm >= r_lo && r_ohm <= r_hi)) {
    return Error{prefix(r0_ohm) + "resistance " + detail::number_text(r_ohm) + " ohm is outside the range " +
                 detail::number_text(r_lo) + " .. " + detail::number_text(r_hi) + " ohm (-200 .. 850 degC)"};
  }
  const double x = r_ohm / r0_ohm - 1.0;
  // Rounding alone can put the root a few ulp past 850 degC; the input was checked against R(850).
  if (x >= 0) return std::min(quadratic_root(cvd, x), rtd_max_c);
  // Below 0 degC the C term makes it a quartic; the quadratic root is within ~0.01 degC of it.
  const auto root = detail::increasing_root([&](double t) { return relative_change(cvd, t) - x; },
                                            [&](double t) { return relative_slope(cvd, t); }, rtd_min_c, 0.0,
                                            quadratic_root(cvd, x), {0.0, 1e-9});
  if (!root)
    return Error{prefix(r0_ohm) + "Newton inverse did not converge for " + detail::number_text(r_ohm) +
                 " ohm"};
  return *root;
}

double rtd_sensitivity_ohm_per_c(double r0_ohm, double t_c, const CvdCoefficients& cvd) {
  if (!check_rtd_parameters(r0_ohm, cvd) || !(t_c >= rtd_min_c && t_c <= rtd_max_c)) return std::nan("");
  return r0_ohm * relative_slope(cvd, t_c);
}

}  // namespace rigcal::metrology
