#include "rigcal/metrology/due_forecast.hpp"

#include <cmath>
#include <cstdio>

#include "number_text.hpp"
#include "rigcal/stats/line_fit.hpp"

namespace rigcal::metrology {

namespace {

constexpr double seconds_per_day = 86400.0;

std::string days_text(double seconds) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.4g days", seconds / seconds_per_day);
  return buf;
}

// Signed, as the limit the trend heads for ("+0.5" / "-0.5").
std::string limit_text(double limit) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%+.7g", limit);
  return buf;
}

DriftTrend trend_of(const stats::LineFit& fit, double latest_time_s, double u_common) {
  DriftTrend tr;
  tr.slope_per_s = fit.b1;
  tr.u_slope_per_s = fit.se_b1;
  tr.dof = fit.dof;
  tr.error_now = fit.predict(latest_time_s);
  tr.u_error_now = std::sqrt(fit.s * fit.s * fit.leverage(latest_time_s) + u_common * u_common);
  return tr;
}

// Fieller's interval for the time at which the trend's mean reaches `limit` (see the header).
// REQUIRES: c1^2 > T^2 se(c1)^2, so that the interval is bounded.
ToleranceCrossing crossing_of(const stats::LineFit& fit, double limit, double tc, double u_common,
                              double latest_time_s) {
  const double c1 = fit.b1;
  const double se1_sq = fit.se_b1 * fit.se_b1;
  const double a_coef = c1 * c1 - tc * tc * se1_sq;
  const double d = limit - fit.mean_y;  // from the level at the weighted mean time
  const double level_var = fit.s * fit.s / fit.sum_w + u_common * u_common;
  const double root = tc * std::sqrt(se1_sq * d * d + a_coef * level_var);
  ToleranceCrossing c;
  c.limit = limit;
  c.time_s = fit.mean_x + d / c1;
  c.interval_s = {fit.mean_x + (c1 * d - root) / a_coef, fit.mean_x + (c1 * d + root) / a_coef};
  c.due_by_s = c.interval_s.lo;
  c.may_have_crossed = c.due_by_s <= latest_time_s;
  return c;
}

std::string due_reason(const DueForecast& f, const ToleranceCrossing& c, double confidence) {
  std::string r = "the error drifts by " + detail::number_text(f.trend->slope_per_s * seconds_per_day) +
                  " per day towards the limit " + limit_text(c.limit) + "; the trend reaches it " +
                  days_text(c.time_s - f.latest_time_s) + " after the latest snapshot (" +
                  detail::percent_text(confidence) + " interval " +
                  days_text(c.interval_s.lo - f.latest_time_s) + " to " +
                  days_text(c.interval_s.hi - f.latest_time_s) + "): due by the start of that interval";
  if (c.may_have_crossed)
    r += "; the interval starts before the latest snapshot, so the limit may already be reached";
  return r;
}

}  // namespace

DueForecastTracker::DueForecastTracker(const DueForecastOptions& options)
    : options_(options) {}

Result<DueForecastTracker> DueForecastTracker::create(const DueForecastOptions& options) {
  if (options.min_snapshots < 3) {
    return Error{
        "due forecast: at least 3 snapshots are needed for a trend with uncertainty, min_snapshots is " +
        std::to_string(options.min_snapshots)};
  }
  if (!(std::isfinite(options.u_common) && options.u_common >= 0)) {
    return Error{"due forecast: common uncertainty must be a finite number >= 0, got " +
                 detail::number_text(options.u_common)};
  }
  return DueForecastTracker(options);
}

Status DueForecastTracker::add(double time_s, double error, double u_error) {
  if (!(std::isfinite(time_s) && std::isfinite(error))) {
    return Error{"due forecast: snapshot time and error must be finite numbers"};
  }
  const double weight = 1.0 / (u_error * u_error);
  if (!(std::isfinite(u_error) && u_error > 0 && std::isfinite(weight))) {
    return Error{
        "due forecast: snapshot uncertainty must be a finite number > 0 (with a finite 1/u^2), got " +
        detail::number_text(u_error)};
  }
  if (latest_time_s_ && !(time_s > *latest_time_s_)) {
    return Error{"due forecast: snapshot at " + detail::number_text(time_s) +
                 " s is not later than the previous one at " + detail::number_text(*latest_time_s_) + " s"};
  }
  trend_.add(time_s, error, weight);
  latest_time_s_ = time_s;
  return ok_status();
}

Status DueForecastTracker::restore(const State& s) {
  if (s.latest_time_s && !std::isfinite(*s.latest_time_s)) return Error{"forecast state: latest time not finite"};
  trend_ = stats::LineAccumulator::from_moments(s.moments);
  latest_time_s_ = s.latest_time_s;
  return ok_status();
}

void DueForecastTracker::reset() {
  trend_.reset();
  latest_time_s_.reset();
}

Result<DueForecast> DueForecastTracker::forecast(double mpe, const stats::TwoSidedT& t) const {
  if (!(std::isfinite(mpe) && mpe > 0)) {
    return Error{"due forecast: maximum permissible error must be a finite number > 0, got " +
                 detail::number_text(mpe)};
  }
  DueForecast f;
  f.snapshots = snapshots();
  f.latest_time_s = latest_time_s_.value_or(0.0);
  if (f.snapshots < options_.min_snapshots) {
    f.reason = std::to_string(f.snapshots) + " snapshots so far; a drift forecast needs at least " +
               std::to_string(options_.min_snapshots);
    return f;
  }
  auto fit = stats::summarize(trend_.moments(), stats::Model::line);
  if (!fit) {
    f.reason = "no drift trend: " + fit.error().message;
    return f;
  }
  f.trend = trend_of(*fit, f.latest_time_s, options_.u_common);
  if (std::abs(f.trend->error_now) > mpe) {
    f.status = DueStatus::already_outside;
    f.reason = "the drift trend puts the error at " + detail::number_text(f.trend->error_now) +
               " at the latest snapshot, beyond the tolerance of +-" + detail::number_text(mpe) +
               ": the sensor is out of tolerance now";
    return f;
  }
  const double tc = t.critical_value(fit->dof);
  if (!(std::abs(fit->b1) > tc * fit->se_b1)) {
    f.status = DueStatus::no_significant_trend;
    f.reason = "no significant drift: slope " + detail::number_text(fit->b1 * seconds_per_day) + " +- " +
               detail::number_text(fit->se_b1 * seconds_per_day) + " per day, |slope| / u = " +
               detail::number_text(fit->se_b1 > 0 ? std::abs(fit->b1) / fit->se_b1 : 0.0) +
               " <= " + detail::number_text(tc) + " (t at " + detail::percent_text(t.confidence()) + ", " +
               detail::number_text(fit->dof) +
               " dof), so the crossing time is unbounded and no due date is given";
    return f;
  }
  f.status = DueStatus::due;
  f.crossing = crossing_of(*fit, fit->b1 > 0 ? mpe : -mpe, tc, options_.u_common, f.latest_time_s);
  f.reason = due_reason(f, *f.crossing, t.confidence());
  return f;
}

const char* to_string(DueStatus s) {
  switch (s) {
    case DueStatus::insufficient_data:
      return "insufficient data";
    case DueStatus::already_outside:
      return "already outside";
    case DueStatus::no_significant_trend:
      return "no significant trend";
    case DueStatus::due:
      break;
  }
  return "due";
}

}  // namespace rigcal::metrology
