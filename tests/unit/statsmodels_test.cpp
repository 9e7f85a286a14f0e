// The streaming estimator against statsmodels OLS/WLS (Debian's python3-statsmodels), on random data
// sets that tests/reference/statsmodels_fits.py generates and fits at test time (see its docstring).
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>

#include "rigcal/stats/batch_fit.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;

namespace {
nlohmann::json load_reference() {
  const char* path = std::getenv("RIGCAL_STATSMODELS_JSON");
  REQUIRE(path != nullptr);
  std::ifstream in(path);
  REQUIRE(in.good());
  return nlohmann::json::parse(in);
}

void check_rel(double computed, double expected, const char* what) {
  INFO(what << ": rigcal " << computed << ", statsmodels " << expected);
  CHECK(std::abs(computed - expected) <= 1e-10 * std::max(std::abs(expected), 1e-300));
}

void check_interval(const Interval& computed, const nlohmann::json& expected, const char* what) {
  check_rel(computed.lo, expected[0].get<double>(), what);
  check_rel(computed.hi, expected[1].get<double>(), what);
}

// Intercept quantities: b0 = mean_y - b1 mean_x is ill-conditioned when the reference values sit far
// from zero, and statsmodels solves the raw (uncentred) design, so it determines b0 only to about
// 1e-16 |b1 mean_x|. Against it, intercept quantities are compared at that scale; against the
// extended-precision batch QR on centred data (batch_fit.hpp) they are compared to 1e-10 of themselves.
void check_at_scale(double computed, double expected, double scale, const char* what) {
  INFO(what << ": rigcal " << computed << ", statsmodels " << expected << ", scale " << scale);
  CHECK(std::abs(computed - expected) <= 1e-10 * std::max(std::abs(expected), scale));
}
}  // namespace

TEST_CASE("streaming OLS, WLS and through-origin fits equal statsmodels to 1e-10 relative") {
  const auto ref = load_reference();
  REQUIRE(ref["cases"].size() >= 20);
  const TwoSidedT t95(0.95);
  for (const auto& c : ref["cases"]) {
    INFO(c["name"].get<std::string>() << " (" << ref["generator"].get<std::string>() << ")");
    const auto x = c["x"].get<std::vector<double>>();
    const auto y = c["y"].get<std::vector<double>>();
    const auto w = c["w"].get<std::vector<double>>();
    const bool weighted = !w.empty();
    const Model model = c["intercept"].get<bool>() ? Model::line : Model::through_origin;
    StreamingLineFit fit(MemoryPolicy::cumulative(), weighted);
    for (std::size_t i = 0; i < x.size(); ++i) fit.add(x[i], y[i], weighted ? w[i] : 1.0);
    const LineFit f = fit.summary(model).value();

    CHECK(f.dof == c["dof"].get<double>());
    check_rel(f.b1, c["slope"], "slope");
    check_rel(f.se_b1, c["se_slope"], "se(slope)");
    check_rel(f.s, c["s"], "residual SD");
    check_rel(*f.r2, c["r2"], "R^2");
    check_rel(f.ssr, c["ssr"], "SSR");
    const CoefficientIntervals ci = coefficient_intervals(f, t95);
    check_interval(ci.b1, c["ci_slope"], "95 % interval of the slope");
    const double x_new = c["x_new"];
    check_interval(confidence_interval_at(f, x_new, t95), c["mean_ci_at_x_new"], "confidence interval of the mean");
    check_interval(prediction_interval_at(f, x_new, t95), c["obs_ci_at_x_new"], "prediction interval");
    if (model == Model::line) {
      const double scale = std::abs(f.b1 * f.mean_x);
      check_at_scale(f.b0, c["intercept_value"], scale, "intercept");
      check_rel(f.se_b0, c["se_intercept"], "se(intercept)");
      check_rel(f.cov_b0_b1, c["cov_intercept_slope"], "cov(intercept, slope)");
      check_at_scale(ci.b0.lo, c["ci_intercept"][0], scale, "95 % interval of the intercept (low)");
      check_at_scale(ci.b0.hi, c["ci_intercept"][1], scale, "95 % interval of the intercept (high)");
      const LineFit batch = batch_fit(x, y, w, model).value();
      check_rel(f.b0, batch.b0, "intercept against extended-precision batch QR");
      if (c.contains("joint_f")) {
        const auto cert = c["certified"].get<std::vector<double>>();
        const auto v = judge_against_certificate(f, CertifiedLine{cert[0], cert[1]}, t95, false);
        check_rel(v.joint_statistic, c["joint_f"], "joint F statistic (statsmodels f_test)");
      }
    }
  }
}
