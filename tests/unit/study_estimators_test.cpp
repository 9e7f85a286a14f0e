// The run-length study's estimators, matching rules and table formatting.
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "calibration.hpp"
#include "report.hpp"
#include "run_length_stats.hpp"

using namespace rigcal::study;

TEST_CASE("uncensored run lengths give the sample mean and its standard error") {
  const std::vector<RunLength> runs{{10, true}, {20, true}, {30, true}, {40, true}};
  const ArlEstimate e = estimate_arl(runs);
  CHECK(e.arl == 25);
  CHECK(e.standard_error == Approx(std::sqrt(500.0 / 3 / 4)));
  CHECK(e.censored == 0);
}

TEST_CASE("censored geometric run lengths: the maximum-likelihood ARL recovers the true mean") {
  // Geometric run lengths of mean 1000 censored at 1500 (about 22 % censored).
  std::mt19937_64 rng(3);
  std::geometric_distribution<std::uint64_t> g(1.0 / 1000);
  std::vector<RunLength> runs;
  for (int i = 0; i < 4000; ++i) {
    const std::uint64_t t = g(rng) + 1;
    runs.push_back(t <= 1500 ? RunLength{t, true} : RunLength{1500, false});
  }
  const ArlEstimate e = estimate_arl(runs);
  INFO("estimate " << e.arl << " +- " << e.standard_error << ", censored " << e.censored);
  CHECK(e.censored > 700);
  CHECK(std::abs(e.arl - 1000) < 3 * e.standard_error);
  // The naive mean of the censored data is biased low, well outside that band.
  double naive = 0;
  for (const auto& r : runs) naive += static_cast<double>(r.pairs) / static_cast<double>(runs.size());
  CHECK(naive < 1000 - 5 * e.standard_error);
}

TEST_CASE("no alarm at all gives an infinite ARL and a Poisson lower bound") {
  const ArlEstimate e = estimate_arl({{300, false}, {300, false}});
  CHECK(std::isinf(e.arl));
  CHECK(e.lower_bound_95 == Approx(200));
}

TEST_CASE("alarm fraction by a horizon and delays with censoring") {
  const std::vector<RunLength> runs{{5, true}, {50, true}, {500, false}, {7, true}};
  const Proportion p = alarm_fraction_by(runs, 10);
  CHECK(p.p == 0.5);
  const DelayEstimate d = estimate_delay(runs, 2);
  CHECK(d.censored == 1);
  CHECK(d.false_alerts == 2);
  CHECK(d.median == Approx(28.5));
  CHECK(format_delay(d).rfind("≥ ", 0) == 0);
}

TEST_CASE("the matched persistence interpolates log ARL0 and rounds up") {
  auto point = [](int r, double arl) {
    PersistencePoint p;
    p.raise_after = r;
    p.arl0.arl = arl;
    return p;
  };
  const std::vector<PersistencePoint> curve{point(50, 500), point(100, 1000), point(200, 4000)};
  CHECK(matching_persistence(curve, 2000, 5) == 150);
  CHECK(matching_persistence(curve, 2100, 5) == 155);
  CHECK(matching_persistence(curve, 400, 5) == 50);
  CHECK(matching_persistence(curve, 5000, 5) == 0);
}

TEST_CASE("the matched alpha interpolates the false-alert probability in log alpha") {
  auto point = [](double alpha, double p) {
    AlphaPoint a;
    a.alpha = alpha;
    a.false_alert_by_horizon.p = p;
    return a;
  };
  const std::vector<AlphaPoint> curve{point(0.1, 0.1), point(0.4, 0.3), point(0.8, 0.7)};
  CHECK(matching_alpha(curve, 0.2) == Approx(0.2));
  CHECK(matching_alpha(curve, 0.7) == Approx(0.8));
  CHECK(matching_alpha(curve, 0.9) == 0);
}

TEST_CASE("table cells show the estimate to the precision of its standard error") {
  CHECK(format_estimate(20310.4, 640.2) == "20310 ± 640");
  CHECK(format_estimate(123.44, 4.2) == "123.4 ± 4.2");
  CHECK(format_estimate(5.3234, 0.041) == "5.32 ± 0.04");
  CHECK(format_estimate(42, 0) == "42.0");
  ArlEstimate none;
  none.runs = 5;
  none.lower_bound_95 = 1.5e5;
  CHECK(format_arl(none) == "> 1.5e+05 (no alert in 5 runs)");
}
