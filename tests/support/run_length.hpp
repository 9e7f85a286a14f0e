#pragma once
// Monte Carlo run lengths of a detector on simulated innovations, for comparing against computed ARLs.
#include <cmath>
#include <cstdint>
#include <random>

namespace rigcal::test {

struct RunLengths {
  double mean = 0;
  double standard_error = 0;  // of the mean
  int runs = 0;
};

// Runs a fresh copy of `proto` from its zero state on z ~ N(mu, 1) until its update() reports an
// alarm, `runs` times. Fixed seed: the figures are reproducible.
template <class Detector>
RunLengths simulate_run_lengths(const Detector& proto, double mu, int runs, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> noise(mu, 1.0);
  double sum = 0, sum_sq = 0;
  for (int r = 0; r < runs; ++r) {
    Detector d = proto;
    d.reset();
    double length = 0;
    do {
      ++length;
    } while (!d.update(noise(rng)));
    sum += length;
    sum_sq += length * length;
  }
  RunLengths out;
  out.runs = runs;
  out.mean = sum / runs;
  const double variance = (sum_sq - runs * out.mean * out.mean) / (runs - 1);
  out.standard_error = std::sqrt(variance / runs);
  return out;
}

}  // namespace rigcal::test
