#include "rigcal/detect/innovations.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <vector>

namespace rigcal::detect {

Result<ReferenceCentre> reference_centre(std::span<const double> xs) {
  if (xs.size() < 2) return Error{"need at least two reference values to centre the slope innovation"};
  for (const double x : xs) {
    if (!std::isfinite(x)) return Error{"reference values must be finite"};
  }
  std::vector<double> sorted(xs.begin(), xs.end());
  std::sort(sorted.begin(), sorted.end());
  const std::size_t n = sorted.size();
  const double median = n % 2 == 1 ? sorted[n / 2] : 0.5 * (sorted[n / 2 - 1] + sorted[n / 2]);
  double sum_sq = 0, sum_abs = 0;
  for (const double x : sorted) {
    sum_sq += (x - median) * (x - median);
    sum_abs += std::abs(x - median);
  }
  if (!(sum_sq > 0)) return Error{"no spread in the reference values: every value is the same"};
  const double count = static_cast<double>(n);
  return ReferenceCentre{median, std::sqrt(sum_sq / count), sum_abs / count};
}

double offset_innovation(double x, double y, const stats::CertifiedLine& line, double sigma) {
  return (y - line.intercept - line.slope * x) / sigma;
}

double slope_shift_sigma(double slope_change, const ReferenceCentre& centre, double sigma) {
  return std::numbers::sqrt2 * std::abs(slope_change) * centre.mean_abs_deviation / sigma;
}

double line_shift_sigma(double intercept_change, double slope_change, const ReferenceCentre& centre,
                        double sigma) {
  const double at_centre = (intercept_change + slope_change * centre.x_centre) / sigma;
  const double across = slope_change * centre.x_spread / sigma;
  return std::hypot(at_centre, across);
}

SlopeInnovation::SlopeInnovation(double x_centre) : x_centre_(x_centre) {
  if (!std::isfinite(x_centre)) throw std::invalid_argument("SlopeInnovation: non-finite reference centre");
}

std::optional<double> SlopeInnovation::update(double x, double z) {
  if (!std::isfinite(x) || !std::isfinite(z))
    throw std::invalid_argument("SlopeInnovation::update: non-finite input");
  const int side = side_of(x);
  if (state_.count > 0 && side != state_.side) {
    const Held a = state_.held[0];
    std::copy(state_.held.begin() + 1, state_.held.begin() + state_.count, state_.held.begin());
    --state_.count;
    const double sign = x > a.x ? 1.0 : -1.0;  // x != a.x: they are on different sides of x_c
    return sign * (z - a.z) / std::numbers::sqrt2;
  }
  if (state_.count == max_pending) {
    std::copy(state_.held.begin() + 1, state_.held.end(), state_.held.begin());
    --state_.count;
  }
  state_.side = side;
  state_.held[state_.count++] = Held{x, z};
  return std::nullopt;
}

Status SlopeInnovation::restore(const State& s) {
  if (s.count > max_pending) return Error{"slope pairing checkpoint holds more pairs than it can"};
  if (s.side < -1 || s.side > 1) return Error{"slope pairing checkpoint has an invalid side"};
  for (std::uint32_t i = 0; i < s.count; ++i) {
    const Held& h = s.held[i];
    if (!std::isfinite(h.x) || !std::isfinite(h.z))
      return Error{"slope pairing checkpoint holds a non-finite value"};
    if (side_of(h.x) != s.side)
      return Error{"slope pairing checkpoint holds a pair on the wrong side of the centre"};
  }
  state_ = s;
  return ok_status();
}

InnovationStream::InnovationStream(const stats::CertifiedLine& line, double sigma,
                                   const ReferenceCentre& centre)
    : line_intercept_(line.intercept),
      line_slope_(line.slope),
      sigma_(sigma),
      x_spread_(centre.x_spread),
      slope_(centre.x_centre) {
  if (!std::isfinite(sigma) || sigma <= 0) throw std::invalid_argument("InnovationStream: sigma must be > 0");
  if (!std::isfinite(centre.x_spread) || centre.x_spread <= 0) {
    throw std::invalid_argument("InnovationStream: reference spread must be > 0");
  }
}

Innovations InnovationStream::next(double x, double y) {
  Innovations out;
  const stats::CertifiedLine line{.intercept = line_intercept_, .slope = line_slope_};
  out.offset = offset_innovation(x, y, line, sigma_);
  out.d = (x - slope_.x_centre()) / x_spread_;
  out.slope = slope_.update(x, out.offset);
  return out;
}

}  // namespace rigcal::detect
