#include "rigcal/detect/ewma.hpp"

#include <cmath>
#include <stdexcept>

#include "format_number.hpp"

namespace rigcal::detect {
namespace {

Status check_parameters(double lambda, double L) {
  if (!std::isfinite(lambda) || lambda <= 0 || lambda > 1) {
    return Error{"EWMA lambda must be in (0, 1], got " + detail::format_number(lambda)};
  }
  if (!std::isfinite(L) || L <= 0)
    return Error{"EWMA L must be finite and > 0, got " + detail::format_number(L)};
  return ok_status();
}

}  // namespace

Ewma::Ewma(double lambda, double L) : lambda_(lambda), L_(L), limit_(L * std::sqrt(lambda / (2.0 - lambda))) {
  if (auto s = check_parameters(lambda, L); !s) throw std::invalid_argument(s.error().message);
}

Result<Ewma> Ewma::create(double lambda, double L) {
  if (auto s = check_parameters(lambda, L); !s) return s.error();
  return Ewma(lambda, L);
}

bool Ewma::update(double z) {
  if (!std::isfinite(z)) throw std::invalid_argument("Ewma::update: non-finite innovation");
  state_.w = lambda_ * z + (1.0 - lambda_) * state_.w;
  return in_alarm();
}

Status Ewma::restore(const State& s) {
  if (!std::isfinite(s.w)) return Error{"EWMA checkpoint statistic is not finite"};
  state_ = s;
  return ok_status();
}

}  // namespace rigcal::detect
