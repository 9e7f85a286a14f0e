// Designs of the CUSUM and EWMA for a target ARL0: the threshold parameter by root-finding on
// log ARL0, which is close to linear in h (Siegmund's approximation: ARL ~ exp(2 k h)) and in L^2, so
// the TOMS 748 bracketing solver converges in a handful of ARL evaluations.
#include <algorithm>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "arl_limits.hpp"
#include "ewma_chain.hpp"
#include "format_number.hpp"
#include "normal_tails.hpp"
#include "rigcal/detect/arl.hpp"

namespace rigcal::detect {
namespace {

// Bracket width at which the solvers stop: ~1e-11 relative in h or L, far below what moves ARL0.
constexpr int tolerance_bits = 38;
// The coarse EWMA stage only has to land near the root (the secant stage refines it).
constexpr int coarse_tolerance_bits = 16;
constexpr std::uintmax_t max_solver_iterations = 100;
// Search range and step of the EWMA limit multiplier L.
constexpr double smallest_L = 0.01;
constexpr double largest_L = 10.0;
constexpr double L_step = 0.25;

Status check_target(double target_arl0) {
  if (!std::isfinite(target_arl0) || target_arl0 <= 1 || target_arl0 > max_design_arl0) {
    return Error{"target in-control ARL0 must be > 1 and <= " + detail::format_number(max_design_arl0) +
                 ", got " + detail::format_number(target_arl0)};
  }
  return ok_status();
}

Status check_shift(double shift_sigma) {
  if (!std::isfinite(shift_sigma) || shift_sigma <= 0) {
    return Error{"design shift must be finite and > 0 (innovation standard deviations), got " +
                 detail::format_number(shift_sigma)};
  }
  return ok_status();
}

// Root of f (increasing; f(lo) < 0 < f(hi) < inf) to the solver tolerance.
template <class F>
double solve_bracketed(F f, double lo, double f_lo, double hi, double f_hi, int bits) {
  std::uintmax_t iterations = max_solver_iterations;
  const auto bracket = boost::math::tools::toms748_solve(
      f, lo, hi, f_lo, f_hi, boost::math::tools::eps_tolerance<double>(bits), iterations);
  return 0.5 * (bracket.first + bracket.second);
}

// Root of f (increasing, f(lo) < 0) above lo: steps hi = grow(hi) until f(hi) > 0, halving back
// towards lo whenever a step lands where the ARL is unresolvable (f = +inf; the target is at least
// two decades below that, so the halving ends). Empty when hi passes max_x first.
template <class F, class Grow>
std::optional<double> root_above(F f, double lo, double f_lo, double hi, Grow grow, double max_x,
                                 int bits = tolerance_bits) {
  double f_hi = f(hi);
  while (!(f_hi > 0) || std::isinf(f_hi)) {
    if (std::isinf(f_hi)) {
      hi = 0.5 * (lo + hi);
    } else {
      if (hi >= max_x) return std::nullopt;
      lo = hi;
      f_lo = f_hi;
      hi = grow(hi);
    }
    f_hi = f(hi);
  }
  return solve_bracketed(f, lo, f_lo, hi, f_hi, bits);
}

// Siegmund's approximation to the two-sided in-control ARL0 (Siegmund 1985, as quoted by Montgomery;
// from memory): one side (exp(2 k b) - 2 k b - 1) / (2 k^2) with b = h + 1.166, or b^2 at k = 0. Within a
// few per cent: used only to turn away targets that need h far beyond max_cusum_h without solving there.
double siegmund_two_sided_arl0(double k, double h) {
  const double b = h + 1.166;
  if (k == 0) return 0.5 * b * b;
  const double x = 2 * k * b;
  return 0.5 * (std::expm1(x) - x) / (2 * k * k);
}

// log of the two-sided in-control ARL0, minus log target. h = 0 alarms whenever |z| > k.
double cusum_log_gap(double k, double h, double log_target) {
  if (h == 0) return -std::log(2.0 * detail::normal_cdf(-k)) - log_target;
  return std::log(cusum_arl_two_sided(k, h, 0).value()) - log_target;
}

double ewma_sigma(double lambda) { return std::sqrt(lambda / (2.0 - lambda)); }

// Root of the coarse chain's log gap, bracketing from a guess (the neighbouring lambda's L during a
// design). The cell count is held at the guess's so that the function is continuous in L.
Result<double> ewma_coarse_limit(double lambda, double log_target, double guess) {
  const int cells = detail::ewma_coarse_cells(lambda, guess * ewma_sigma(lambda));
  auto f = [&](double L) {
    const double arl = detail::ewma_chain_arl(lambda, L * ewma_sigma(lambda), 0, cells);
    return std::log(detail::finite_arl_or_infinity(arl)) - log_target;
  };
  double lo = std::max(smallest_L, guess - L_step);
  double f_lo = f(lo);
  while (f_lo >= 0) {
    if (lo == smallest_L) {
      return Error{"target ARL0 " + detail::format_number(std::exp(log_target)) +
                   " is below what an EWMA with lambda = " + detail::format_number(lambda) + " reaches"};
    }
    lo = std::max(smallest_L, lo - 4 * L_step);
    f_lo = f(lo);
  }
  auto grow = [](double x) { return std::min(x + 4 * L_step, largest_L); };
  auto L = root_above(f, lo, f_lo, std::max(guess, lo) + L_step, grow, largest_L, coarse_tolerance_bits);
  if (!L)
    return Error{"no EWMA limit below L = 10 reaches ARL0 " + detail::format_number(std::exp(log_target))};
  return *L;
}

// L with the extrapolated ARL0 on target, from a root of the coarse chain. Root-finding on the coarse
// chain costs an eighth of the extrapolated one per step; its bias (about 1e-2 in log ARL0) is removed
// here by a Newton step with the coarse chain's slope and then secant steps on the extrapolated ARL0,
// three or four evaluations in all, with a bracketing solve as the fallback.
Result<double> ewma_refined_limit(double lambda, double log_target, double coarse_root) {
  const int cells = detail::ewma_coarse_cells(lambda, coarse_root * ewma_sigma(lambda));
  auto f = [&](double L) {
    return std::log(detail::ewma_extrapolated_arl(lambda, L * ewma_sigma(lambda), 0, cells)) - log_target;
  };
  auto f_coarse = [&](double L) {
    return std::log(detail::ewma_chain_arl(lambda, L * ewma_sigma(lambda), 0, cells)) - log_target;
  };
  constexpr double dx = 1e-4;
  const double coarse_slope = (f_coarse(coarse_root + dx) - f_coarse(coarse_root - dx)) / (2 * dx);
  // The solve's rounding puts noise of ~ARL0 * 1e-16 into log ARL0, so the iteration stops on the step
  // size: 1e-8 relative in L moves ARL0 by ~1e-7, far below the chain's own error.
  double x0 = coarse_root, f0 = f(x0);
  double x1 = x0 - f0 / coarse_slope;
  if (std::isfinite(f0) && std::isfinite(coarse_slope) && coarse_slope > 0) {
    double f1 = f(x1);
    for (int i = 0; i < 10 && std::isfinite(f1) && f1 != f0; ++i) {
      const double x2 = x1 - f1 * (x1 - x0) / (f1 - f0);
      x0 = x1;
      f0 = f1;
      x1 = x2;
      if (std::abs(x1 - x0) < 1e-8 * x1) return x1;
      f1 = f(x1);
    }
  }
  // Fallback: bracket around the coarse root and solve.
  double lo = std::max(smallest_L, coarse_root - L_step);
  double f_lo = f(lo);
  while (f_lo >= 0 && lo > smallest_L) {
    lo = std::max(smallest_L, lo - L_step);
    f_lo = f(lo);
  }
  if (f_lo >= 0) return Error{"EWMA limit search failed for lambda = " + detail::format_number(lambda)};
  auto grow = [](double x) { return std::min(x + L_step, largest_L); };
  auto L = root_above(f, lo, f_lo, std::max(coarse_root, lo) + L_step, grow, largest_L);
  if (!L)
    return Error{"no EWMA limit below L = 10 reaches ARL0 " + detail::format_number(std::exp(log_target))};
  return *L;
}

Result<double> ewma_limit_from(double lambda, double target_arl0, double guess) {
  const double log_target = std::log(target_arl0);
  auto coarse = ewma_coarse_limit(lambda, log_target, guess);
  if (!coarse) return coarse.error();
  return ewma_refined_limit(lambda, log_target, *coarse);
}

}  // namespace

Result<double> cusum_decision_interval(double k, double target_arl0) {
  if (!std::isfinite(k) || k < 0)
    return Error{"CUSUM reference value k must be finite and >= 0, got " + detail::format_number(k)};
  if (auto s = check_target(target_arl0); !s) return s.error();
  const double log_target = std::log(target_arl0);
  auto f = [&](double h) { return cusum_log_gap(k, h, log_target); };
  const double f_zero = f(0);
  if (f_zero >= 0) {
    return Error{"target ARL0 " + detail::format_number(target_arl0) + " is below the ARL0 " +
                 detail::format_number(std::exp(f_zero + log_target)) +
                 " that k = " + detail::format_number(k) + " alone gives (h -> 0)"};
  }
  // Doubling h (Siegmund: ARL0 ~ exp(2 k h) for k > 0, ~h^2 for k = 0).
  std::optional<double> h;
  if (siegmund_two_sided_arl0(k, max_cusum_h) > 0.5 * target_arl0) {
    h = root_above(
        f, 0.0, f_zero, 1.0, [](double x) { return std::min(2 * x, max_cusum_h); }, max_cusum_h);
  }
  if (!h) {
    return Error{"ARL0 " + detail::format_number(target_arl0) +
                 " needs a CUSUM decision interval above h = " + detail::format_number(max_cusum_h) +
                 " at k = " + detail::format_number(k) + " (shift too small for the target)"};
  }
  return *h;
}

Result<double> ewma_limit_multiplier(double lambda, double target_arl0) {
  if (!std::isfinite(lambda) || lambda < 0.01 || lambda > 1) {
    return Error{"EWMA weight lambda must be in [0.01, 1], got " + detail::format_number(lambda)};
  }
  if (auto s = check_target(target_arl0); !s) return s.error();
  return ewma_limit_from(lambda, target_arl0, 3.0);
}

Result<CusumDesign> design_cusum(double target_arl0, double shift_sigma) {
  if (auto s = check_shift(shift_sigma); !s) return s.error();
  CusumDesign d;
  d.k = 0.5 * shift_sigma;
  auto h = cusum_decision_interval(d.k, target_arl0);
  if (!h) return h.error();
  d.h = *h;
  d.arl0 = cusum_arl_two_sided(d.k, d.h, 0).value();
  d.arl1 = cusum_arl_two_sided(d.k, d.h, shift_sigma).value();
  return d;
}

Result<EwmaDesign> design_ewma(double target_arl0, double shift_sigma) {
  if (auto s = check_shift(shift_sigma); !s) return s.error();
  if (auto s = check_target(target_arl0); !s) return s.error();
  const double log_target = std::log(target_arl0);
  // Rank the grid on the coarse chain (its L and ARL1 are biased by ~1 %, the same way for every
  // lambda, far below the differences that matter), then settle the two best on the extrapolated chain.
  struct Candidate {
    double lambda, coarse_L, coarse_arl1;
  };
  std::vector<Candidate> candidates;
  double guess = 3.0;
  for (const double lambda : ewma_design_lambdas) {
    auto L = ewma_coarse_limit(lambda, log_target, guess);
    if (!L) return L.error();
    guess = *L;  // L changes slowly with lambda: the next bracket starts here
    const double limit = *L * ewma_sigma(lambda);
    const int cells = detail::ewma_coarse_cells(lambda, limit);
    candidates.push_back({lambda, *L, detail::ewma_chain_arl(lambda, limit, shift_sigma, cells)});
  }
  std::sort(candidates.begin(), candidates.end(),
            [](const Candidate& a, const Candidate& b) { return a.coarse_arl1 < b.coarse_arl1; });
  EwmaDesign best;
  best.arl1 = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < std::min<std::size_t>(2, candidates.size()); ++i) {
    auto L = ewma_refined_limit(candidates[i].lambda, log_target, candidates[i].coarse_L);
    if (!L) return L.error();
    const double arl1 = ewma_arl(candidates[i].lambda, *L, shift_sigma).value();
    if (arl1 < best.arl1) best = EwmaDesign{candidates[i].lambda, *L, 0, arl1, false};
  }
  best.arl0 = ewma_arl(best.lambda, best.L, 0).value();
  best.lambda_at_grid_edge = best.lambda == ewma_design_lambdas[0];
  return best;
}

}  // namespace rigcal::detect
