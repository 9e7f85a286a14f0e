// The streaming estimator against the NIST Statistical Reference Datasets for linear regression
// (itl.nist.gov/div898/strd/lls): Norris (line), NoInt1 and NoInt2 (through the origin).
// Every certified value must agree to at least 12 significant digits (NIST's log relative error).
#include <algorithm>
#include <catch2/catch.hpp>

#include "../support/reference_data.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;
using rigcal::test::column;
using rigcal::test::log_relative_error;
using rigcal::test::read_named_values;

namespace {

LineFit fit_one_pair_at_a_time(const std::string& dataset, Model model, bool reversed) {
  // StRD files list y first, then x.
  std::vector<double> y = column(dataset + ".dat", 0), x = column(dataset + ".dat", 1);
  if (reversed) {
    std::reverse(x.begin(), x.end());
    std::reverse(y.begin(), y.end());
  }
  StreamingLineFit fit(MemoryPolicy::cumulative());
  for (std::size_t i = 0; i < x.size(); ++i) fit.add(x[i], y[i]);
  auto summary = fit.summary(model);
  REQUIRE(summary.ok());
  return summary.value();
}

void check_digits(double computed, double certified, const char* what) {
  INFO(what << ": computed " << computed << ", certified " << certified);
  CHECK(log_relative_error(computed, certified) >= 12.0);
}

}  // namespace

TEST_CASE("streaming fit reproduces every NIST StRD Norris certified value to 12 digits") {
  const auto cert = read_named_values("nist_strd_norris.certified");
  for (bool reversed : {false, true}) {
    SECTION(reversed ? "pairs in reverse order" : "pairs in the file's order") {
      const LineFit f = fit_one_pair_at_a_time("nist_strd_norris", Model::line, reversed);
      CHECK(f.count == 36);
      CHECK(f.dof == 34);
      check_digits(f.b0, cert.at("B0"), "B0");
      check_digits(f.se_b0, cert.at("sd_B0"), "sd(B0)");
      check_digits(f.b1, cert.at("B1"), "B1");
      check_digits(f.se_b1, cert.at("sd_B1"), "sd(B1)");
      check_digits(f.s, cert.at("residual_sd"), "residual SD");
      REQUIRE(f.r2.has_value());
      check_digits(*f.r2, cert.at("r_squared"), "R^2");
      check_digits(f.ssr, cert.at("ss_residual"), "residual sum of squares");
    }
  }
}

TEST_CASE("streaming through-origin fit reproduces NIST StRD NoInt1 and NoInt2 to 12 digits") {
  for (const char* name : {"nist_strd_noint1", "nist_strd_noint2"}) {
    const auto cert = read_named_values(std::string(name) + ".certified");
    for (bool reversed : {false, true}) {
      INFO(name << (reversed ? " reversed" : " in order"));
      const LineFit f = fit_one_pair_at_a_time(name, Model::through_origin, reversed);
      CHECK(f.dof == cert.at("dof_residual"));
      check_digits(f.b1, cert.at("B1"), "B1");
      check_digits(f.se_b1, cert.at("sd_B1"), "sd(B1)");
      check_digits(f.s, cert.at("residual_sd"), "residual SD");
      REQUIRE(f.r2.has_value());
      check_digits(*f.r2, cert.at("r_squared"), "uncentred R^2");
      check_digits(f.ssr, cert.at("ss_residual"), "residual sum of squares");
    }
  }
}
