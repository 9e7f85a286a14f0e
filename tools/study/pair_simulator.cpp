#include "pair_simulator.hpp"

#include <cmath>
#include <stdexcept>

namespace rigcal::study {

PairSimulator::PairSimulator(CertificateLine line, double x_low, double x_high, NoiseModel noise, Change change,
                             std::uint64_t seed)
    : line_(line),
      noise_(noise),
      change_(change),
      innovation_scale_(std::sqrt(1.0 - noise.phi * noise.phi) * noise.sigma),
      rng_(seed),
      x_(x_low, x_high) {
  if (!(x_low < x_high) || !(noise.sigma > 0) || !(noise.phi >= 0 && noise.phi < 1) ||
      !(noise.outlier_probability >= 0 && noise.outlier_probability <= 1))
    throw std::invalid_argument("PairSimulator: invalid range or noise model");
  // Start the AR(1) noise in its stationary distribution, so that no early stretch is quieter than
  // the rest and the in-control run lengths are those of the steady state.
  ar_state_ = noise.sigma * normal_(rng_);
}

double PairSimulator::gain_change_at(std::uint64_t i) const {
  if (i < change_.start_pair) return 0;
  const double since = static_cast<double>(i - change_.start_pair + 1);
  switch (change_.kind) {
    case ChangeKind::gain_step: return change_.size;
    case ChangeKind::gain_ramp: return change_.size * since / 1000.0;
    default: return 0;
  }
}

double PairSimulator::offset_change_sigmas_at(std::uint64_t i) const {
  if (i < change_.start_pair) return 0;
  const double since = static_cast<double>(i - change_.start_pair + 1);
  switch (change_.kind) {
    case ChangeKind::offset_step: return change_.size;
    case ChangeKind::offset_ramp: return change_.size * since / 1000.0;
    default: return 0;
  }
}

double PairSimulator::noise() {
  ar_state_ = noise_.phi * ar_state_ + innovation_scale_ * normal_(rng_);
  double e = ar_state_;
  // The spike draw is always made, so that streams with and without spikes share their noise.
  const double u = unit_(rng_);
  if (u < noise_.outlier_probability) {
    const bool up = u < 0.5 * noise_.outlier_probability;
    e += (up ? 1.0 : -1.0) * noise_.outlier_sigmas * noise_.sigma;
  }
  return e;
}

Pair PairSimulator::next() {
  const std::uint64_t i = index_++;
  Pair p;
  p.x = x_(rng_);
  const double gain = gain_change_at(i);
  const double offset = offset_change_sigmas_at(i) * noise_.sigma;
  p.y = line_.intercept + line_.slope * (1.0 + gain) * p.x + offset + noise();
  return p;
}

std::uint64_t stream_seed(std::uint64_t base, std::uint64_t family, std::uint64_t replicate) {
  std::uint64_t z = base ^ (family * 0x9E3779B97F4A7C15ull) ^ (replicate * 0xD1B54A32D192ED03ull);
  z += 0x9E3779B97F4A7C15ull;
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
  return z ^ (z >> 31);
}

}  // namespace rigcal::study
