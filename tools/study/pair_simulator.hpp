#pragma once
// Simulated calibration pairs for the run-length study.
//
// Reference values x are i.i.d. uniform over the channel's range; the sensor reads
//     y = b0* + b1* (1 + g(t)) x + o(t) sigma + noise(t),
// the certificate line with a gain change g and an offset change o (in noise standard deviations), both
// zero before the change starts. A gain change pivots about x = 0, as a transmitter's span error does.
// The noise is AR(1) with marginal standard deviation sigma, optionally with spikes.
//
// Deterministic: the same seed gives the same pairs, so every detector of the study sees the same
// streams (common random numbers make their differences more precise than their separate errors).
#include <cstdint>
#include <random>

namespace rigcal::study {

struct NoiseModel {
  double sigma = 1;  // marginal standard deviation of one reading's noise, channel units
  double phi = 0;    // AR(1) coefficient, 0 <= phi < 1: e_t = phi e_{t-1} + sqrt(1 - phi^2) sigma eps_t
  double outlier_probability = 0;  // chance that a pair carries a spike
  double outlier_sigmas = 20;      // spike size in sigma, random sign; added on top of the noise
};

enum class ChangeKind { none, gain_step, offset_step, gain_ramp, offset_ramp };

struct Change {
  ChangeKind kind = ChangeKind::none;
  // gain_step: relative slope change (0.01 = 1 %); offset_step: offset in sigma;
  // gain_ramp / offset_ramp: the same per 1000 pairs since the start.
  double size = 0;
  std::uint64_t start_pair = 0;  // index (0-based) of the first pair that carries the change
};

struct CertificateLine {
  double intercept = 0;
  double slope = 1;
};

struct Pair {
  double x = 0;
  double y = 0;
};

class PairSimulator {
 public:
  // REQUIRES: x_low < x_high; sigma > 0; 0 <= phi < 1; 0 <= outlier_probability <= 1.
  PairSimulator(CertificateLine line, double x_low, double x_high, NoiseModel noise, Change change,
                std::uint64_t seed);

  Pair next();
  std::uint64_t pairs_made() const { return index_; }

  // The change (g, o) carried by the pair of index i, for tests and the report.
  double gain_change_at(std::uint64_t i) const;
  double offset_change_sigmas_at(std::uint64_t i) const;

 private:
  double noise();

  CertificateLine line_;
  NoiseModel noise_;
  Change change_;
  double innovation_scale_;  // sqrt(1 - phi^2) sigma
  std::mt19937_64 rng_;
  std::uniform_real_distribution<double> x_;
  std::normal_distribution<double> normal_{0.0, 1.0};
  std::uniform_real_distribution<double> unit_{0.0, 1.0};
  double ar_state_ = 0;
  std::uint64_t index_ = 0;
};

// A seed for replicate `replicate` of stream family `family`: SplitMix64 (Steele, Lea & Flood 2014) of
// the combination, so that neighbouring replicates get unrelated generator states.
std::uint64_t stream_seed(std::uint64_t base, std::uint64_t family, std::uint64_t replicate);

}  // namespace rigcal::study
