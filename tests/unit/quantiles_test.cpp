// Critical values of t and F against published tables and Boost.Math.
#include <catch2/catch.hpp>
#include <cmath>

#include "../support/reference_data.hpp"
#include "rigcal/stats/quantiles.hpp"

using namespace rigcal::stats;
using rigcal::test::read_rows;

TEST_CASE("two-sided t critical values match the NIST/SEMATECH e-Handbook 1.3.6.7.2 table") {
  // Columns nu t_0.90 t_0.95 t_0.975 t_0.99 t_0.995 t_0.999; two-sided confidence c uses t_{(1+c)/2}.
  const TwoSidedT t80(0.80), t90(0.90), t95(0.95), t98(0.98), t99(0.99);
  int rows = 0;
  for (const auto& row : read_rows("t_distribution_critical_values.dat")) {
    const double nu = std::stod(row[0]);
    const TwoSidedT* tables[] = {&t80, &t90, &t95, &t98, &t99};
    for (int c = 0; c < 5; ++c) {
      const double printed = std::stod(row[1 + c]);
      INFO("nu = " << nu << ", column " << c + 1);
      CHECK(std::abs(tables[c]->critical_value(nu) - printed) <= 0.0005 + 1e-12);
    }
    ++rows;
  }
  CHECK(rows == 34);
}

TEST_CASE("t critical values beyond the exact table follow the asymptotic series to double precision") {
  // Abramowitz & Stegun 26.7.5 against Boost.Math's exact quantile.
  for (double conf : {0.90, 0.95, 0.9545, 0.99, 0.999}) {
    const TwoSidedT t(conf);
    for (double nu : {4097.0, 5000.0, 12345.0, 1e5, 1e6, 1e8}) {
      const double exact = student_t_quantile(0.5 + 0.5 * conf, nu);
      INFO("confidence " << conf << ", nu " << nu);
      CHECK(t.critical_value(nu) == Approx(exact).epsilon(1e-14));
    }
    CHECK(t.critical_value(TwoSidedT::exact_table_limit) ==
          Approx(student_t_quantile(0.5 + 0.5 * conf, TwoSidedT::exact_table_limit)).epsilon(1e-15));
  }
}

TEST_CASE("non-integer degrees of freedom are truncated to the next lower integer (GUM G.4.1)") {
  const TwoSidedT t(0.95);
  CHECK(t.critical_value(9.99) == t.critical_value(9.0));
  CHECK(t.critical_value(9.99) > student_t_quantile(0.975, 9.99));
  CHECK(std::isinf(t.critical_value(0.5)));
  CHECK(t.critical_value(INFINITY) == Approx(1.959963984540054).epsilon(1e-15));  // z_0.975
}

TEST_CASE("F(2, nu) upper 5 % critical values match Harvey, Analytical Chemistry 2.1, Appendix 5") {
  // The source misprints nu2 = 4 (6.994 for 6.944); the file's flag column marks it and F_exact is used.
  for (const auto& row : read_rows("f_distribution_critical_values_2_nu.dat")) {
    const double nu2 = std::stod(row[0]);
    const double printed = std::stod(row[1]);
    const bool misprint = row[3] == "1";
    INFO("nu2 = " << nu2);
    const double computed = f2_critical_value(0.05, nu2);
    if (!misprint) {
      // printed to 4 significant figures
      CHECK(std::abs(computed - printed) <= 0.5 * std::pow(10.0, std::floor(std::log10(printed)) - 3) + 1e-9);
    }
    CHECK(computed == Approx(std::stod(row[2])).epsilon(1e-6));
  }
}

TEST_CASE("cached joint F(2, nu) critical values equal the closed form at every dof") {
  const TwoSidedT t(0.95);
  for (double nu : {1.0, 2.0, 4.0, 16.0, 4096.0, 4097.0, 1e6})
    CHECK(t.joint_critical_value(nu) == Approx(f2_critical_value(0.05, nu)).epsilon(1e-14));
  // nu -> infinity: F(2, inf) = chi^2_2 / 2 = -ln(alpha) (Harvey's table note: 2.995732 at alpha = 0.05)
  CHECK(t.joint_critical_value(INFINITY) == Approx(2.995732).epsilon(1e-6));
}
