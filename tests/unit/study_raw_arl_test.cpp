// The run-length study's simulation of bare detectors reproduces published ARLs: if it did not, nothing
// it says about the engine could be trusted.
#include <catch2/catch.hpp>
#include <cmath>
#include <string>

#include "../support/reference_data.hpp"
#include "raw_run_lengths.hpp"
#include "rigcal/detect/cusum.hpp"
#include "rigcal/detect/ewma.hpp"

using namespace rigcal::study;
using rigcal::test::read_rows;

namespace {

// Half a unit in the last printed digit: the published values are rounded.
double rounding_of(const std::string& printed) {
  const auto point = printed.find('.');
  if (point == std::string::npos || point + 1 == printed.size()) return 0.5;
  return 0.5 * std::pow(10.0, -static_cast<double>(printed.size() - point - 1));
}

// Runs for a standard error of about 1.2 % of an in-control ARL (geometric: SD ~ mean), 4 % out of control.
int runs_for(double mu) { return mu == 0 ? 7000 : 600; }

}  // namespace

TEST_CASE("study simulation: two-sided CUSUM ARLs match Montgomery & Runger Table 16-9 (k = 1/2)") {
  // Source: tests/data/cusum_arl_two_sided_k05.dat, Montgomery & Runger Table 16-9 = Lucas & Crosier
  // (1982) Table 1 (copied; provenance in the file). Rows delta = 0 and 1, h = 4 and 5.
  int checked = 0;
  for (const auto& row : read_rows("cusum_arl_two_sided_k05.dat")) {
    const double delta = std::stod(row[0]);
    if (delta != 0 && delta != 1) continue;
    for (int c = 0; c < 2; ++c) {
      const double h = c == 0 ? 4 : 5;
      const double published = std::stod(row[1 + c]);
      const auto e = estimate_arl(raw_run_lengths(rigcal::detect::Cusum(0.5, h), delta, runs_for(delta), 100000,
                                                  static_cast<std::uint64_t>(41 + 10 * h + delta)));
      INFO("h = " << h << ", delta = " << delta << ": simulated " << e.arl << " +- " << e.standard_error
                  << ", published " << published);
      CHECK(e.censored == 0);
      CHECK(std::abs(e.arl - published) < 3 * e.standard_error + rounding_of(row[1 + c]));
      ++checked;
    }
  }
  CHECK(checked == 4);
}

TEST_CASE("study simulation: EWMA ARLs match Lucas & Saccucci (1990) Table 3") {
  // Source: tests/data/ewma_arl_literature.dat, rows "lucas" (Lucas & Saccucci 1990, Table 3, copied):
  // lambda = 0.5, L = 3.071 and lambda = 0.03, L = 2.437, both ARL0 = 500; mu = 0 and 1.
  int checked = 0;
  for (const auto& row : read_rows("ewma_arl_literature.dat")) {
    if (row[0] != "lucas") continue;
    const double lambda = std::stod(row[1]), L = std::stod(row[2]), mu = std::stod(row[3]);
    if (mu != 0 && mu != 1) continue;
    const double published = std::stod(row[4]);
    const auto e = estimate_arl(raw_run_lengths(rigcal::detect::Ewma(lambda, L), mu, runs_for(mu), 100000,
                                                static_cast<std::uint64_t>(1000 * lambda + mu)));
    INFO("lambda = " << lambda << ", L = " << L << ", mu = " << mu << ": simulated " << e.arl << " +- "
                     << e.standard_error << ", published " << published);
    CHECK(std::abs(e.arl - published) < 3 * e.standard_error + rounding_of(row[4]));
    ++checked;
  }
  CHECK(checked == 4);
}
