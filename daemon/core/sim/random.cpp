#include "rigcal/sim/random.hpp"

#include <cmath>

namespace rigcal::sim {

std::uint64_t splitmix64(std::uint64_t x) {
  x += 0x9E3779B97F4A7C15ull;
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ull;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBull;
  return x ^ (x >> 31);
}

std::uint64_t derive_seed(std::uint64_t seed, std::uint64_t channel, std::uint64_t purpose) {
  // Chained rather than xor-ed together, so that (channel, purpose) pairs cannot cancel out.
  return splitmix64(splitmix64(splitmix64(seed) ^ channel) ^ purpose);
}

double RandomStream::uniform01() { return static_cast<double>(engine_() >> 11) * 0x1.0p-53; }

std::uint64_t RandomStream::below(std::uint64_t n) {
  // Rejection of the incomplete last block keeps every value equally likely.
  const std::uint64_t limit = UINT64_MAX - UINT64_MAX % n;
  std::uint64_t x = engine_();
  while (x >= limit) x = engine_();
  return x % n;
}

double RandomStream::normal() {
  if (have_spare_) {
    have_spare_ = false;
    return spare_;
  }
  double u = 0, v = 0, s = 0;
  do {
    u = 2 * uniform01() - 1;
    v = 2 * uniform01() - 1;
    s = u * u + v * v;
  } while (s >= 1 || s == 0);
  const double f = std::sqrt(-2 * std::log(s) / s);
  spare_ = v * f;
  have_spare_ = true;
  return u * f;
}

}  // namespace rigcal::sim
