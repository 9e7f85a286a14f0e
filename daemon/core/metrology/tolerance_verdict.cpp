#include "rigcal/metrology/tolerance_verdict.hpp"

#include <algorithm>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <limits>
#include <utility>

#include "number_text.hpp"

namespace rigcal::metrology {

namespace {

using Candidate = std::pair<double, PointOrigin>;

// P(T > z) for Student t with floor(nu) dof, as TwoSidedT truncates it for k; normal at infinity.
double upper_tail(double z, double nu) {
  if (std::isinf(nu))
    return boost::math::cdf(boost::math::complement(boost::math::normal_distribution<double>(), z));
  return boost::math::cdf(
      boost::math::complement(boost::math::students_t_distribution<double>(std::floor(nu)), z));
}

double probability_beyond(double e, double u, double dof, double mpe) {
  if (u == 0) return std::abs(e) > mpe ? 1.0 : 0.0;
  return upper_tail((mpe - e) / u, dof) + upper_tail((mpe + e) / u, dof);
}

int severity(PointStatement s) { return static_cast<int>(s); }

PointStatement statement_for(DecisionRule rule, double abs_e, double mpe, double w) {
  if (rule == DecisionRule::simple_acceptance)
    return abs_e <= mpe ? PointStatement::pass : PointStatement::fail;
  if (abs_e + w <= mpe) return PointStatement::pass;
  if (abs_e - w > mpe) return PointStatement::fail;
  return abs_e <= mpe ? PointStatement::conditional_pass : PointStatement::conditional_fail;
}

Status check_options(const VerdictOptions& options, const SensorRange& range) {
  if (options.guard_band && !(std::isfinite(*options.guard_band) && *options.guard_band >= 0)) {
    return Error{"tolerance verdict: guard band must be a finite number >= 0, got " +
                 detail::number_text(*options.guard_band)};
  }
  for (double x : options.extra_points) {
    if (!(std::isfinite(x) && range.contains(x))) {
      return Error{"tolerance verdict: check point " + detail::number_text(x) +
                   " is outside the sensor range [" + detail::number_text(range.lo) + ", " +
                   detail::number_text(range.hi) + "]"};
    }
  }
  return ok_status();
}

// Stationary points of |e(x)| - MPE(x) - k u(x) inside the range, one per sign of e and of x (see the
// header). With d = x - c and u^2 = A + B d^2, the derivative of gamma x - k u vanishes where
// gamma u = k B d, i.e. d = gamma sqrt(A) / sqrt(B (k^2 B - gamma^2)), which exists if k^2 B > gamma^2.
std::vector<double> guard_band_extrema(const stats::LineFit& fit, const stats::CertifiedLine& cert,
                                       double u_reference, const MaximumPermissibleError& mpe,
                                       const SensorRange& range, double k) {
  const bool line = fit.model == stats::Model::line;
  const double centre = line ? fit.mean_x : 0.0;
  const double s_over_b2 = (fit.s / cert.slope) * (fit.s / cert.slope);
  const double a = s_over_b2 * (line ? 1.0 / fit.sum_w : 0.0) + u_reference * u_reference;
  const double b = s_over_b2 / fit.sxx;
  const double e_slope = fit.b1 / cert.slope - 1.0;
  const double reading_slope = mpe.percent_of_reading / 100.0;
  auto error_at = [&](double x) { return (fit.predict(x) - cert.intercept) / cert.slope - x; };
  std::vector<double> out;
  if (!(b > 0 && std::isfinite(k))) return out;
  for (double sign_e : {1.0, -1.0}) {
    for (double sign_x : {1.0, -1.0}) {
      if (reading_slope == 0 && sign_x < 0) continue;  // MPE flat: one pass suffices
      const double gamma = sign_e * e_slope - sign_x * reading_slope;
      const double room = k * k * b - gamma * gamma;
      if (!(room > 0)) continue;
      const double x = centre + gamma * std::sqrt(a) / std::sqrt(b * room);
      if (!(range.lo < x && x < range.hi)) continue;
      if (error_at(x) * sign_e <= 0) continue;
      if (reading_slope > 0 && x * sign_x < 0) continue;
      out.push_back(x);
    }
  }
  return out;
}

std::string rule_description(DecisionRule rule, const std::optional<double>& fixed_w, double coverage) {
  if (rule == DecisionRule::simple_acceptance) {
    return "Simple acceptance (ILAC-G8:09/2019 4.2.1, guard band w = 0): each checked point passes if the "
           "sensor's error is within the maximum permissible error (|e| <= MPE) and fails otherwise. The "
           "uncertainty of the error is not used, so a sensor whose error lies at the limit is passed "
           "with up to 50 % probability that its true error is beyond it.";
  }
  std::string band = fixed_w ? "w = " + detail::number_text(*fixed_w) + " (fixed)"
                             : "w = U_e, the expanded uncertainty of the error at " +
                                   detail::percent_text(coverage) + " coverage";
  std::string risk = fixed_w
                         ? "With a fixed w the probability that a passed point's true error is beyond the "
                           "limit depends on w / u_e at that point (see its probability beyond the limit)."
                         : "A passed point has at most " + detail::percent_text(0.5 * (1.0 - coverage)) +
                               " probability that its true error is beyond the limit.";
  return "Guarded acceptance (ILAC-G8:09/2019 4.2.3, guard band " + band +
         "): each checked point passes if |e| + w <= MPE, fails if |e| - w > MPE, and is otherwise "
         "indeterminate (a conditional pass within the limit, a conditional fail beyond it). " +
         risk;
}

std::vector<Candidate> candidate_points(const stats::LineFit& fit, const stats::CertifiedLine& cert,
                                        const ReferenceStandardUncertainty& reference,
                                        const MaximumPermissibleError& mpe, const SensorRange& range,
                                        const VerdictOptions& options, const stats::TwoSidedT& t) {
  std::vector<Candidate> c{{range.lo, PointOrigin::range_low}, {range.hi, PointOrigin::range_high}};
  if (range.lo < 0 && 0 < range.hi && mpe.percent_of_reading > 0)
    c.emplace_back(0.0, PointOrigin::zero_reading);
  if (options.rule == DecisionRule::guarded_acceptance && !options.guard_band) {
    const double centre = std::clamp(fit.model == stats::Model::line ? fit.mean_x : 0.0, range.lo, range.hi);
    if (auto at_centre = sensor_error_at(fit, cert, reference, centre, t)) {
      for (double x : guard_band_extrema(fit, cert, at_centre->u_reference, mpe, range, at_centre->k))
        c.emplace_back(x, PointOrigin::guard_band_extremum);
    }
  }
  for (double x : options.extra_points) c.emplace_back(x, PointOrigin::requested);
  // The same x twice (a requested end of the range, say) is checked once, under its first origin.
  std::vector<Candidate> unique;
  for (const auto& cand : c) {
    const bool seen =
        std::any_of(unique.begin(), unique.end(), [&](const Candidate& u) { return u.first == cand.first; });
    if (!seen) unique.push_back(cand);
  }
  return unique;
}

PointCheck check_point(const SensorError& e, PointOrigin origin, double mpe, const VerdictOptions& options) {
  PointCheck p;
  p.origin = origin;
  p.error = e;
  p.mpe = mpe;
  if (options.rule == DecisionRule::guarded_acceptance)
    p.guard_band = options.guard_band.value_or(e.expanded);
  p.margin = mpe - std::abs(e.error);
  p.probability_beyond_limit =
      options.explain ? probability_beyond(e.error, e.u, e.dof, mpe) : std::numeric_limits<double>::quiet_NaN();
  p.statement = statement_for(options.rule, std::abs(e.error), mpe, p.guard_band);
  return p;
}

bool worse(const PointCheck& a, const PointCheck& b) {
  if (severity(a.statement) != severity(b.statement)) return severity(a.statement) > severity(b.statement);
  return a.margin - a.guard_band < b.margin - b.guard_band;
}

Verdict verdict_of(PointStatement worst) {
  switch (worst) {
    case PointStatement::pass:
      return Verdict::pass;
    case PointStatement::conditional_pass:
    case PointStatement::conditional_fail:
      return Verdict::indeterminate;
    case PointStatement::fail:
      break;
  }
  return Verdict::fail;
}

}  // namespace

Result<ToleranceVerdict> judge_tolerance(const stats::LineFit& fit, const stats::CertifiedLine& certificate,
                                         const ReferenceStandardUncertainty& reference,
                                         const MaximumPermissibleError& mpe, const SensorRange& range,
                                         const VerdictOptions& options, const stats::TwoSidedT& t) {
  if (auto s = check_tolerance(mpe, range); !s) return Error{"tolerance verdict: " + s.error().message};
  if (auto s = check_options(options, range); !s) return s.error();

  ToleranceVerdict v;
  v.rule = options.rule;
  v.rule_name = options.rule == DecisionRule::simple_acceptance ? "simple acceptance" : "guarded acceptance";
  if (options.explain) v.rule_description = rule_description(options.rule, options.guard_band, t.confidence());
  for (const auto& [x, origin] : candidate_points(fit, certificate, reference, mpe, range, options, t)) {
    auto e = sensor_error_at(fit, certificate, reference, x, t);
    if (!e) return Error{"tolerance verdict: " + e.error().message};
    v.points.push_back(check_point(*e, origin, mpe_at(mpe, range, x), options));
  }
  v.worst = *std::max_element(v.points.begin(), v.points.end(),
                              [](const PointCheck& a, const PointCheck& b) { return worse(b, a); });
  v.verdict = verdict_of(v.worst.statement);
  return v;
}

const char* to_string(Verdict v) {
  switch (v) {
    case Verdict::pass:
      return "pass";
    case Verdict::indeterminate:
      return "indeterminate";
    case Verdict::fail:
      break;
  }
  return "fail";
}

const char* to_string(PointStatement s) {
  switch (s) {
    case PointStatement::pass:
      return "pass";
    case PointStatement::conditional_pass:
      return "conditional pass";
    case PointStatement::conditional_fail:
      return "conditional fail";
    case PointStatement::fail:
      break;
  }
  return "fail";
}

}  // namespace rigcal::metrology
