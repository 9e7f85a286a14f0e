#pragma once
// Run lengths of a bare detector (cusum.hpp, ewma.hpp) on i.i.d. N(mu, 1) innovations, the setting of
// the published ARL tables: a check that the study's simulation and estimators reproduce them before
// they are trusted with the engine.
#include <cstdint>
#include <random>
#include <vector>

#include "pair_simulator.hpp"
#include "run_length_stats.hpp"

namespace rigcal::study {

// `runs` run lengths of fresh copies of `proto` from the zero state, each stopped at the alarm or at
// `limit` innovations (censored). Detector: update(z) -> bool in alarm, reset().
template <class Detector>
std::vector<RunLength> raw_run_lengths(const Detector& proto, double mu, int runs, std::uint64_t limit,
                                       std::uint64_t seed) {
  std::vector<RunLength> out;
  out.reserve(static_cast<std::size_t>(runs));
  for (int r = 0; r < runs; ++r) {
    std::mt19937_64 rng(stream_seed(seed, 0, static_cast<std::uint64_t>(r)));
    std::normal_distribution<double> z(mu, 1.0);
    Detector d = proto;
    d.reset();
    RunLength rl{limit, false};
    for (std::uint64_t t = 1; t <= limit; ++t) {
      if (d.update(z(rng))) {
        rl = {t, true};
        break;
      }
    }
    out.push_back(rl);
  }
  return out;
}

}  // namespace rigcal::study
