// ARL computation and design against published tables, independent solvers and simulation.
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "../support/arl_reference.hpp"
#include "../support/reference_data.hpp"
#include "../support/run_length.hpp"
#include "rigcal/detect/arl.hpp"
#include "rigcal/detect/cusum.hpp"
#include "rigcal/detect/ewma.hpp"

using namespace rigcal::detect;
using rigcal::test::read_rows;

namespace {

// Half a unit in the last digit of a printed number ("8.38" -> 0.005, "465" -> 0.5, "500." -> 0.5).
double half_unit_of_last_digit(const std::string& printed) {
  const auto point = printed.find('.');
  if (point == std::string::npos || point + 1 == printed.size()) return 0.5;
  return 0.5 * std::pow(10.0, -static_cast<double>(printed.size() - point - 1));
}

}  // namespace

TEST_CASE("two-sided CUSUM ARLs match Montgomery's table for k = 1/2, h = 4 and 5") {
  // Source: Montgomery & Runger Table 16-9 = Lucas & Crosier (1982) Table 1 (tests/data, copied).
  double worst = 0;
  int checked = 0;
  for (const auto& row : read_rows("cusum_arl_two_sided_k05.dat")) {
    const double delta = std::stod(row[0]);
    for (int c = 0; c < 2; ++c) {
      if (row[1 + c] == "nan") continue;
      const double h = c == 0 ? 4.0 : 5.0;
      const double printed = std::stod(row[1 + c]);
      const double computed = cusum_arl_two_sided(0.5, h, delta).value();
      INFO("delta = " << delta << ", h = " << h << ": computed " << computed << ", printed " << printed);
      CHECK(std::abs(computed - printed) <= half_unit_of_last_digit(row[1 + c]) + 1e-12);
      worst = std::max(worst, std::abs(computed - printed) / printed);
      ++checked;
    }
  }
  CHECK(checked == 21);
  CHECK(worst < 0.005);  // the brief's bound; the printed digits are the binding test
}

TEST_CASE("one-sided CUSUM ARLs match the NIST/SEMATECH e-Handbook 6.3.2.3.1 entries") {
  // Source: NIST e-Handbook 6.3.2.3.1 (tests/data: from memory, corroborated by a stored quotation).
  for (const auto& row : read_rows("cusum_arl_one_sided_nist.dat")) {
    const double delta = std::stod(row[0]);
    const double units = std::stod(row[3]);
    for (int c = 0; c < 2; ++c) {
      const double h = c == 0 ? 4.0 : 5.0;
      const double printed = std::stod(row[1 + c]);
      const double tolerance = 2 * units * half_unit_of_last_digit(row[1 + c]);
      const double computed = cusum_arl_one_sided(0.5, h, delta).value();
      INFO("delta = " << delta << ", h = " << h << ": computed " << computed << ", printed " << printed);
      CHECK(std::abs(computed - printed) <= tolerance);
    }
  }
}

TEST_CASE("one-sided CUSUM ARLs match Vance (1986), Brook & Evans (1972), Waldmann (1986) and SAS/QC") {
  // Source: the papers' tables as quoted in the spc package's documentation (tests/data, copied).
  int checked = 0;
  for (const auto& row : read_rows("cusum_arl_one_sided_literature.dat")) {
    const double k = std::stod(row[1]), h = std::stod(row[2]), mu = std::stod(row[3]);
    const double printed = std::stod(row[4]);
    const double relative = std::stod(row[5]);
    const double tolerance = relative > 0 ? relative * printed : half_unit_of_last_digit(row[4]);
    const double computed = cusum_arl_one_sided(k, h, mu).value();
    INFO(row[0] << ": k = " << k << ", h = " << h << ", mu = " << mu << ": computed " << computed);
    CHECK(std::abs(computed - printed) <= tolerance + 1e-13);
    ++checked;
  }
  CHECK(checked == 13);
}

TEST_CASE("SAS/QC's two-sided CUSUM value agrees to its apparent accuracy") {
  // SAS/QC manual 1999 (quoted in the spc documentation): two-sided k = 0.25, h = 8, mu = 2.5 is
  // 4.1500826715, one-sided 4.1500836225. Here the lower side cannot alarm (it would need z < -8.25
  // within ~4 steps, probability < 1e-15), so two-sided = one-sided; SAS's two-sided method is off by
  // 2.3e-7 relative. Checked at 1e-6.
  const double two = cusum_arl_two_sided(0.25, 8, 2.5).value();
  CHECK(two == cusum_arl_one_sided(0.25, 8, 2.5).value());
  CHECK(std::abs(two - 4.1500826715) / two < 1e-6);
}

TEST_CASE("CUSUM ARLs far beyond the tables agree with an independent Brook-Evans chain") {
  struct Case {
    double k, h, mu;
  };
  // In control up to ~1.5e8 (h = 17: "one false alarm a year at 1 Hz" territory) and out of control.
  // The chain (120, 240 and 480 cells) is itself good to a few 1e-6 at h = 17; the library to 1e-9.
  for (const Case c : {Case{0.5, 4, 0}, Case{0.5, 12.66, 0}, Case{0.5, 17, 0}, Case{1.0, 8.2, 0},
                       Case{0.125, 43, 0.25}, Case{0.5, 12.66, -0.2}}) {
    const double library = cusum_arl_one_sided(c.k, c.h, c.mu).value();
    const double reference = rigcal::test::brook_evans_upper_arl(c.k, c.h, c.mu, 120);
    INFO("k = " << c.k << ", h = " << c.h << ", mu = " << c.mu << ": " << library << " vs " << reference);
    CHECK(std::abs(library - reference) / reference < 1e-5);
  }
}

TEST_CASE("CUSUM ARL solver: symmetry, two-sided combination and its limits") {
  // In control the sides mirror: two-sided = one-sided / 2.
  CHECK(cusum_arl_two_sided(0.5, 5, 0).value() ==
        Approx(cusum_arl_one_sided(0.5, 5, 0).value() / 2).epsilon(1e-13));
  const double up = cusum_arl_one_sided(0.5, 4, 0.3).value(),
               down = cusum_arl_one_sided(0.5, 4, -0.3).value();
  CHECK(cusum_arl_two_sided(0.5, 4, 0.3).value() == Approx(1 / (1 / up + 1 / down)).epsilon(1e-13));
  CHECK(cusum_arl_two_sided(0.5, 4, -0.3).value() ==
        Approx(cusum_arl_two_sided(0.5, 4, 0.3).value()).epsilon(1e-13));
  // Beyond 1e12 the answer is +infinity, not noise; a huge shift gives 1.
  CHECK(std::isinf(cusum_arl_one_sided(0.5, 40, 0).value()));
  CHECK(std::isinf(cusum_arl_one_sided(0.5, 5, -3).value()));
  CHECK(cusum_arl_two_sided(0.5, 5, 3).value() == Approx(2.57325).epsilon(1e-5));
  CHECK(cusum_arl_one_sided(0.5, 2, 40).value() == 1.0);
  // Invalid arguments are errors naming the parameter.
  CHECK(cusum_arl_one_sided(-0.1, 4, 0).error().message.find("k") != std::string::npos);
  CHECK_FALSE(cusum_arl_one_sided(0.5, 0, 0).ok());
  CHECK_FALSE(cusum_arl_one_sided(0.5, 250, 0).ok());
  CHECK_FALSE(cusum_arl_two_sided(0.5, 4, NAN).ok());
  CHECK_FALSE(cusum_arl_two_sided(INFINITY, 4, 0).ok());
}

TEST_CASE("EWMA ARLs match Lucas & Saccucci (1990), Crowder (1987) and SAS/QC") {
  // Source: Lucas & Saccucci Table 3, Crowder Table 1, SAS/QC EWMAARL (tests/data, copied).
  double worst = 0;
  int checked = 0;
  for (const auto& row : read_rows("ewma_arl_literature.dat")) {
    const double lambda = std::stod(row[1]), L = std::stod(row[2]), mu = std::stod(row[3]);
    const double printed = std::stod(row[4]);
    const double relative = std::stod(row[5]);
    const double computed = ewma_arl(lambda, L, mu).value();
    INFO(row[0] << ": lambda = " << lambda << ", L = " << L << ", mu = " << mu << ": computed " << computed);
    const double tolerance = relative > 0 ? relative * printed : half_unit_of_last_digit(row[4]);
    CHECK(std::abs(computed - printed) <= tolerance + 1e-12);
    worst = std::max(worst, std::abs(computed - printed) / printed);
    ++checked;
  }
  CHECK(checked == 58);
  CHECK(worst < 0.005);
}

TEST_CASE("EWMA ARLs match Montgomery's table of Lucas & Saccucci schemes") {
  // Source: Montgomery, Introduction to SQC (tests/data: from memory, partly corroborated).
  const double lambdas[] = {0.40, 0.25, 0.20, 0.10, 0.05};
  const double limits[] = {3.054, 2.998, 2.962, 2.814, 2.615};
  int checked = 0, beyond_digits = 0;
  for (const auto& row : read_rows("ewma_arl_montgomery.dat")) {
    const double delta = std::stod(row[0]);
    for (int c = 0; c < 5; ++c) {
      const double printed = std::stod(row[1 + c]);
      const double computed = ewma_arl(lambdas[c], limits[c], delta).value();
      INFO("lambda = " << lambdas[c] << ", delta = " << delta << ": computed " << computed << ", printed "
                       << printed);
      const bool within_digits = std::abs(computed - printed) <= half_unit_of_last_digit(row[1 + c]) + 1e-12;
      // From memory: four entries miss the printed digits (listed in the data file), by under 0.5 %.
      CHECK((within_digits || std::abs(computed - printed) <= 0.005 * printed));
      beyond_digits += within_digits ? 0 : 1;
      ++checked;
    }
  }
  CHECK(checked == 50);
  CHECK(beyond_digits <= 4);
}

TEST_CASE("EWMA ARLs far beyond the tables agree with an independent Nystroem solution") {
  struct Case {
    double lambda, L, mu;
  };
  // ARL0 from ~500 to ~3e9; the chain's extrapolated error grows with ARL0 (arl.hpp).
  for (const Case c : {Case{0.1, 2.814, 0}, Case{0.05, 4.75, 0}, Case{0.1, 5.5, 0}, Case{0.02, 5.3, 0},
                       Case{0.3, 6.0, 0}, Case{0.02, 5.3, 0.5}, Case{0.15, 4.85, 1.0}}) {
    const double library = ewma_arl(c.lambda, c.L, c.mu).value();
    const double reference = rigcal::test::ewma_nystroem_arl(c.lambda, c.L, c.mu);
    INFO("lambda = " << c.lambda << ", L = " << c.L << ", mu = " << c.mu << ": " << library << " vs "
                     << reference);
    CHECK(std::abs(library - reference) / reference < (c.mu == 0 && reference > 1e6 ? 6e-4 : 5e-5));
  }
}

TEST_CASE("EWMA ARL solver: limits of the chain and errors") {
  // lambda = 1 is the Shewhart chart: 1 / P(|z| > L).
  CHECK(ewma_arl(1.0, 3.0, 0).value() == Approx(1 / std::erfc(3 / std::sqrt(2.0))).epsilon(1e-9));
  CHECK(ewma_arl(0.2, 3, -0.7).value() == Approx(ewma_arl(0.2, 3, 0.7).value()).epsilon(1e-9));
  CHECK(std::isinf(ewma_arl(0.5, 9.0, 0).value()));
  CHECK(ewma_arl(0.5, 3.0, 30).value() == Approx(1.0).epsilon(1e-12));
  CHECK_FALSE(ewma_arl(0.005, 3, 0).ok());
  CHECK_FALSE(ewma_arl(1.5, 3, 0).ok());
  CHECK_FALSE(ewma_arl(0.1, -1, 0).ok());
  CHECK_FALSE(ewma_arl(0.1, 3, INFINITY).ok());
}

TEST_CASE("EWMA limits for ARL0 = 250 match Crowder (1989)") {
  // Source: Crowder (1989) as quoted in the spc documentation (tests/data, copied).
  for (const auto& row : read_rows("ewma_limits_crowder1989.dat")) {
    const double lambda = std::stod(row[0]);
    const double L = ewma_limit_multiplier(lambda, 250).value();
    INFO("lambda = " << lambda << ": L = " << L);
    CHECK(std::abs(L - std::stod(row[1])) <= 0.005);
    CHECK(ewma_arl(lambda, L, 0).value() == Approx(250).epsilon(1e-5));
  }
}

TEST_CASE("CUSUM designs take k = shift / 2 and hit the target ARL0") {
  for (const double target : {200.0, 500.0, 1e6, 3.15e7}) {
    for (const double shift : {0.5, 1.0, 2.0}) {
      const CusumDesign d = design_cusum(target, shift).value();
      INFO("target " << target << ", shift " << shift << ": h = " << d.h);
      CHECK(d.k == 0.5 * shift);
      CHECK(d.arl0 == Approx(target).epsilon(1e-6));
      CHECK(cusum_arl_two_sided(d.k, d.h, 0).value() == Approx(target).epsilon(1e-6));
      CHECK(d.arl1 == cusum_arl_two_sided(d.k, d.h, shift).value());
      CHECK(d.arl1 < d.arl0);
    }
  }
  // Montgomery's h = 5 at k = 1/2 has ARL0 465.4: the design returns it back.
  CHECK(design_cusum(cusum_arl_two_sided(0.5, 5, 0).value(), 1.0).value().h == Approx(5.0).epsilon(1e-8));
}

TEST_CASE("EWMA designs pick the grid's best lambda and hit the target ARL0") {
  const EwmaDesign d = design_ewma(500, 1.0).value();
  CHECK(d.arl0 == Approx(500).epsilon(1e-4));
  // Every other lambda of the grid, designed to the same ARL0, detects the shift no sooner.
  for (const double lambda : ewma_design_lambdas) {
    const double L = ewma_limit_multiplier(lambda, 500).value();
    INFO("lambda = " << lambda << ", L = " << L);
    CHECK(ewma_arl(lambda, L, 1.0).value() >= d.arl1 * (1 - 1e-6));
  }
  // Lucas & Saccucci: small shifts want small lambda, large shifts large lambda.
  CHECK(design_ewma(500, 0.5).value().lambda < d.lambda);
  CHECK(design_ewma(500, 2.0).value().lambda > d.lambda);
  CHECK_FALSE(d.lambda_at_grid_edge);
  const EwmaDesign year = design_ewma(3.15e7, 1.0).value();
  CHECK(year.arl0 == Approx(3.15e7).epsilon(1e-4));
  // A year between false alarms and a quarter-sigma shift want a smaller lambda than the grid has; the
  // design says so, and the CUSUM is far ahead there.
  const EwmaDesign slow = design_ewma(3.15e7, 0.25).value();
  CHECK(slow.lambda_at_grid_edge);
  CHECK(slow.arl1 > 5 * design_cusum(3.15e7, 0.25).value().arl1);
}

TEST_CASE("designed detectors meet their ARL0 in simulation") {
  // Bounded Monte Carlo at a moderate target: mean run length within 3 standard errors.
  const CusumDesign c = design_cusum(300, 1.0).value();
  const auto cusum = rigcal::test::simulate_run_lengths(Cusum(c.k, c.h), 0.0, 6000, 11);
  INFO("CUSUM h = " << c.h << ": simulated ARL0 " << cusum.mean << " +- " << cusum.standard_error);
  CHECK(std::abs(cusum.mean - 300) < 3 * cusum.standard_error);
  const EwmaDesign e = design_ewma(300, 1.0).value();
  const auto ewma = rigcal::test::simulate_run_lengths(Ewma(e.lambda, e.L), 0.0, 6000, 12);
  INFO("EWMA lambda = " << e.lambda << ", L = " << e.L << ": simulated ARL0 " << ewma.mean << " +- "
                        << ewma.standard_error);
  CHECK(std::abs(ewma.mean - 300) < 3 * ewma.standard_error);
}

TEST_CASE("impossible design requests are errors") {
  for (const double target : {1.0, 0.5, -3.0, 2e10, double(NAN), double(INFINITY)}) {
    INFO("target " << target);
    CHECK_FALSE(design_cusum(target, 1.0).ok());
    CHECK_FALSE(design_ewma(target, 1.0).ok());
  }
  for (const double shift : {0.0, -1.0, double(NAN), double(INFINITY)}) {
    INFO("shift " << shift);
    CHECK_FALSE(design_cusum(500, shift).ok());
    CHECK_FALSE(design_ewma(500, shift).ok());
  }
  // A target below what k alone gives (1 / (2 Phi(-1)) = 3.15 at k = 1) says so.
  const auto r = design_cusum(3.0, 2.0);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().message.find("h -> 0") != std::string::npos);
  // A shift too small for the target needs h beyond the solver's range.
  CHECK(design_cusum(1e10, 0.05).error().message.find("shift too small") != std::string::npos);
  CHECK_FALSE(cusum_decision_interval(-1, 500).ok());
  CHECK_FALSE(ewma_limit_multiplier(0.001, 500).ok());
}
