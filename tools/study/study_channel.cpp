#include "study_channel.hpp"

namespace rigcal::study {

const char* kind_label(config::DetectorKind k) {
  switch (k) {
    case config::DetectorKind::interval: return "interval";
    case config::DetectorKind::cusum: return "cusum";
    case config::DetectorKind::ewma: return "ewma";
    case config::DetectorKind::anytime: return "anytime";
  }
  return "?";
}

std::shared_ptr<const config::ChannelConfig> make_channel_config(const StudyChannel& channel,
                                                                 const DetectorSetting& setting) {
  auto c = std::make_shared<config::ChannelConfig>();
  c->id = "study";
  c->units = "degC";
  c->certificate.id = "simulated";
  c->certificate.intercept = channel.line.intercept;
  c->certificate.slope = channel.line.slope;
  // No certificate uncertainty: the simulated sensor follows the certified line exactly, and widening
  // by a certificate uncertainty would only make the interval rule less sensitive.
  c->sensor.noise_sd = setting.configured_sigma_factor * channel.sigma;
  c->range_low = channel.x_low;
  c->range_high = channel.x_high;
  c->tolerance.absolute = channel.tolerance_absolute;
  c->fit.confidence = setting.confidence;
  c->screening.enabled = setting.screening;
  c->detector.kind = setting.kind;
  c->detector.target_arl0_pairs = setting.target_arl0_pairs;
  c->detector.alpha = setting.alpha;
  c->alert.raise_after = setting.raise_after;
  return c;
}

PairSimulator make_simulator(const StudyChannel& channel, NoiseModel noise, Change change, std::uint64_t seed) {
  noise.sigma = channel.sigma;
  return PairSimulator(channel.line, channel.x_low, channel.x_high, noise, change, seed);
}

}  // namespace rigcal::study
