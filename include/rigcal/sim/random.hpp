#pragma once
// Random numbers that a seed reproduces anywhere. std::mt19937_64 is specified to the bit by the C++
// standard, but std::uniform_real_distribution and std::normal_distribution are not (each standard
// library draws differently), so the distributions are written out here:
//   uniform01  the top 53 bits of one engine output scaled by 2^-53: exact, identical everywhere;
//   normal     Marsaglia's polar method on uniform01 draws: identical wherever std::log and std::sqrt
//              agree (sqrt is exact by IEEE 754; log is within one ulp in every common libm, which no
//              rounded output of the simulator can show).
// Streams for independent purposes are derived from one seed by SplitMix64, so that, for example,
// adding a dropout to one channel leaves the set points of every channel as they were.
#include <cstdint>
#include <random>

namespace rigcal::sim {

// SplitMix64's output function (Steele, Lea and Flood, 2014): a bijective mix of 64 bits.
std::uint64_t splitmix64(std::uint64_t x);

// Seed of the stream with the given purpose (channel index, kind of draw) under one scenario seed.
std::uint64_t derive_seed(std::uint64_t seed, std::uint64_t channel, std::uint64_t purpose);

class RandomStream {
 public:
  explicit RandomStream(std::uint64_t seed) : engine_(seed) {}

  std::uint64_t bits() { return engine_(); }
  // Uniform on [0, 1), a multiple of 2^-53.
  double uniform01();
  // Uniform on [lo, hi).
  double uniform(double lo, double hi) { return lo + (hi - lo) * uniform01(); }
  // Uniform integer in [0, n), without modulo bias. REQUIRES: n > 0.
  std::uint64_t below(std::uint64_t n);
  // True with probability p (p <= 0: never, p >= 1: always); always consumes one draw.
  bool chance(double p) { return uniform01() < p; }
  // Standard normal.
  double normal();
  // Normal with the given mean and standard deviation (sd 0: the mean, but a draw is still consumed
  // so that the stream does not shift).
  double normal(double mean, double sd) { return mean + sd * normal(); }

 private:
  std::mt19937_64 engine_;
  bool have_spare_ = false;
  double spare_ = 0;
};

}  // namespace rigcal::sim
