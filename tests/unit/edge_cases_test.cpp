// Degenerate inputs give clear errors or well-defined, NaN-free results.
#include <catch2/catch.hpp>
#include <cmath>

#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;

namespace {
bool finite(const LineFit& f) {
  return std::isfinite(f.b0) && std::isfinite(f.b1) && std::isfinite(f.s) && std::isfinite(f.se_b0) &&
         std::isfinite(f.se_b1) && std::isfinite(f.cov_b0_b1) && std::isfinite(f.corr_b0_b1);
}
}  // namespace

TEST_CASE("fewer than three pairs is an error for the line, fewer than two through the origin") {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  CHECK_FALSE(fit.summary(Model::line).ok());
  fit.add(1, 2);
  CHECK_FALSE(fit.summary(Model::through_origin).ok());
  fit.add(2, 4.1);
  CHECK(fit.summary(Model::through_origin).ok());
  auto r = fit.summary(Model::line);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().message.find("too few pairs") != std::string::npos);
  fit.add(3, 5.9);
  CHECK(fit.summary(Model::line).ok());
}

TEST_CASE("all reference values equal is an error naming the cause") {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (int i = 0; i < 10; ++i) fit.add(5.0, 5.0 + 0.1 * i);
  auto r = fit.summary(Model::line);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().message.find("no spread in the reference values") != std::string::npos);
  // The scatter about the mean is kept, so one pair elsewhere gives a determined line.
  fit.add(6.0, 6.0);
  CHECK(fit.summary(Model::line).ok());
}

TEST_CASE("identical pairs give a perfect, finite fit") {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (int rep = 0; rep < 4; ++rep)
    for (double x : {1.0, 2.0, 3.0}) fit.add(x, 2 * x + 1);
  const LineFit f = fit.summary(Model::line).value();
  CHECK(finite(f));
  CHECK(f.b1 == Approx(2.0));
  CHECK(f.b0 == Approx(1.0));
  CHECK(f.s == Approx(0.0).margin(1e-12));
  REQUIRE(f.r2.has_value());
  CHECK(*f.r2 == Approx(1.0));
}

TEST_CASE("constant sensor readings have no R^2 but a finite fit") {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (double x : {1.0, 2.0, 3.0, 4.0}) fit.add(x, 7.0);
  const LineFit f = fit.summary(Model::line).value();
  CHECK(finite(f));
  CHECK(f.b1 == 0.0);
  CHECK_FALSE(f.r2.has_value());
  // Inverse prediction through a zero slope is refused.
  CHECK_FALSE(inverse_predict(f, 7.0, 1, TwoSidedT(0.95)).ok());
}

TEST_CASE("removing from an empty or single-pair window leaves an empty, usable state") {
  LineAccumulator acc;
  acc.remove(1.0, 2.0);
  CHECK(acc.moments().count == 0);
  acc.add(1.0, 2.0);
  acc.remove(1.0, 2.0);
  CHECK(acc.moments().count == 0);
  CHECK(acc.moments().sum_w == 0);
  for (double x : {1.0, 2.0, 3.0}) acc.add(x, x);
  CHECK(summarize(acc.moments(), Model::line).value().b1 == Approx(1.0));
}

TEST_CASE("a window of three slides through a million pairs without losing the fit") {
  StreamingLineFit fit(MemoryPolicy::window(3));
  for (long long i = 0; i < 1'000'000; ++i)
    fit.add(static_cast<double>(i % 97), 3.0 * static_cast<double>(i % 97) + 0.5 * static_cast<double>((i * 7919) % 13));
  const auto r = fit.summary(Model::line);
  REQUIRE(r.ok());
  CHECK(finite(r.value()));
  CHECK(r->count == 3);
}

TEST_CASE("huge and tiny magnitudes give finite results or a clear overflow error") {
  for (double scale : {1e-150, 1e-30, 1e30, 1e150}) {
    StreamingLineFit fit(MemoryPolicy::cumulative());
    for (int i = 0; i < 20; ++i) fit.add(scale * i, scale * (2 * i + 0.01 * (i % 3)));
    const auto r = fit.summary(Model::line);
    INFO("scale " << scale);
    if (r.ok()) {
      CHECK(finite(r.value()));
      CHECK(r->b1 == Approx(2.0).epsilon(1e-2));
    } else {
      CHECK(r.error().message.find("overflow") != std::string::npos);
    }
  }
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (int i = 0; i < 20; ++i) fit.add(1e300 * i, 1e300 * i);
  const auto r = fit.summary(Model::line);
  CHECK_FALSE(r.ok());
}

TEST_CASE("joint test is exact for a perfect fit that matches the certificate") {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (double x : {0.0, 1.0, 2.0, 3.0}) fit.add(x, x);
  const LineFit f = fit.summary(Model::line).value();
  const auto v = judge_against_certificate(f, CertifiedLine{0.0, 1.0}, TwoSidedT(0.95), false);
  CHECK(v.joint_consistent);
  CHECK(std::isfinite(v.joint_statistic));
}
