#include "diagnostics.hpp"

#include <algorithm>
#include <vector>

#include "pair_simulator.hpp"
#include "rigcal/detect/innovations.hpp"

namespace rigcal::study {

PairingRate slope_pairing_rate(const StudyChannel& channel, int learn_pairs, int channels, std::uint64_t pairs,
                               std::uint64_t seed) {
  std::vector<double> rates;
  for (int c = 0; c < channels; ++c) {
    PairSimulator sim = make_simulator(channel, {}, {}, stream_seed(seed, 80000 + static_cast<std::uint64_t>(learn_pairs), static_cast<std::uint64_t>(c)));
    double centre = 0.5 * (channel.x_low + channel.x_high);  // the median of uniform reference values
    if (learn_pairs > 0) {
      std::vector<double> xs;
      for (int i = 0; i < learn_pairs; ++i) xs.push_back(sim.next().x);
      centre = detect::reference_centre(xs).value().x_centre;
    }
    detect::SlopeInnovation pairing(centre);
    std::uint64_t made = 0;
    for (std::uint64_t i = 0; i < pairs; ++i) made += pairing.update(sim.next().x, 0.0).has_value();
    rates.push_back(static_cast<double>(made) / static_cast<double>(pairs));
  }
  std::sort(rates.begin(), rates.end());
  PairingRate r;
  r.learn_pairs = learn_pairs;
  for (double v : rates) r.mean += v / static_cast<double>(rates.size());
  r.p05 = rates[rates.size() / 20];
  r.min = rates.front();
  return r;
}

}  // namespace rigcal::study
