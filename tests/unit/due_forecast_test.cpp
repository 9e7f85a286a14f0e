// Calibration-due forecast from the drift trend of a sensor's error: deterministic edge cases, the
// Fieller interval cross-checked against the inverse-prediction code, and Monte Carlo coverage of the
// true crossing time for a slowly ageing simulated sensor.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>
#include <vector>

#include "rigcal/metrology/due_forecast.hpp"
#include "rigcal/metrology/sensor_error.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::metrology;
using rigcal::stats::MemoryPolicy;
using rigcal::stats::Model;
using rigcal::stats::StreamingLineFit;
using rigcal::stats::TwoSidedT;

namespace {

// Built once: a TwoSidedT computes its exact table at construction (tens of milliseconds).
const TwoSidedT& t95() {
  static const TwoSidedT t(0.95);
  return t;
}

constexpr double day_s = 86400.0;
constexpr double t0_s = 1.7e9;  // a Unix-like origin, to exercise large time offsets

// Eight daily snapshots of e(t) = c0 + c1_per_day * day, with residuals r * (+ - - + + - - +), a pattern
// orthogonal to 1 and to the day number, so the weighted fit is exactly the line.
struct Snapshot {
  double time_s, error, u;
};
std::vector<Snapshot> exact_line(double c0, double c1_per_day, double r, double u) {
  const double pattern[] = {1, -1, -1, 1, 1, -1, -1, 1};
  std::vector<Snapshot> s;
  for (int day = 0; day < 8; ++day)
    s.push_back({t0_s + day * day_s, c0 + c1_per_day * day + r * pattern[day], u});
  return s;
}

DueForecastTracker tracker_with(const std::vector<Snapshot>& snaps, DueForecastOptions options = {}) {
  auto tracker = DueForecastTracker::create(options).value();
  for (const auto& s : snaps) REQUIRE(tracker.add(s.time_s, s.error, s.u).ok());
  return tracker;
}

}  // namespace

TEST_CASE("due forecast: a significant drift gives the crossing time and a bounded interval") {
  // e = 0.1 + 0.01 / day: reaches +0.5 at day 40.
  const auto snaps = exact_line(0.1, 0.01, 0.002, 0.002);
  const TwoSidedT& t = t95();
  const DueForecast f = tracker_with(snaps).forecast(0.5, t).value();
  REQUIRE(f.status == DueStatus::due);
  REQUIRE(f.trend);
  REQUIRE(f.crossing);
  CHECK(f.snapshots == 8);
  CHECK(f.latest_time_s == t0_s + 7 * day_s);
  CHECK(f.trend->slope_per_s * day_s == Approx(0.01).epsilon(1e-9));
  CHECK(f.trend->dof == 6);
  CHECK(f.trend->error_now == Approx(0.17).epsilon(1e-9));
  CHECK(f.crossing->limit == 0.5);
  CHECK(f.crossing->time_s == Approx(t0_s + 40 * day_s).epsilon(1e-12));
  CHECK(f.crossing->interval_s.contains(f.crossing->time_s));
  CHECK(f.crossing->due_by_s == f.crossing->interval_s.lo);
  CHECK(f.crossing->due_by_s > f.latest_time_s);
  CHECK_FALSE(f.crossing->may_have_crossed);
  CHECK(f.reason.find("+0.5") != std::string::npos);

  SECTION("the interval is Fieller's interval of the inverse prediction of the limit (no new reading)") {
    // The same trend fitted directly and inverted at y = 0.5 with m = infinity (the mean line itself):
    // stats::inverse_predict's Fieller interval, tested against the NIST e-Handbook linewidth data.
    StreamingLineFit fit(MemoryPolicy::cumulative(), true);
    for (const auto& s : snaps) fit.add(s.time_s, s.error, 1.0 / (s.u * s.u));
    const auto ip =
        rigcal::stats::inverse_predict(fit.summary(Model::line).value(), 0.5, INFINITY, t).value();
    REQUIRE(ip.fieller_bounded);
    CHECK(f.crossing->interval_s.lo == Approx(ip.fieller.lo).epsilon(1e-12));
    CHECK(f.crossing->interval_s.hi == Approx(ip.fieller.hi).epsilon(1e-12));
    CHECK(f.crossing->time_s == Approx(ip.x_hat).epsilon(1e-12));
  }
  SECTION("an uncertainty common to every snapshot widens the interval about the same estimate") {
    DueForecastOptions options;
    options.u_common = 0.01;
    const DueForecast w = tracker_with(snaps, options).forecast(0.5, t).value();
    REQUIRE(w.status == DueStatus::due);
    CHECK(w.crossing->time_s == f.crossing->time_s);
    CHECK(w.crossing->interval_s.lo < f.crossing->interval_s.lo);
    CHECK(w.crossing->interval_s.hi > f.crossing->interval_s.hi);
    CHECK(w.trend->u_error_now > f.trend->u_error_now);
  }
  SECTION("scaling every u_k by one factor changes nothing: s^2 is estimated from the residuals") {
    std::vector<Snapshot> scaled = snaps;
    for (auto& s : scaled) s.u *= 7.0;
    const DueForecast g = tracker_with(scaled).forecast(0.5, t).value();
    CHECK(g.crossing->interval_s.lo == Approx(f.crossing->interval_s.lo).epsilon(1e-12));
    CHECK(g.crossing->interval_s.hi == Approx(f.crossing->interval_s.hi).epsilon(1e-12));
  }
}

TEST_CASE("due forecast: drifting towards the other limit") {
  // The error is positive (+0.3) but falls by 0.01 / day: it leaves through -0.5 at day 80.
  const DueForecast f = tracker_with(exact_line(0.3, -0.01, 0.002, 0.002)).forecast(0.5, t95()).value();
  REQUIRE(f.status == DueStatus::due);
  CHECK(f.crossing->limit == -0.5);
  CHECK(f.crossing->time_s == Approx(t0_s + 80 * day_s).epsilon(1e-12));
  CHECK(f.reason.find("-0.5") != std::string::npos);
}

TEST_CASE("due forecast: no significant trend means no due date, and says why") {
  // Slope 0.0001 / day against residuals of 0.01: |slope| / u is far below t_0.975(6).
  const DueForecast f = tracker_with(exact_line(0.1, 0.0001, 0.01, 0.01)).forecast(0.5, t95()).value();
  CHECK(f.status == DueStatus::no_significant_trend);
  REQUIRE(f.trend);
  CHECK(std::abs(f.trend->slope_per_s) < 2.447 * f.trend->u_slope_per_s);
  CHECK_FALSE(f.crossing);
  CHECK(f.reason.find("no significant drift") != std::string::npos);
  CHECK(f.reason.find("unbounded") != std::string::npos);

  SECTION("a perfectly flat error has no trend either") {
    const DueForecast flat = tracker_with(exact_line(0.1, 0.0, 0.01, 0.01)).forecast(0.5, t95()).value();
    CHECK(flat.status == DueStatus::no_significant_trend);
  }
}

TEST_CASE("due forecast: already outside the tolerance") {
  const DueForecast f = tracker_with(exact_line(0.6, 0.001, 0.002, 0.002)).forecast(0.5, t95()).value();
  CHECK(f.status == DueStatus::already_outside);
  CHECK(f.trend->error_now > 0.5);
  CHECK_FALSE(f.crossing);
  CHECK(f.reason.find("out of tolerance now") != std::string::npos);
  // Outside and drifting back in is still outside now.
  const DueForecast back = tracker_with(exact_line(-0.7, 0.01, 0.002, 0.002)).forecast(0.5, t95()).value();
  CHECK(back.status == DueStatus::already_outside);
}

TEST_CASE("due forecast: a crossing interval reaching back before the latest snapshot is flagged") {
  // e = 0.1 + 0.055 / day is at 0.485 on day 7 and reaches 0.5 on day 7.27; the interval starts earlier.
  const DueForecast f = tracker_with(exact_line(0.1, 0.055, 0.01, 0.01)).forecast(0.5, t95()).value();
  REQUIRE(f.status == DueStatus::due);
  CHECK(f.crossing->due_by_s <= f.latest_time_s);
  CHECK(f.crossing->may_have_crossed);
  CHECK(f.reason.find("may already be reached") != std::string::npos);
}

TEST_CASE("due forecast: too few snapshots") {
  DueForecastOptions options;
  options.min_snapshots = 5;
  auto snaps = exact_line(0.1, 0.01, 0.002, 0.002);
  snaps.resize(4);
  const DueForecast f = tracker_with(snaps, options).forecast(0.5, t95()).value();
  CHECK(f.status == DueStatus::insufficient_data);
  CHECK(f.snapshots == 4);
  CHECK_FALSE(f.trend);
  CHECK_FALSE(f.crossing);
  CHECK(f.reason == "4 snapshots so far; a drift forecast needs at least 5");
}

TEST_CASE("due forecast: unusable input is an error and leaves the tracker unchanged") {
  CHECK_FALSE(DueForecastTracker::create({2, 0.0}).ok());
  CHECK_FALSE(DueForecastTracker::create({5, -0.1}).ok());
  auto tracker = DueForecastTracker::create({}).value();
  REQUIRE(tracker.add(t0_s, 0.1, 0.01).ok());
  CHECK_FALSE(tracker.add(t0_s + day_s, 0.1, 0.0).ok());
  CHECK_FALSE(tracker.add(t0_s + day_s, 0.1, 1e-200).ok());  // weight 1/u^2 overflows
  CHECK_FALSE(tracker.add(t0_s + day_s, NAN, 0.01).ok());
  CHECK_FALSE(tracker.add(INFINITY, 0.1, 0.01).ok());
  const auto earlier = tracker.add(t0_s, 0.1, 0.01);
  REQUIRE_FALSE(earlier.ok());
  CHECK(earlier.error().message.find("not later") != std::string::npos);
  CHECK(tracker.snapshots() == 1);
  CHECK_FALSE(tracker.forecast(0.0, t95()).ok());
  CHECK_FALSE(tracker.forecast(NAN, t95()).ok());
  tracker.reset();
  CHECK(tracker.snapshots() == 0);
  CHECK(tracker.add(t0_s - day_s, 0.1, 0.01).ok());  // after a reset any time is accepted
}

TEST_CASE("due forecast Monte Carlo: the 95 % interval brackets the true crossing of an ageing sensor") {
  // A sensor whose true error ages linearly, E(t) = 0.1 + 0.4 t / 60 days: it leaves +-0.5 at day 60.
  // Twelve snapshots, every 3 days over days 0..33 (an extrapolation of 27 days), each with noise of
  // standard deviation u_k (alternating 0.02 and 0.03) and, per replicate, one common offset
  // delta ~ N(0, 0.025) standing for the reference standard's error (passed as u_common). Ignoring
  // u_common here drops the coverage to about 88 %; with it the interval is slightly conservative
  // (about 97 %), since T keeps the trend's n - 2 dof.
  constexpr int replicates = 400;
  const double true_crossing_s = t0_s + 60 * day_s;
  const TwoSidedT& t = t95();
  std::mt19937_64 rng(20240611);
  std::normal_distribution<double> z(0.0, 1.0);
  DueForecastOptions options;
  options.u_common = 0.025;
  int due = 0, covered = 0, due_by_late = 0;
  for (int rep = 0; rep < replicates; ++rep) {
    auto tracker = DueForecastTracker::create(options).value();
    const double delta = options.u_common * z(rng);
    for (int k = 0; k < 12; ++k) {
      const double day = 3.0 * k;
      const double u = k % 2 ? 0.03 : 0.02;
      REQUIRE(tracker.add(t0_s + day * day_s, 0.1 + 0.4 * day / 60.0 + delta + u * z(rng), u).ok());
    }
    const DueForecast f = tracker.forecast(0.5, t).value();
    if (f.status != DueStatus::due) continue;
    ++due;
    if (f.crossing->interval_s.contains(true_crossing_s)) ++covered;
    if (f.crossing->due_by_s > true_crossing_s) ++due_by_late;
  }
  const double coverage = static_cast<double>(covered) / due;
  INFO("due " << due << " of " << replicates << ", coverage " << coverage << ", due-by late " << due_by_late);
  CHECK(due >= 0.98 * replicates);  // the drift is ~9 standard errors: nearly always significant
  // Nominal 95 %; binomial sd over 400 replicates is 1.1 %. Too wide an interval would fail the upper bound.
  CHECK(coverage >= 0.92);
  CHECK(coverage <= 0.985);
  // The due date is a one-sided 97.5 % bound: it should be later than the true crossing ~2.5 % of the time.
  CHECK(static_cast<double>(due_by_late) / due <= 0.05);
}

TEST_CASE("due forecast Monte Carlo end to end: daily fits of an ageing sensor, errors at the range end") {
  // The sensor's offset ages from 0.05 by 0.0075 / day, so its error (certificate y = x) reaches the MPE
  // of 0.5 at day 60. Every 3 days a fresh, non-overlapping window of 100 pairs (reference values
  // uniform over [0, 100], reading noise 0.2) is fitted; the error at the range's high end and its fit
  // uncertainty (sensor_error_at) is one snapshot. The u_k are estimated, not known.
  constexpr int replicates = 200;
  const double true_crossing_s = t0_s + 60 * day_s;
  const TwoSidedT& t = t95();
  const rigcal::stats::CertifiedLine certificate{0.0, 1.0, 0.0, 0.0, 0.0};
  std::mt19937_64 rng(77);
  std::normal_distribution<double> noise(0.0, 0.2);
  std::uniform_real_distribution<double> reference(0.0, 100.0);
  int due = 0, covered = 0;
  for (int rep = 0; rep < replicates; ++rep) {
    auto tracker = DueForecastTracker::create({}).value();
    for (int k = 0; k < 10; ++k) {
      const double day = 3.0 * k;
      const double offset = 0.05 + 0.0075 * day;
      StreamingLineFit window(MemoryPolicy::cumulative());
      for (int i = 0; i < 100; ++i) {
        const double x = reference(rng);
        window.add(x, offset + x + noise(rng));
      }
      const auto e = sensor_error_at(window.summary(Model::line).value(), certificate, {}, 100.0, t).value();
      REQUIRE(tracker.add(t0_s + day * day_s, e.error, e.u_fit).ok());
    }
    const DueForecast f = tracker.forecast(0.5, t).value();
    if (f.status != DueStatus::due) continue;
    ++due;
    if (f.crossing->interval_s.contains(true_crossing_s)) ++covered;
  }
  const double coverage = static_cast<double>(covered) / due;
  INFO("due " << due << " of " << replicates << ", coverage " << coverage);
  CHECK(due >= 0.9 * replicates);
  CHECK(coverage >= 0.90);
  CHECK(coverage <= 0.99);
}
