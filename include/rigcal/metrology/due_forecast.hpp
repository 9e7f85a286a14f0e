#pragma once
// When will a drifting sensor leave its tolerance? A calibration-interval estimate by the drift trend
// (one of the "other statistical methods" for setting intervals, ILAC-G24 / OIML D 10:2022).
//
// Method. One tracker per range point x (the daemon keeps one for each end of the range). Each
// snapshot k is the sensor's error there, e_k = e(x) at time t_k with its standard uncertainty u_k
// (sensor_error.hpp). The trend e(t) = c0 + c1 t is fitted by weighted least squares with weights
// 1 / u_k^2 (a cumulative stats::LineAccumulator, O(1) memory). With the fitted level a at the
// weighted mean time tbar and slope c1 (uncorrelated there), the tolerance limit L is crossed at
//   t* = tbar + (L - a) / c1,           L = +MPE if c1 > 0, -MPE if c1 < 0.
// The interval for the crossing is the set of times at which the trend's confidence band contains L
// (Fieller's interval for the ratio (L - a) / c1):
//   (c1 tau - (L - a))^2 <= T^2 (s^2 / W + u_common^2 + tau^2 s^2 / Sxx),   tau = t - tbar,
// with T = t_p(n - 2) two-sided at the tracker's confidence. It is bounded exactly when the slope is
// significantly non-zero at that level, |c1| / se(c1) > T. "Due by" is its lower end: the earliest
// time consistent with the data, a one-sided bound at (1 + p) / 2.
//
// Why the confidence band and not the prediction band: the question is when the sensor's true
// (mean) error reaches the MPE. A snapshot's scatter about the trend is the noise of estimating e
// from one fit window, not a property of the sensor, so the prediction band (which adds one
// snapshot's scatter) would answer "when may a single snapshot look out of tolerance" and over-cover
// the crossing of the true error. The confidence-band interval covers the true crossing time with
// probability p under the model (linear trend, normal snapshot errors, u_k right up to a common
// factor) when u_common = 0, and somewhat more with it (both checked by simulation).
//
// Residual variance. s^2 is estimated from the residuals (the weights fix only the snapshots'
// relative precision), so the interval stays valid if the stated u_k are all off by one factor, and
// ageing that wanders about the line widens it; T then uses n - 2 dof.
//
// u_common: a standard uncertainty shared by every snapshot, chiefly the reference standard's
// (every snapshot is measured against the same standard, so its error shifts the whole trend and
// does not average out). Pass u_k without it and u_common separately. It enters the level's variance
// only; T keeps n - 2 dof (conservative: the extra infinite-dof term can only raise nu_eff).
//
// Assumptions and limits:
//  - linear ageing. Sensors often drift fast at first and then settle, or step; the forecast is an
//    extrapolation and grows less reliable the further the crossing lies beyond the snapshots.
//  - independent snapshots. Snapshots from overlapping fit windows share pairs and are correlated,
//    which makes the trend look more certain than it is: take snapshots at least one fit window apart.
//  - MPE constant at the tracked point (true for a fixed x), symmetric limits +-MPE.
//
// Times are seconds on any fixed scale (e.g. Unix time); results are on the same scale.
// Not thread-safe.
#include <cstdint>
#include <optional>
#include <string>

#include "rigcal/result.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/line_accumulator.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::metrology {

struct DueForecastOptions {
  std::uint64_t min_snapshots = 5;  // >= 3 (a line with uncertainty needs n - 2 >= 1)
  double u_common = 0;              // reference units, >= 0; see the header comment
};

enum class DueStatus {
  insufficient_data,     // fewer than min_snapshots
  already_outside,       // the trend puts the error beyond +-MPE at the latest snapshot
  no_significant_trend,  // |c1| / se(c1) <= T: no due date (the crossing interval is unbounded)
  due,                   // a bounded crossing interval
};

struct DriftTrend {
  double slope_per_s = 0;    // c1, reference units per second
  double u_slope_per_s = 0;  // se(c1)
  double dof = 0;            // n - 2
  double error_now = 0;      // trend at the latest snapshot time
  double u_error_now = 0;    // its standard uncertainty, u_common included
};

struct ToleranceCrossing {
  double limit = 0;               // +MPE or -MPE: the limit the trend heads for
  double time_s = 0;              // point estimate t*
  stats::Interval interval_s;     // Fieller interval at the tracker's confidence
  double due_by_s = 0;            // interval_s.lo: the conservative (earliest) crossing
  bool may_have_crossed = false;  // due_by_s <= latest snapshot time: it may be out already
};

struct DueForecast {
  DueStatus status = DueStatus::insufficient_data;
  std::string reason;  // one plain sentence saying why (for reports and maintenance)
  std::uint64_t snapshots = 0;
  double latest_time_s = 0;
  std::optional<DriftTrend> trend;            // absent when insufficient_data
  std::optional<ToleranceCrossing> crossing;  // present only when due
};

class DueForecastTracker {
 public:
  // Error unless min_snapshots >= 3 and u_common is finite and >= 0.
  static Result<DueForecastTracker> create(const DueForecastOptions& options);

  // One snapshot. Error (and the snapshot is not taken) unless time_s, error are finite, u_error is
  // finite and > 0 with a finite weight 1/u^2, and time_s is later than the previous snapshot.
  Status add(double time_s, double error, double u_error);

  // Error unless mpe is finite and > 0.
  Result<DueForecast> forecast(double mpe, const stats::TwoSidedT& t) const;

  std::uint64_t snapshots() const { return trend_.moments().count; }
  void reset();

  // The complete state, for checkpoints.
  struct State {
    stats::LineMoments moments;
    std::optional<double> latest_time_s;
  };
  State state() const { return {trend_.moments(), latest_time_s_}; }
  Status restore(const State& s);

 private:
  explicit DueForecastTracker(const DueForecastOptions& options);

  DueForecastOptions options_;
  stats::LineAccumulator trend_;  // cumulative: no snapshot is ever removed, so none is stored
  std::optional<double> latest_time_s_;
};

const char* to_string(DueStatus s);

}  // namespace rigcal::metrology
