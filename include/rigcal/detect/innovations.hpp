#pragma once
// The standardised innovations the drift detectors read, from each (reference x, indication y) pair, the
// certificate line y = b0* + b1* x and the sensor's noise standard deviation sigma (known, configured).
// While the sensor follows its certificate both innovations are exactly N(0, 1) and independent from
// pair to pair, which is what the ARL designs (arl.hpp) and the anytime-valid test (mixture.hpp) assume.
//
//  - offset innovation z = (y - b0* - b1* x) / sigma. A change (db0, db1) of the line gives it mean
//    (db0 + db1 x) / sigma: it sees any departure of the line at the operating points.
//  - slope innovation: from two pairs a, b on opposite sides of the reference centre x_c,
//        v = sign(x_b - x_a) (z_b - z_a) / sqrt(2),
//    mean db1 |x_b - x_a| / (sigma sqrt 2), about sqrt(2) db1 E|x - x_c| / sigma on average
//    (slope_shift_sigma). Exactness: z_a, z_b are independent N(0, 1) in control and the sign depends on
//    the reference values only, so v ~ N(0, 1); each z enters one v, so the v are independent. An
//    offset change adds the same amount to z_a and z_b and cancels exactly.
//
// Why pairs rather than the per-pair z sign(x - x_c): that is N(0, 1) in control too, but under an
// offset change of delta sigma it becomes +-(delta + noise), whose variance is 1 + delta^2 when the sides
// alternate at random, so the slope detector alarms on a pure offset fault; and a slope change leaks
// db1 x_c into it with a random sign whenever the reference values do not straddle x = 0, which swamps
// it when x_c is far from 0 (a 300 degC reference point). Pairs cost one slope innovation per two pairs
// (the slope detector's ARL counts slope innovations), a wait for a pair on the other side, and a little
// information when the two distances from x_c differ ((|a| + |b|)^2 / 2 <= a^2 + b^2; 12 % for reference
// values spread uniformly).
#include <array>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>

#include "rigcal/result.hpp"
#include "rigcal/stats/inference.hpp"

namespace rigcal::detect {

// Where the reference values of the as-left calibration sit.
struct ReferenceCentre {
  double x_centre = 0;  // x_c: median of the reference values, splits them for the slope pairs
  double x_spread = 1;  // s_x: root mean square of x - x_c, so d = (x - x_c) / s_x has mean square 1
  double mean_abs_deviation = 0;  // mean |x - x_c|: sets the slope innovation's response
};
// Errors: fewer than two values, a non-finite value, or no spread (every value equal).
Result<ReferenceCentre> reference_centre(std::span<const double> xs);

// z = (y - b0* - b1* x) / sigma; only the line's intercept and slope are used. REQUIRES: sigma > 0.
double offset_innovation(double x, double y, const stats::CertifiedLine& line, double sigma);

// Mean, in slope-innovation standard deviations, of the slope innovation under a slope change db1
// (indication units per reference unit): sqrt(2) |db1| mean_abs_deviation / sigma. Exact when every
// pair is matched across x_c with the average distance; the design value for design_cusum/design_ewma.
double slope_shift_sigma(double slope_change, const ReferenceCentre& centre, double sigma);

// Length, in the anytime-valid test's standardised units (mixture.hpp), of a line change (db0, db1):
// |((db0 + db1 x_c) / sigma, db1 s_x / sigma)|, the design value for design_mixture.
double line_shift_sigma(double intercept_change, double slope_change, const ReferenceCentre& centre,
                        double sigma);

// Pairs offset innovations across x_c into slope innovations.
//
// Rule: a pair is held until one arrives on the other side of x_c; the newcomer is then matched with the
// oldest held pair. A reference value exactly at x_c counts as its own side, so it pairs with any value
// off x_c. At most max_pending pairs are held (then all on one side): one more on the same side drops the
// oldest. The rule reads reference values only, never z, which keeps v exactly N(0, 1).
class SlopeInnovation {
 public:
  static constexpr std::size_t max_pending = 16;
  struct Held {
    double x = 0;
    double z = 0;
  };
  // The complete state, for checkpoints: held[0 .. count) oldest first, all on `side` (-1, 0, +1).
  struct State {
    std::array<Held, max_pending> held{};
    std::uint32_t count = 0;
    std::int32_t side = 0;
  };

  // REQUIRES: x_centre finite.
  explicit SlopeInnovation(double x_centre);

  // Feeds one pair's reference value and offset innovation; returns the slope innovation when this pair
  // completes a match. REQUIRES: x and z finite.
  std::optional<double> update(double x, double z);
  void reset() { state_ = {}; }

  double x_centre() const { return x_centre_; }
  std::size_t held() const { return state_.count; }

  State state() const { return state_; }
  // Fails (leaving this unchanged) on a count above max_pending, a side outside {-1, 0, 1}, a held value
  // that is not finite or a held reference value on another side than `side`.
  Status restore(const State& s);

 private:
  int side_of(double x) const { return x > x_centre_ ? 1 : (x < x_centre_ ? -1 : 0); }

  double x_centre_;
  State state_;
};

// What one pair gives the detectors.
struct Innovations {
  double offset = 0;            // z: for the offset CUSUM/EWMA and as the mixture test's e
  double d = 0;                 // (x - x_c) / s_x: the mixture test's regressor
  std::optional<double> slope;  // present when this pair completed a slope pair
};

// Both innovations and the regressor from raw pairs, for the channel engine.
class InnovationStream {
 public:
  // REQUIRES: sigma finite and > 0; centre from reference_centre (x_spread > 0).
  InnovationStream(const stats::CertifiedLine& line, double sigma, const ReferenceCentre& centre);

  // REQUIRES: x and y finite.
  Innovations next(double x, double y);
  void reset() { slope_.reset(); }

  // The only state is the slope pairing's; the line, sigma and centre are configuration.
  SlopeInnovation::State state() const { return slope_.state(); }
  Status restore(const SlopeInnovation::State& s) { return slope_.restore(s); }

 private:
  // Only what next() reads, one stream per channel: of the line its intercept and slope (all that
  // offset_innovation uses), of the centre its spread (x_c is the slope pairing's).
  double line_intercept_;
  double line_slope_;
  double sigma_;
  double x_spread_;
  SlopeInnovation slope_;
};

}  // namespace rigcal::detect
