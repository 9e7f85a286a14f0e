#pragma once
// Conformity of a sensor with its tolerance, under a stated decision rule (ISO/IEC 17025:2017 7.8.6
// requires the rule behind every pass/fail statement; ILAC-G8:09/2019 4.2 describes the rules).
//
// The error e(x) and its expanded uncertainty U_e(x) come from sensor_error.hpp; the tolerance is the
// maximum permissible error MPE(x) of max_permissible_error.hpp over the sensor's range [lo, hi].
//
// Rules, with w the guard band (all in reference units):
//  - simple acceptance (ILAC-G8 4.2.1, w = 0): pass iff |e| <= MPE, otherwise fail. U_e is not used,
//    so a sensor whose error sits at the limit passes with up to 50 % probability that its true error
//    is beyond it.
//  - guarded acceptance (ILAC-G8 4.2.3, non-binary, default w = U_e at each point): pass iff
//    |e| + w <= MPE, fail iff |e| - w > MPE, otherwise indeterminate: a conditional pass if
//    |e| <= MPE, a conditional fail if not. With w = U_e at coverage p, a passed point has at most
//    (1 - p) / 2 probability that its true error is beyond the limit.
//
// Where the sensor is checked. e is linear in x, U_e(x) = k sqrt(a + b (x - c)^2) is convex, and
// MPE(x) is linear on each side of x = 0. Hence:
//  - MPE - |e| and MPE - |e| - U_e are concave on each side of x = 0 (-|e| and -U_e are concave), so
//    their minimum over [lo, hi] lies at lo, hi or x = 0 (checked when 0 is inside the range and the
//    MPE has a percent-of-reading term). These points decide pass under both rules exactly when k is
//    the same at every x (no reference-standard term); otherwise k varies slightly with nu_eff(x).
//  - |e| - U_e - MPE (the guarded fail test) is concave only where e keeps its sign and can peak
//    inside the range, where U_e is smallest (near the fit's centroid). Its stationary points are
//    added, so that a sensor failing at mid-range is not reported as merely indeterminate at the ends.
//    (k is taken at the centroid to place them; each point is then evaluated with its own k.)
// Points the caller names are checked too. Every point must lie in [lo, hi].
//
// The overall verdict is the worst point's: fail if any point fails, indeterminate if any is
// conditional, pass only if every point passes.
#include <optional>
#include <string>
#include <vector>

#include "rigcal/metrology/max_permissible_error.hpp"
#include "rigcal/metrology/reference_standard.hpp"
#include "rigcal/metrology/sensor_error.hpp"
#include "rigcal/result.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::metrology {

enum class DecisionRule { simple_acceptance, guarded_acceptance };
enum class Verdict { pass, indeterminate, fail };
// ILAC-G8 4.2.3's statements for one point; simple acceptance uses only pass and fail.
enum class PointStatement { pass, conditional_pass, conditional_fail, fail };
enum class PointOrigin { range_low, range_high, zero_reading, guard_band_extremum, requested };

struct VerdictOptions {
  DecisionRule rule = DecisionRule::guarded_acceptance;
  std::optional<double> guard_band;  // guarded rule: a fixed w >= 0 (reference units); default U_e(x)
  std::vector<double> extra_points;  // further reference values to check, inside [lo, hi]
  // false: only the verdict and the points' statements, for a caller that judges often and reads
  // nothing else (the channel engine's periodic check): rule_description stays empty and every
  // probability_beyond_limit is NaN. The Student t tail behind that probability costs more than
  // the rest of the verdict together.
  bool explain = true;
};

struct PointCheck {
  PointOrigin origin = PointOrigin::requested;
  SensorError error;      // x, e, u, nu_eff, k, U_e
  double mpe = 0;         // MPE(x)
  double guard_band = 0;  // w at this point (0 under simple acceptance)
  double margin = 0;      // MPE - |e|: distance inside the tolerance, negative beyond it
  // P(|true error| > MPE) given e and u: e + u T with T Student t at floor(nu_eff) (normal when
  // nu_eff is infinite); 0 or 1 when u = 0. At |e| = MPE it is 1/2 plus the far tail.
  double probability_beyond_limit = 0;
  PointStatement statement = PointStatement::pass;
};

struct ToleranceVerdict {
  Verdict verdict = Verdict::pass;
  DecisionRule rule = DecisionRule::guarded_acceptance;
  std::string rule_name;           // "simple acceptance" / "guarded acceptance"
  std::string rule_description;    // one plain paragraph: the rule, its guard band and its risk
  PointCheck worst;                // most severe statement, then the smallest margin - guard band
  std::vector<PointCheck> points;  // lo, hi, then x = 0, extrema and requested points as they apply
};

// Error: invalid tolerance or range (check_tolerance), a negative or non-finite fixed guard band, a
// requested point outside [lo, hi] or not finite, or any error of sensor_error_at.
Result<ToleranceVerdict> judge_tolerance(const stats::LineFit& fit, const stats::CertifiedLine& certificate,
                                         const ReferenceStandardUncertainty& reference,
                                         const MaximumPermissibleError& mpe, const SensorRange& range,
                                         const VerdictOptions& options, const stats::TwoSidedT& t);

const char* to_string(Verdict v);
const char* to_string(PointStatement s);

}  // namespace rigcal::metrology
