#include "rigcal/detect/cusum.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "format_number.hpp"

namespace rigcal::detect {
namespace {

Status check_parameters(double k, double h, double cap) {
  if (!std::isfinite(k) || k < 0)
    return Error{"CUSUM k must be finite and >= 0, got " + detail::format_number(k)};
  if (!std::isfinite(h) || h <= 0)
    return Error{"CUSUM h must be finite and > 0, got " + detail::format_number(h)};
  // NaN fails this test too.
  if (!(cap > h)) {
    return Error{"CUSUM cap must be > h = " + detail::format_number(h) + ", got " +
                 detail::format_number(cap)};
  }
  return ok_status();
}

}  // namespace

Cusum::Cusum(double k, double h, double cap) : k_(k), h_(h), cap_(cap) {
  if (auto s = check_parameters(k, h, cap); !s) throw std::invalid_argument(s.error().message);
}

Result<Cusum> Cusum::create(double k, double h, double cap) {
  if (auto s = check_parameters(k, h, cap); !s) return s.error();
  return Cusum(k, h, cap);
}

bool Cusum::update(double z) {
  if (!std::isfinite(z)) throw std::invalid_argument("Cusum::update: non-finite innovation");
  state_.upper = std::min(cap_, std::max(0.0, state_.upper + z - k_));
  state_.lower = std::min(cap_, std::max(0.0, state_.lower - z - k_));
  return in_alarm();
}

Status Cusum::restore(const State& s) {
  for (const double v : {s.upper, s.lower}) {
    if (!std::isfinite(v) || v < 0 || v > cap_) {
      return Error{"CUSUM checkpoint statistic " + detail::format_number(v) +
                   " is not in [0, cap = " + detail::format_number(cap_) + "]"};
    }
  }
  state_ = s;
  return ok_status();
}

}  // namespace rigcal::detect
