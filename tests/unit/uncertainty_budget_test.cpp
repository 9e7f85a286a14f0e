// GUM uncertainty budgets: Welch-Satterthwaite (JCGM 100:2008 G.4.1, eq. G.2b) on the GUM's own worked
// examples, and the budget of a corrected value checked by hand. Provenance of every published number
// (copied or from memory) is in the header of the tests/data file it is read from.
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <map>
#include <vector>

#include "../support/reference_data.hpp"
#include "rigcal/metrology/corrected_value_budget.hpp"
#include "rigcal/metrology/uncertainty_budget.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::metrology;
using rigcal::stats::LineFit;
using rigcal::stats::MemoryPolicy;
using rigcal::stats::Model;
using rigcal::stats::StreamingLineFit;
using rigcal::stats::TwoSidedT;
using rigcal::test::printed_t_critical;
using rigcal::test::read_named_values;
using rigcal::test::read_rows;

namespace {

// Built once: a TwoSidedT computes its exact table at construction (tens of milliseconds).
const TwoSidedT& t95() {
  static const TwoSidedT t(0.95);
  return t;
}

constexpr double inf = std::numeric_limits<double>::infinity();

// |computed - printed| within half a unit of the printed value's last digit.
bool matches_printed(double computed, double printed, double last_digit) {
  return std::abs(computed - printed) <= 0.5 * last_digit + 1e-12;
}

struct GaugeInput {
  double estimate, u, dof;
};

std::map<std::string, GaugeInput> end_gauge_inputs() {
  std::map<std::string, GaugeInput> in;
  for (const auto& row : read_rows("gum_h1_end_gauge.dat"))
    in[row.at(0)] = {std::stod(row.at(1)), std::stod(row.at(2)), std::stod(row.at(3))};
  return in;
}

// GUM H.1: l = l_s + d - l_s (d_alpha theta + alpha_s d_theta); sensitivities at the estimates (H.1.3).
std::vector<UncertaintyComponent> end_gauge_components() {
  auto in = end_gauge_inputs();
  const double l_s = in.at("l_s").estimate;
  const double c_d_alpha = -l_s * in.at("theta").estimate;
  const double c_d_theta = -l_s * in.at("alpha_s").estimate;
  const double c_alpha_s = -l_s * in.at("d_theta").estimate;  // 0: d_theta is estimated as 0
  const double c_theta = -l_s * in.at("d_alpha").estimate;    // 0 likewise
  auto comp = [&](const char* name, EvaluationType type, double c) {
    const auto& x = in.at(name);
    return UncertaintyComponent{name, type, x.u, c, x.dof, ""};
  };
  return {comp("l_s", EvaluationType::type_b, 1.0),
          comp("d0", EvaluationType::type_a, 1.0),
          comp("d1", EvaluationType::type_a, 1.0),
          comp("d2", EvaluationType::type_b, 1.0),
          comp("alpha_s", EvaluationType::type_b, c_alpha_s),
          comp("theta", EvaluationType::type_b, c_theta),
          comp("d_alpha", EvaluationType::type_b, c_d_alpha),
          comp("d_theta", EvaluationType::type_b, c_d_theta)};
}

const BudgetLine& line_named(const UncertaintyBudget& b, const std::string& name) {
  for (const auto& l : b.lines)
    if (l.name == name) return l;
  throw std::runtime_error("no budget line " + name);
}

// Ten pairs at x = 40 and x = 60 on the line y = 2 x, with residuals +-0.4 that cancel within each group:
// mean_x = 50, Sxx = 1000, b1 = 2 exactly, s^2 = 8 (0.4)^2 / 8 = 0.16, dof = 8.
LineFit hand_fit() {
  StreamingLineFit fit(MemoryPolicy::cumulative());
  const double residual[] = {0.4, -0.4, 0.4, -0.4, 0.0};
  for (double x : {40.0, 60.0})
    for (double r : residual) fit.add(x, 2.0 * x + r);
  return fit.summary(Model::line).value();
}

}  // namespace

TEST_CASE("Welch-Satterthwaite reproduces the GUM H.1 end-gauge budget (H.1.6)") {
  const auto gum = read_named_values("gum_h1_end_gauge.expected");
  const TwoSidedT t99(0.99);
  const auto components = end_gauge_components();
  const UncertaintyBudget b = combine_uncertainties(components, t99).value();

  SECTION("the model at the estimates gives the published length l = 50 000 838 nm") {
    const auto in = end_gauge_inputs();
    const double l_s = in.at("l_s").estimate;
    const double l = l_s + in.at("d0").estimate + in.at("d1").estimate + in.at("d2").estimate -
                     l_s * (in.at("d_alpha").estimate * in.at("theta").estimate +
                            in.at("alpha_s").estimate * in.at("d_theta").estimate);
    CHECK(matches_printed(l, gum.at("l_gum_nm"), 1));
  }
  SECTION("contributions |c_i| u(x_i) at the GUM's printed digits (Table H.1)") {
    CHECK(matches_printed(line_named(b, "l_s").contribution, gum.at("contribution_l_s_nm"), 1));
    const double u_d = std::hypot(line_named(b, "d0").contribution, line_named(b, "d1").contribution,
                                  line_named(b, "d2").contribution);
    CHECK(matches_printed(u_d, gum.at("contribution_d_nm"), 0.1));
    CHECK(matches_printed(line_named(b, "d_alpha").contribution, gum.at("contribution_d_alpha_nm"), 0.1));
    CHECK(matches_printed(line_named(b, "d_theta").contribution, gum.at("contribution_d_theta_nm"), 0.1));
    // Zero sensitivities: alpha_s and theta enter only through products with estimates of zero.
    CHECK(line_named(b, "alpha_s").contribution == 0);
    CHECK(line_named(b, "theta").variance_share_percent == 0);
  }
  SECTION("u_c = 32 nm, nu_eff = 16.7 truncated to 16, k = t_99(16) = 2.92, U_99 = 93 nm (H.1.6)") {
    CHECK(matches_printed(b.u_c, gum.at("u_c_gum_nm"), 1));
    CHECK(std::abs(b.nu_eff - gum.at("nu_eff_gum")) < 0.1);  // 16.75 here; the GUM rounds inputs first
    CHECK(std::floor(b.nu_eff) == gum.at("nu_eff_truncated_gum"));
    CHECK(matches_printed(b.k, gum.at("k99_gum"), 0.01));
    CHECK(std::abs(b.k - printed_t_critical(16, 0.995)) <= 0.0005);  // NIST e-Handbook t table: 2.921
    // The GUM multiplies its rounded u_c = 32 nm; unrounded (31.66 nm) U is 92.5 nm.
    CHECK(matches_printed(b.k * gum.at("u_c_gum_nm"), gum.at("U99_gum_nm"), 1));
    CHECK(std::abs(b.expanded - gum.at("U99_gum_nm")) < 1.0);
    CHECK(b.coverage_probability == 0.99);
  }
  SECTION("shares of variance add up to 100 %") {
    double total = 0;
    for (const auto& l : b.lines) total += l.variance_share_percent;
    CHECK(total == Approx(100.0).epsilon(1e-12));
    CHECK(line_named(b, "l_s").variance_share_percent == Approx(100.0 * 625.0 / (b.u_c * b.u_c)));
  }
  SECTION("the GUM's rounded contributions with nu(d) = 25.6 give the same nu_eff") {
    const std::vector<DofTerm> rounded{{gum.at("contribution_l_s_nm"), 18},
                                       {gum.at("contribution_d_nm"), gum.at("nu_d_gum")},
                                       {gum.at("contribution_d_alpha_nm"), 50},
                                       {gum.at("contribution_d_theta_nm"), 2}};
    CHECK(std::abs(welch_satterthwaite(rounded).value() - gum.at("nu_eff_gum")) < 0.1);
  }
}

TEST_CASE("Welch-Satterthwaite of the length difference d is the GUM's nu(d) = 25.6 (H.1.6)") {
  const auto gum = read_named_values("gum_h1_end_gauge.expected");
  const auto in = end_gauge_inputs();
  const std::vector<DofTerm> d{
      {in.at("d0").u, in.at("d0").dof}, {in.at("d1").u, in.at("d1").dof}, {in.at("d2").u, in.at("d2").dof}};
  // 25.45 from the unrounded u(d) = 9.682 nm; the GUM's 25.6 uses u(d) rounded to 9.7 nm.
  CHECK(std::abs(welch_satterthwaite(d).value() - gum.at("nu_d_gum")) < 0.2);
}

TEST_CASE("Welch-Satterthwaite reproduces the GUM G.4.1 example: nu_eff = 19.0") {
  const auto gum = read_named_values("gum_g41_welch_satterthwaite.expected");
  // Y = b X1 X2 X3: relative uncertainties combine with unit sensitivities; nu_i = n_i - 1.
  const std::vector<UncertaintyComponent> c{
      {"x1", EvaluationType::type_a, gum.at("u1_percent"), 1.0, gum.at("n1") - 1, ""},
      {"x2", EvaluationType::type_a, gum.at("u2_percent"), 1.0, gum.at("n2") - 1, ""},
      {"x3", EvaluationType::type_a, gum.at("u3_percent"), 1.0, gum.at("n3") - 1, ""}};
  const UncertaintyBudget b = combine_uncertainties(c, t95()).value();
  CHECK(matches_printed(b.u_c, gum.at("u_c_percent_gum"), 0.01));
  CHECK(matches_printed(b.nu_eff, gum.at("nu_eff_gum"), 0.1));
  // The GUM evaluates eq. G.2b with its rounded u_c = 1.03 % (19.04) and uses t_95(19). Unrounded,
  // nu_eff = 18.9987, which G.4.1's truncation takes to 18: k = t_95(18), slightly larger (conservative).
  CHECK(std::floor(b.nu_eff) == 18);
  CHECK(std::abs(b.k - printed_t_critical(18, 0.975)) <= 0.0005);
  CHECK(matches_printed(printed_t_critical(19, 0.975), gum.at("t95_19_gum"), 0.01));
}

TEST_CASE("Welch-Satterthwaite: limiting cases follow from eq. G.2b") {
  SECTION("only infinite dof, or nothing uncertain: infinity") {
    const std::vector<DofTerm> b_only{{0.3, inf}, {0.4, inf}};
    CHECK(std::isinf(welch_satterthwaite(b_only).value()));
    const std::vector<DofTerm> zero{{0.0, 5}, {0.0, inf}};
    CHECK(std::isinf(welch_satterthwaite(zero).value()));
  }
  SECTION("one finite term among infinite ones: (u_c / u_i)^4 nu_i") {
    const std::vector<DofTerm> terms{{0.3, 7}, {0.4, inf}};  // u_c = 0.5
    CHECK(welch_satterthwaite(terms).value() == Approx(7.0 * std::pow(0.5 / 0.3, 4)).epsilon(1e-14));
  }
  SECTION("N equal terms of nu each: N nu (the sum of N independent chi-square variances)") {
    const std::vector<DofTerm> terms{{2.0, 6}, {2.0, 6}, {2.0, 6}};
    CHECK(welch_satterthwaite(terms).value() == Approx(18.0).epsilon(1e-14));
  }
  SECTION("scale-free: contributions near the limits of double give the same nu") {
    const std::vector<DofTerm> tiny{{3e-160, 4}, {4e-160, 9}};
    const std::vector<DofTerm> unit{{3.0, 4}, {4.0, 9}};
    CHECK(welch_satterthwaite(tiny).value() == Approx(welch_satterthwaite(unit).value()).epsilon(1e-14));
  }
  SECTION("unusable input is an error, never NaN") {
    CHECK_FALSE(welch_satterthwaite(std::vector<DofTerm>{{-1.0, 3}}).ok());
    CHECK_FALSE(welch_satterthwaite(std::vector<DofTerm>{{1.0, 0}}).ok());
    CHECK_FALSE(welch_satterthwaite(std::vector<DofTerm>{{1.0, std::nan("")}}).ok());
    CHECK_FALSE(welch_satterthwaite(std::vector<DofTerm>{{INFINITY, 3}}).ok());
  }
}

TEST_CASE("GUM's k = 2 convention: coverage 0.9545 gives k = 2.00 at infinite dof (GUM Table G.1)") {
  const std::vector<UncertaintyComponent> c{{"a", EvaluationType::type_b, 0.3, 1.0, inf, ""},
                                            {"b", EvaluationType::type_b, 0.4, 1.0, inf, ""}};
  const UncertaintyBudget b = combine_uncertainties(c, TwoSidedT(coverage_k2)).value();
  CHECK(std::isinf(b.nu_eff));
  CHECK(std::abs(b.k - 2.0) < 5e-4);  // Table G.1 (from memory): p = 95.45 % <-> k = 2
  CHECK(b.u_c == Approx(0.5));
  CHECK(b.expanded == Approx(b.k * 0.5));
}

TEST_CASE("components from one variance estimate share its dof instead of adding theirs") {
  // Two lines of equal size from the same s^2 (nu = 8): one chi-square estimate, nu_eff = 8. Listed as
  // independent, Welch-Satterthwaite would claim 16.
  const TwoSidedT& t = t95();
  std::vector<UncertaintyComponent> c{{"part 1", EvaluationType::type_a, 0.1, 1.0, 8, "fit"},
                                      {"part 2", EvaluationType::type_a, 0.1, 1.0, 8, "fit"}};
  CHECK(combine_uncertainties(c, t).value().nu_eff == Approx(8.0).epsilon(1e-14));
  c[0].dof_source = c[1].dof_source = "";
  CHECK(combine_uncertainties(c, t).value().nu_eff == Approx(16.0).epsilon(1e-14));
  SECTION("one source with two dofs is an error") {
    c[0].dof_source = c[1].dof_source = "fit";
    c[1].dof = 9;
    CHECK_FALSE(combine_uncertainties(c, t).ok());
  }
}

TEST_CASE("budget errors: no components, invalid values, nu_eff below 1") {
  const TwoSidedT& t = t95();
  CHECK_FALSE(combine_uncertainties(std::vector<UncertaintyComponent>{}, t).ok());
  CHECK_FALSE(combine_uncertainties(
                  std::vector<UncertaintyComponent>{{"neg", EvaluationType::type_b, -0.1, 1, inf, ""}}, t)
                  .ok());
  CHECK_FALSE(combine_uncertainties(
                  std::vector<UncertaintyComponent>{{"c", EvaluationType::type_b, 0.1, NAN, inf, ""}}, t)
                  .ok());
  const auto low = combine_uncertainties(
      std::vector<UncertaintyComponent>{{"few", EvaluationType::type_a, 0.1, 1, 0.5, ""}}, t);
  REQUIRE_FALSE(low.ok());
  CHECK(low.error().message.find("< 1") != std::string::npos);
}

TEST_CASE("corrected value budget: a hand-computed case") {
  const LineFit f = hand_fit();
  REQUIRE(f.b1 == Approx(2.0).epsilon(1e-14));
  REQUIRE(f.s == Approx(0.4).epsilon(1e-13));
  REQUIRE(f.sxx == Approx(1000.0).epsilon(1e-14));
  REQUIRE(f.dof == 8);

  CorrectedValueInputs in;
  in.reference = reference_from_certificate(0.1, 2.0).value();  // U = 0.1, k = 2 -> u = 0.05
  in.resolution = 0.1;                                          // sensor units
  const TwoSidedT& t = t95();
  // Mean of m = 4 readings 120: x_hat = 50 + (120 - 100) / 2 = 60.
  const CorrectedValue cv = corrected_value(f, 120.0, 4, in, t).value();
  CHECK(cv.x_hat == Approx(60.0).epsilon(1e-14));
  const auto& lines = cv.budget.lines;
  REQUIRE(lines.size() == 4);
  // 0: s / (|b1| sqrt m) = 0.4 / (2 * 2) = 0.1
  CHECK(lines[0].name == "repeatability of the mean reading");
  CHECK(lines[0].type == EvaluationType::type_a);
  CHECK(lines[0].contribution == Approx(0.1).epsilon(1e-12));
  // 1: (s / |b1|) sqrt(1/n + (x_hat - mean_x)^2 / Sxx) = 0.2 sqrt(0.1 + 100/1000) = 0.2 sqrt(0.2)
  CHECK(lines[1].name == "calibration line");
  CHECK(lines[1].contribution == Approx(0.2 * std::sqrt(0.2)).epsilon(1e-12));
  CHECK(lines[0].dof == 8);
  CHECK(lines[1].dof == 8);
  // 2: U / k = 0.05, Type B, infinite dof
  CHECK(lines[2].name == "reference standard");
  CHECK(lines[2].type == EvaluationType::type_b);
  CHECK(lines[2].contribution == Approx(0.05).epsilon(1e-15));
  CHECK(std::isinf(lines[2].dof));
  // 3: resolution 0.1 / sqrt(12) in sensor units, sensitivity 1 / |b1| = 0.5
  CHECK(lines[3].name == "sensor resolution");
  CHECK(lines[3].u == Approx(0.1 / std::sqrt(12.0)).epsilon(1e-15));
  CHECK(lines[3].sensitivity == Approx(0.5).epsilon(1e-14));
  CHECK(lines[3].contribution == Approx(0.05 / std::sqrt(12.0)).epsilon(1e-14));
  // u_c^2 = 0.01 + 0.008 + 0.0025 + 0.0025/12 = 0.020708333...
  const double uc2 = 0.01 + 0.008 + 0.0025 + 0.0025 / 12.0;
  CHECK(cv.budget.u_c == Approx(std::sqrt(uc2)).epsilon(1e-12));
  // nu_eff = u_c^4 / ((0.01 + 0.008)^2 / 8): the fit's two lines are one term = 10.588...
  CHECK(cv.budget.nu_eff == Approx(uc2 * uc2 / (0.018 * 0.018 / 8.0)).epsilon(1e-12));
  // k = t_0.975(10) = 2.228 (NIST e-Handbook table), U = k u_c = 0.3206
  CHECK(std::abs(cv.budget.k - printed_t_critical(10, 0.975)) <= 0.0005);
  CHECK(cv.budget.expanded == Approx(cv.budget.k * cv.budget.u_c));
  CHECK(std::abs(cv.budget.expanded - 0.3206) < 0.0001);
  // shares: 0.01 / 0.020708 = 48.29 %, 38.63 %, 12.07 %, 1.006 %
  CHECK(lines[0].variance_share_percent == Approx(100 * 0.01 / uc2).epsilon(1e-12));
  CHECK(lines[3].variance_share_percent == Approx(100 * (0.0025 / 12) / uc2).epsilon(1e-12));
  // The inverse prediction it rests on is kept for reports (Fieller: well-determined slope).
  CHECK(cv.inverse.fieller_bounded);
  CHECK(cv.inverse.u == Approx(std::hypot(0.1, 0.2 * std::sqrt(0.2))).epsilon(1e-12));
}

TEST_CASE(
    "corrected value: averaging m -> infinity leaves the calibration, certificate and resolution floor") {
  const LineFit f = hand_fit();
  CorrectedValueInputs in;
  in.reference = reference_from_certificate(0.1, 2.0).value();
  in.resolution = 0.1;
  const TwoSidedT& t = t95();
  const CorrectedValue one = corrected_value(f, 120.0, 1, in, t).value();
  const CorrectedValue many = corrected_value(f, 120.0, 1e12, in, t).value();
  const double floor2 = 0.008 + 0.0025 + 0.0025 / 12.0;  // calibration + reference + resolution
  CHECK(many.budget.lines[0].contribution < 1e-6);
  CHECK(many.budget.u_c == Approx(std::sqrt(floor2)).epsilon(1e-9));
  CHECK(many.budget.lines[1].contribution == Approx(one.budget.lines[1].contribution));
  CHECK(many.budget.lines[2].contribution == one.budget.lines[2].contribution);
  CHECK(many.budget.lines[3].contribution == one.budget.lines[3].contribution);
  CHECK(one.budget.u_c > many.budget.u_c);
  // With the 1/m term gone the fit's share shrinks, so nu_eff moves: 0.010708^2 / (0.008^2 / 8) = 14.33.
  CHECK(many.budget.nu_eff == Approx(floor2 * floor2 / (0.008 * 0.008 / 8.0)).epsilon(1e-6));
  CHECK(std::abs(many.budget.k - printed_t_critical(14, 0.975)) <= 0.0005);
}

TEST_CASE("corrected value: the fit alone carries exactly the fit's dof; further components are appended") {
  const LineFit f = hand_fit();
  const TwoSidedT& t = t95();
  CorrectedValueInputs in;  // reference and resolution not stated: u = 0
  const CorrectedValue fit_only = corrected_value(f, 110.0, 3, in, t).value();
  CHECK(fit_only.budget.nu_eff == Approx(f.dof).epsilon(1e-12));
  CHECK(fit_only.budget.lines[2].contribution == 0);

  in.further.push_back({"installation effect", EvaluationType::type_b, 0.02, 1.0, 12, ""});
  const CorrectedValue more = corrected_value(f, 110.0, 3, in, t).value();
  REQUIRE(more.budget.lines.size() == 5);
  CHECK(more.budget.lines[4].name == "installation effect");
  CHECK(more.budget.u_c == Approx(std::hypot(fit_only.budget.u_c, 0.02)).epsilon(1e-12));
}

TEST_CASE("corrected value: unusable input is an error") {
  const LineFit f = hand_fit();
  const TwoSidedT& t = t95();
  CorrectedValueInputs in;
  CHECK_FALSE(corrected_value(f, NAN, 1, in, t).ok());
  CHECK_FALSE(corrected_value(f, 100, 0.5, in, t).ok());
  CHECK_FALSE(corrected_value(f, 100, INFINITY, in, t).ok());
  in.resolution = -0.1;
  CHECK_FALSE(corrected_value(f, 100, 1, in, t).ok());
  in.resolution = 0;
  in.reference.u = -1;
  CHECK_FALSE(corrected_value(f, 100, 1, in, t).ok());
  CHECK_FALSE(reference_from_certificate(0.1, 0).ok());
  CHECK_FALSE(reference_from_certificate(-0.1, 2).ok());
  LineFit flat = f;
  flat.b1 = 0;
  in.reference.u = 0;
  const auto r = corrected_value(flat, 100, 1, in, t);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().message.find("slope is zero") != std::string::npos);
}
