#pragma once
// A channel's drift detector: decides, after each accepted pair, whether the data show that the
// sensor no longer follows its certificate line. One of four kinds (config detector.kind):
//
//  interval  the certificate is outside the fit's t interval of the slope or of the intercept, or
//            outside the joint F(2, n-2) region (stats/inference.hpp); needs persistence (alert
//            raise_after) because the test is repeated on overlapping data after every pair.
//  cusum     two-sided CUSUMs on the offset and slope innovations (detect/innovations.hpp), designed
//  ewma      for the channel's target ARL0 and smallest change worth catching (detect/arl.hpp).
//  anytime   the normal-mixture test of (offset, slope) jointly: P(any false alert, ever) <= alpha.
//
// The sequential kinds first learn, over learn_pairs pairs, the noise SD (when the configuration
// does not give it) and, for a channel without a range, the reference centre and spread; only then
// are they designed and started (see finish_learning in drift_monitor.cpp).
// Designs come from EngineTables and are shared between channels.
#include <optional>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "rigcal/config/config.hpp"
#include "rigcal/detect/cusum.hpp"
#include "rigcal/detect/ewma.hpp"
#include "rigcal/detect/innovations.hpp"
#include "rigcal/detect/mixture.hpp"
#include "rigcal/engine/engine_tables.hpp"
#include "rigcal/state/binary_codec.hpp"
#include "rigcal/stats/inference.hpp"

namespace rigcal::engine {

struct DriftFinding {
  bool evaluated = false;  // false while learning or before min_pairs
  bool present = false;
  const char* test = "";   // which test found it: slope, intercept, joint, offset, offset+slope, line
  double statistic = 0;    // the deciding statistic (largest relative to its threshold)
  double threshold = 0;
};

// What the detector was designed for, for status and the report.
struct DriftDesign {
  std::string_view kind;   // interval, cusum, ewma, anytime (a fixed text)
  double sigma = 0;        // noise SD used to standardise innovations
  bool sigma_learned = false;
  detect::ReferenceCentre centre;
  double offset_shift_sigma = 0, slope_shift_sigma = 0;
  double k_offset = 0, h_offset = 0, k_slope = 0, h_slope = 0;  // cusum
  double lambda_offset = 0, L_offset = 0, lambda_slope = 0, L_slope = 0;  // ewma
  double rho = 0, alpha = 0;                                    // anytime
  double arl0_pairs = 0;         // designed in-control average run length, in pairs (channel total)
  double arl1_offset_pairs = 0;  // expected pairs to detect the design offset change
  double arl1_slope_pairs = 0;   // ... and the design slope change
};

class DriftMonitor {
 public:
  enum class Phase { waiting, learning, monitoring, unavailable };

  DriftMonitor(const config::ChannelConfig& cfg, EngineTables& tables);

  // Feeds one accepted pair (channel units) after the fit was updated; `fit` is the fit's summary
  // after the update (errors while the fit is undetermined).
  DriftFinding update(double x, double y, const Result<stats::LineFit>& fit);
  void reset();

  Phase phase() const { return phase_; }
  const char* phase_name() const;
  const std::string& unavailable_reason() const { return unavailable_reason_; }
  const DriftDesign& design() const { return design_; }
  // Current detector statistics, for status: (offset, slope) or (log M, 0), with their thresholds.
  double statistic_offset() const;
  double statistic_slope() const;
  // True once the detector's phase changed (learning done, design failed); cleared by the call.
  bool take_phase_change() {
    const bool c = phase_changed_;
    phase_changed_ = false;
    return c;
  }

  void save(state::BinaryWriter& w) const;
  bool load(state::BinaryReader& r);

 private:
  // The running detectors of one sequential kind. A channel holds only its configured kind's, not
  // every kind's: they are per-channel state, and with many channels the unused ones add up.
  struct CusumPair {
    detect::Cusum offset, slope;
  };
  struct EwmaPair {
    detect::Ewma offset, slope;
  };
  using Detectors = std::variant<std::monostate, CusumPair, EwmaPair, detect::NormalMixtureTest>;

  // A learning pair: the reference value and its deviation y - (b0* + b1* x) from the certified line.
  struct LearnPair {
    double x = 0, e = 0;
  };

  // Gathered from the configuration when needed rather than copied into every channel.
  stats::CertifiedLine certified_line() const;
  DriftFinding interval_rule(const Result<stats::LineFit>& fit);
  DriftFinding sequential(double x, double y);
  void finish_learning(const Result<stats::LineFit>& fit);
  void start_detectors();
  void drop_learning_pairs();

  const config::ChannelConfig& cfg_;
  EngineTables& tables_;
  const stats::TwoSidedT& t_;
  static constexpr double deadband_fraction = 0.5;
  Phase phase_ = Phase::waiting;
  bool latched_ = false;  // a sequential finding stays present until below the deadband
  bool phase_changed_ = false;
  std::string unavailable_reason_;
  std::vector<LearnPair> learning_;
  DriftDesign design_;
  std::optional<detect::InnovationStream> innovations_;
  Detectors detectors_;
};

}  // namespace rigcal::engine
