#pragma once
// Engine behaviours the study measures beside the run lengths.
#include <cstdint>

#include "study_channel.hpp"

namespace rigcal::study {

// Slope innovations per pair of the engine's slope pairing (detect::SlopeInnovation) when the reference
// centre is learned, as DriftMonitor learns it, as the median of the first `learn_pairs` reference values.
// The designs assume 0.5 (one innovation per two pairs). A centre away from the true median puts a
// fraction p != 1/2 of the pairs on one side; only min(p, 1 - p) per pair can be matched and the surplus
// is dropped once max_pending are held.
struct PairingRate {
  int learn_pairs = 0;  // 0: the exact median of the channel's x distribution
  double mean = 0;      // over channels (replicates)
  double p05 = 0;       // 5th percentile over channels
  double min = 0;
};
PairingRate slope_pairing_rate(const StudyChannel& channel, int learn_pairs, int channels, std::uint64_t pairs,
                               std::uint64_t seed);

}  // namespace rigcal::study
