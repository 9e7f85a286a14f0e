#pragma once
// The channel the study simulates, and the daemon configuration of each detector under test.
//
// A temperature channel over 0-100 degC read against a reference standard, noise sigma = 0.5 degC
// (known, configured), tolerance 1 degC (so the default smallest offset change worth catching is a
// quarter of it, 0.25 degC = 0.5 sigma), and the default smallest slope change of 0.5 %. sigma is
// chosen so that the smallest changes of interest are hard but not hopeless: a 0.5 % gain change moves
// the mid-range reading by 0.25 degC = 0.5 sigma, a 5 % one by 5 sigma. Everything else (fit window,
// screening, learning, alert policy) is the daemon's default.
#include <memory>
#include <optional>
#include <string>

#include "pair_simulator.hpp"
#include "rigcal/config/config.hpp"

namespace rigcal::study {

struct StudyChannel {
  double x_low = 0;
  double x_high = 100;
  CertificateLine line{0.05, 1.002};  // the certificate; the simulated sensor follows it in control
  double sigma = 0.5;                 // true noise SD (marginal, for AR(1) noise)
  double tolerance_absolute = 1.0;
};

struct DetectorSetting {
  config::DetectorKind kind = config::DetectorKind::cusum;
  double target_arl0_pairs = 20000;  // cusum / ewma design target (channel total)
  std::optional<int> raise_after;    // interval rule persistence (default: the daemon's)
  double confidence = 0.95;          // interval rule's fit confidence
  double alpha = 0.001;              // anytime-valid test
  double configured_sigma_factor = 1;  // configured noise_sd = factor x true sigma (autocorrelation fix)
  bool screening = true;
};

const char* kind_label(config::DetectorKind k);

// The daemon's default channel configuration with the study channel's facts and `setting`.
std::shared_ptr<const config::ChannelConfig> make_channel_config(const StudyChannel& channel,
                                                                 const DetectorSetting& setting);

// A simulator for `channel` with the given noise (sigma taken from the channel) and change.
PairSimulator make_simulator(const StudyChannel& channel, NoiseModel noise, Change change, std::uint64_t seed);

}  // namespace rigcal::study
