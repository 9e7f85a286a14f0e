// Tolerance verdicts under the decision rules of ILAC-G8:09/2019 4.2 (as ISO/IEC 17025:2017 7.8.6
// requires a stated rule), checked on hand-built cases at and around the limits.
#include <catch2/catch.hpp>
#include <cmath>

#include "../support/reference_data.hpp"
#include "rigcal/metrology/tolerance_verdict.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::metrology;
using rigcal::stats::CertifiedLine;
using rigcal::stats::LineFit;
using rigcal::stats::MemoryPolicy;
using rigcal::stats::Model;
using rigcal::stats::StreamingLineFit;
using rigcal::stats::TwoSidedT;
using rigcal::test::printed_t_critical;

namespace {

// Built once: a TwoSidedT computes its exact table at construction (tens of milliseconds).
const TwoSidedT& t95() {
  static const TwoSidedT t(0.95);
  return t;
}

// Five pairs at each of x = lo and x = hi on y = b0 + b1 x, residuals {r, -r, r, -r, 0} cancelling in
// each group: the fit is exactly the line, s = r, n = 10, dof = 8, mean_x = (lo + hi) / 2,
// leverage(lo) = leverage(hi) = 1/10 + 1/10 = 0.2, leverage(mid) = 0.1.
LineFit two_group_fit(double lo, double hi, double b0, double b1, double r) {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  const double residual[] = {r, -r, r, -r, 0.0};
  for (double x : {lo, hi})
    for (double e : residual) fit.add(x, b0 + b1 * x + e);
  return fit.summary(Model::line).value();
}

// A sensor reading the reference plus a constant offset, certificate y = x: e(x) = offset everywhere.
LineFit offset_fit(double offset) { return two_group_fit(0.0, 100.0, offset, 1.0, 0.1); }

const CertifiedLine identity{0.0, 1.0, 0.0, 0.0, 0.0};
const SensorRange range_0_100{0.0, 100.0};
const MaximumPermissibleError half_unit{0.5, 0.0, 0.0};

// Standard normal upper tail, independent of the library's Boost-based one.
double normal_upper_tail(double z) { return 0.5 * std::erfc(z / std::sqrt(2.0)); }

ToleranceVerdict judge(const LineFit& fit, DecisionRule rule, const MaximumPermissibleError& mpe = half_unit,
                       const ReferenceStandardUncertainty& ref = {}) {
  VerdictOptions options;
  options.rule = rule;
  return judge_tolerance(fit, identity, ref, mpe, range_0_100, options, t95()).value();
}

}  // namespace

TEST_CASE("maximum permissible error adds absolute, percent-of-reading and percent-of-span terms") {
  const MaximumPermissibleError mpe{0.1, 0.5, 0.25};
  const SensorRange range{-50.0, 150.0};  // span 200
  REQUIRE(check_tolerance(mpe, range).ok());
  CHECK(mpe_at(mpe, range, 0.0) == Approx(0.1 + 0.5));           // 0.25 % of 200
  CHECK(mpe_at(mpe, range, 150.0) == Approx(0.1 + 0.75 + 0.5));  // 0.5 % of 150
  CHECK(mpe_at(mpe, range, -50.0) == Approx(0.1 + 0.25 + 0.5));  // |x|
  CHECK_FALSE(check_tolerance({0, 0, 0}, range).ok());
  CHECK_FALSE(check_tolerance({-0.1, 0, 0}, range).ok());
  CHECK_FALSE(check_tolerance(mpe, {10, 10}).ok());
  CHECK_FALSE(check_tolerance(mpe, {0, INFINITY}).ok());
}

TEST_CASE("sensor error through the certificate line, with the fit's and the reference's uncertainty") {
  // Certificate y = 1 + 2 x; the sensor now reads y = 1 + 2.02 x, so e(x) = 2.02 x / 2 - x = 0.01 x.
  const LineFit fit = two_group_fit(0.0, 100.0, 1.0, 2.02, 0.1);
  const CertifiedLine cert{1.0, 2.0, 0.0, 0.0, 0.0};
  const TwoSidedT& t = t95();
  const auto at_hi = sensor_error_at(fit, cert, {}, 100.0, t).value();
  CHECK(at_hi.error == Approx(1.0).epsilon(1e-12));
  CHECK(sensor_error_at(fit, cert, {}, 0.0, t).value().error == Approx(0.0).margin(1e-12));
  // u_fit = s sqrt(leverage) / |b1*| = 0.1 sqrt(0.2) / 2; alone it carries the fit's 8 dof.
  CHECK(at_hi.u_fit == Approx(0.1 * std::sqrt(0.2) / 2.0).epsilon(1e-12));
  CHECK(at_hi.dof == Approx(8.0));
  CHECK(std::abs(at_hi.k - printed_t_critical(8, 0.975)) <= 0.0005);

  // Reference standard u = 0.05 (infinite dof) enters with |b1 / b1*| = 1.01.
  const auto with_ref = sensor_error_at(fit, cert, {0.05, INFINITY}, 100.0, t).value();
  CHECK(with_ref.u_reference == Approx(1.01 * 0.05).epsilon(1e-12));
  const double u2 = at_hi.u_fit * at_hi.u_fit + 0.0505 * 0.0505;
  CHECK(with_ref.u == Approx(std::sqrt(u2)).epsilon(1e-12));
  CHECK(with_ref.dof == Approx(u2 * u2 / (std::pow(at_hi.u_fit, 4) / 8.0)).epsilon(1e-12));  // GUM G.2b
  CHECK(with_ref.expanded == Approx(with_ref.k * with_ref.u));

  CHECK_FALSE(sensor_error_at(fit, {1.0, 0.0, 0, 0, 0}, {}, 50.0, t).ok());
  CHECK_FALSE(sensor_error_at(fit, cert, {}, NAN, t).ok());
}

TEST_CASE("simple acceptance (ILAC-G8 4.2.1): pass iff |e| <= MPE, with up to 50 % risk at the limit") {
  SECTION("inside, on and beyond the limit") {
    CHECK(judge(offset_fit(0.49), DecisionRule::simple_acceptance).verdict == Verdict::pass);
    CHECK(judge(offset_fit(-0.49), DecisionRule::simple_acceptance).verdict == Verdict::pass);
    CHECK(judge(offset_fit(0.5), DecisionRule::simple_acceptance).verdict == Verdict::pass);  // inclusive
    CHECK(judge(offset_fit(0.51), DecisionRule::simple_acceptance).verdict == Verdict::fail);
    CHECK(judge(offset_fit(-0.51), DecisionRule::simple_acceptance).verdict == Verdict::fail);
  }
  SECTION("a sensor exactly on the limit passes with a 50 % chance that its true error is beyond it") {
    const ToleranceVerdict v = judge(offset_fit(0.5), DecisionRule::simple_acceptance);
    REQUIRE(v.verdict == Verdict::pass);
    CHECK(v.worst.margin == Approx(0.0).margin(1e-12));
    CHECK(v.worst.guard_band == 0);
    // P(E > MPE) = P(T > 0) = 1/2 for the symmetric t; the far limit adds P(T > 1 / u) ~ 1e-8.
    CHECK(v.worst.probability_beyond_limit == Approx(0.5).margin(1e-6));
    CHECK(v.rule_name == "simple acceptance");
    CHECK(v.rule_description.find("50 %") != std::string::npos);
    CHECK(v.rule_description.find("ILAC-G8:09/2019 4.2.1") != std::string::npos);
  }
  SECTION("just inside the limit the simple rule passes what the guarded rule does not") {
    const LineFit fit = offset_fit(0.48);
    CHECK(judge(fit, DecisionRule::simple_acceptance).verdict == Verdict::pass);
    CHECK(judge(fit, DecisionRule::guarded_acceptance).verdict == Verdict::indeterminate);
    CHECK(judge(fit, DecisionRule::simple_acceptance).worst.probability_beyond_limit > 0.3);
  }
}

TEST_CASE("guarded acceptance (ILAC-G8 4.2.3): pass iff |e| + U_e <= MPE, fail iff |e| - U_e > MPE") {
  // U_e at the ends = t_0.975(8) * 0.1 * sqrt(0.2) = 2.306 * 0.04472 = 0.1031; at mid-range
  // t_0.975(8) * 0.1 * sqrt(0.1) = 0.0729.
  const double u_end = 2.306004 * 0.1 * std::sqrt(0.2);
  const double u_mid = 2.306004 * 0.1 * std::sqrt(0.1);
  SECTION("the expanded uncertainty at the ends is the hand value") {
    const ToleranceVerdict v = judge(offset_fit(0.0), DecisionRule::guarded_acceptance);
    CHECK(v.points.at(0).error.x == 0.0);
    CHECK(v.points.at(0).guard_band == Approx(u_end).epsilon(1e-6));
    CHECK(v.points.at(1).error.x == 100.0);
    CHECK(v.points.at(1).error.expanded == Approx(u_end).epsilon(1e-6));
  }
  SECTION("|e| + U_e just inside MPE: pass") {
    const ToleranceVerdict v = judge(offset_fit(0.5 - u_end - 0.002), DecisionRule::guarded_acceptance);
    CHECK(v.verdict == Verdict::pass);
    for (const auto& p : v.points) CHECK(p.statement == PointStatement::pass);
  }
  SECTION("|e| + U_e just beyond MPE, |e| within: indeterminate, a conditional pass") {
    const ToleranceVerdict v = judge(offset_fit(0.5 - u_end + 0.002), DecisionRule::guarded_acceptance);
    CHECK(v.verdict == Verdict::indeterminate);
    CHECK(v.worst.statement == PointStatement::conditional_pass);
    CHECK((v.worst.origin == PointOrigin::range_low || v.worst.origin == PointOrigin::range_high));
  }
  SECTION("|e| beyond MPE but |e| - U_e within everywhere: indeterminate, a conditional fail") {
    const ToleranceVerdict v = judge(offset_fit(0.5 + u_mid - 0.002), DecisionRule::guarded_acceptance);
    CHECK(v.verdict == Verdict::indeterminate);
    CHECK(v.worst.statement == PointStatement::conditional_fail);
  }
  SECTION("|e| - U_e beyond MPE only at mid-range, where U_e is smallest: fail, worst point inside") {
    const ToleranceVerdict v = judge(offset_fit(0.5 + u_mid + 0.002), DecisionRule::guarded_acceptance);
    CHECK(v.points.at(0).statement == PointStatement::conditional_fail);  // the ends alone: indeterminate
    CHECK(v.points.at(1).statement == PointStatement::conditional_fail);
    CHECK(v.verdict == Verdict::fail);
    CHECK(v.worst.origin == PointOrigin::guard_band_extremum);
    CHECK(v.worst.error.x == Approx(50.0).epsilon(1e-9));  // e is constant: the minimum of U_e
    CHECK(v.worst.guard_band == Approx(u_mid).epsilon(1e-6));
  }
  SECTION("|e| - U_e beyond MPE at the ends too: fail") {
    const ToleranceVerdict v = judge(offset_fit(-(0.5 + u_end + 0.002)), DecisionRule::guarded_acceptance);
    CHECK(v.verdict == Verdict::fail);
    CHECK(v.points.at(0).statement == PointStatement::fail);
    CHECK(v.worst.margin == Approx(0.5 - (0.5 + u_end + 0.002)).epsilon(1e-9));
  }
  SECTION("the rule is stated in words with its guard band and risk") {
    const ToleranceVerdict v = judge(offset_fit(0.0), DecisionRule::guarded_acceptance);
    CHECK(v.rule_name == "guarded acceptance");
    CHECK(v.rule_description.find("w = U_e") != std::string::npos);
    CHECK(v.rule_description.find("95 % coverage") != std::string::npos);
    CHECK(v.rule_description.find("2.5 %") != std::string::npos);
  }
}

TEST_CASE("guarded acceptance: the interior point added for the fail test maximises |e| - U_e - MPE") {
  // e(x) = 0.45 + 0.001 x rises across the range while U_e is smallest at x = 50: the guarded fail
  // margin |e| - U_e - MPE peaks inside, near x = 97 (closed form in tolerance_verdict.cpp).
  const LineFit fit = two_group_fit(0.0, 100.0, 0.45, 1.001, 0.1);
  const TwoSidedT& t = t95();
  const ToleranceVerdict v = judge(fit, DecisionRule::guarded_acceptance);
  const PointCheck* extremum = nullptr;
  for (const auto& p : v.points)
    if (p.origin == PointOrigin::guard_band_extremum) extremum = &p;
  REQUIRE(extremum != nullptr);
  auto fail_margin = [&](double x) {
    const SensorError e = sensor_error_at(fit, identity, {}, x, t).value();
    return std::abs(e.error) - e.expanded - 0.5;
  };
  const double x = extremum->error.x;
  CHECK(x > 90.0);
  CHECK(x < 100.0);
  CHECK(fail_margin(x) >= fail_margin(x - 0.5));
  CHECK(fail_margin(x) >= fail_margin(x + 0.5));
  CHECK(fail_margin(x) > fail_margin(100.0));
  CHECK(fail_margin(x) > fail_margin(0.0));
}

TEST_CASE("guarded acceptance with w = U: a pass at the acceptance limit has 2.5 % false-accept risk") {
  // ILAC-G8 4.2.2/4.2.3 with w = U at 95 %. The reference standard dominates u (infinite dof) so that
  // nu_eff ~ 2e6 and the Student t is the normal distribution to 1e-6: the risk must equal the normal
  // upper tail at k, Phi(-1.96) = 0.025.
  const LineFit fit = two_group_fit(0.0, 100.0, 0.3, 1.0, 0.01);
  const ReferenceStandardUncertainty ref{0.1, INFINITY};
  const TwoSidedT& t = t95();
  const SensorError at_end = sensor_error_at(fit, identity, ref, 100.0, t).value();
  REQUIRE(at_end.dof > 1e6);
  const MaximumPermissibleError at_limit{std::abs(at_end.error) + at_end.expanded, 0, 0};
  VerdictOptions options;
  const ToleranceVerdict v = judge_tolerance(fit, identity, ref, at_limit, range_0_100, options, t).value();
  CHECK(v.verdict == Verdict::pass);
  const PointCheck& end = v.points.at(1);
  REQUIRE(end.error.x == 100.0);
  CHECK(end.margin - end.guard_band == Approx(0.0).margin(1e-12));  // exactly at the acceptance limit
  CHECK(end.probability_beyond_limit == Approx(normal_upper_tail(at_end.k)).margin(1e-6));
  CHECK(end.probability_beyond_limit == Approx(0.025).margin(1e-5));
  // Under simple acceptance the same sensor at the tolerance limit itself: P = 1/2.
  const MaximumPermissibleError at_error{std::abs(at_end.error), 0, 0};
  options.rule = DecisionRule::simple_acceptance;
  const ToleranceVerdict s = judge_tolerance(fit, identity, ref, at_error, range_0_100, options, t).value();
  CHECK(s.verdict == Verdict::pass);
  CHECK(s.points.at(1).probability_beyond_limit ==
        Approx(0.5 + normal_upper_tail(2 * at_end.error / at_end.u)).margin(1e-6));
}

TEST_CASE("percent-of-reading tolerance is checked at zero reading, where it is tightest") {
  // Range [-100, 100], MPE = 0.1 + 1 % of reading, constant error 0.3: within at the ends (MPE 1.1),
  // beyond at x = 0 (MPE 0.1). Checking the ends alone would pass this sensor.
  const LineFit fit = two_group_fit(-100.0, 100.0, 0.3, 1.0, 0.1);
  const MaximumPermissibleError mpe{0.1, 1.0, 0.0};
  VerdictOptions options;
  options.rule = DecisionRule::simple_acceptance;
  const ToleranceVerdict v = judge_tolerance(fit, identity, {}, mpe, {-100.0, 100.0}, options, t95()).value();
  REQUIRE(v.points.size() == 3);
  CHECK(v.points[0].statement == PointStatement::pass);
  CHECK(v.points[1].statement == PointStatement::pass);
  CHECK(v.points[2].origin == PointOrigin::zero_reading);
  CHECK(v.verdict == Verdict::fail);
  CHECK(v.worst.error.x == 0.0);
  CHECK(v.worst.mpe == Approx(0.1));
}

TEST_CASE("a fixed guard band and requested check points") {
  const LineFit fit = offset_fit(0.42);
  VerdictOptions options;
  options.guard_band = 0.05;
  options.extra_points = {25.0, 100.0};
  const ToleranceVerdict v =
      judge_tolerance(fit, identity, {}, half_unit, range_0_100, options, t95()).value();
  CHECK(v.verdict == Verdict::pass);  // 0.42 + 0.05 <= 0.5, though 0.42 + U_e would not be
  REQUIRE(v.points.size() == 3);      // lo, hi, 25 (100 is the range's high end already)
  CHECK(v.points[2].origin == PointOrigin::requested);
  CHECK(v.points[2].error.x == 25.0);
  for (const auto& p : v.points) CHECK(p.guard_band == 0.05);
  CHECK(v.rule_description.find("(fixed)") != std::string::npos);
}

TEST_CASE("tolerance verdict: unusable input is an error") {
  const LineFit fit = offset_fit(0.1);
  const TwoSidedT& t = t95();
  VerdictOptions options;
  CHECK_FALSE(judge_tolerance(fit, identity, {}, {0, 0, 0}, range_0_100, options, t).ok());
  CHECK_FALSE(judge_tolerance(fit, identity, {}, half_unit, {100, 0}, options, t).ok());
  CHECK_FALSE(judge_tolerance(fit, {0, 0, 0, 0, 0}, {}, half_unit, range_0_100, options, t).ok());
  CHECK_FALSE(judge_tolerance(fit, identity, {-0.1, INFINITY}, half_unit, range_0_100, options, t).ok());
  options.extra_points = {150.0};
  const auto outside = judge_tolerance(fit, identity, {}, half_unit, range_0_100, options, t);
  REQUIRE_FALSE(outside.ok());
  CHECK(outside.error().message.find("outside the sensor range") != std::string::npos);
  options.extra_points.clear();
  options.guard_band = -0.01;
  CHECK_FALSE(judge_tolerance(fit, identity, {}, half_unit, range_0_100, options, t).ok());
}
