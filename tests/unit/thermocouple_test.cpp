// ITS-90 thermocouple reference functions (NIST Monograph 175 / NIST SRD 60 / IEC 60584-1) against the
// published coefficients, tables and inverse error bands in tests/data (provenance in each file's header).
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "../support/reference_data.hpp"
#include "rigcal/metrology/thermocouple.hpp"

using namespace rigcal::metrology;
using rigcal::test::read_rows;

namespace {

ThermocoupleType type_of(const std::string& letter) {
  if (letter == "K") return ThermocoupleType::K;
  if (letter == "J") return ThermocoupleType::J;
  if (letter == "T") return ThermocoupleType::T;
  throw std::runtime_error("unknown thermocouple type " + letter);
}

std::string coef_file(ThermocoupleType type) {
  return "its90_thermocouple_type_" + std::string(thermocouple_type_name(type)) + ".coef";
}

// One polynomial of a .coef file: lines `fwd|inv lo hi i coefficient`.
struct FilePolynomial {
  double lo;
  double hi;
  std::vector<double> c;
};

std::vector<FilePolynomial> file_polynomials(ThermocoupleType type, const std::string& tag) {
  std::vector<FilePolynomial> out;
  for (const auto& row : read_rows(coef_file(type))) {
    if (row.at(0) != tag) continue;
    const double lo = std::stod(row.at(1));
    const double hi = std::stod(row.at(2));
    if (out.empty() || out.back().lo != lo) out.push_back({lo, hi, {}});
    REQUIRE(std::stoul(row.at(3)) == out.back().c.size());
    out.back().c.push_back(std::stod(row.at(4)));
  }
  return out;
}

// Published inverse error bands: `invrange E_lo E_hi t_lo t_hi err_lo err_hi`.
struct Band {
  double e_lo_mv, e_hi_mv, t_lo_c, t_hi_c, err_lo_c, err_hi_c;
};
std::vector<Band> published_bands(ThermocoupleType type) {
  std::vector<Band> out;
  for (const auto& row : read_rows(coef_file(type))) {
    if (row.at(0) != "invrange") continue;
    out.push_back({std::stod(row.at(1)), std::stod(row.at(2)), std::stod(row.at(3)), std::stod(row.at(4)),
                   std::stod(row.at(5)), std::stod(row.at(6))});
  }
  return out;
}

// sum c_i x^i by explicit powers (deliberately not Horner, the library's scheme), and sum |c_i x^i|,
// the scale of its rounding error.
struct PowerSum {
  double value = 0.0;
  double magnitude = 0.0;
};
PowerSum power_sum(const std::vector<double>& c, double x) {
  PowerSum s;
  for (std::size_t i = 0; i < c.size(); ++i) {
    const double term = c[i] * std::pow(x, static_cast<double>(i));
    s.value += term;
    s.magnitude += std::abs(term);
  }
  return s;
}

// Table check points: `type t E_table E_function provenance`.
struct CheckPoint {
  ThermocoupleType type;
  double t_c;
  double e_table_mv;
  double e_function_mv;
  std::string provenance;
};
std::vector<CheckPoint> check_points() {
  std::vector<CheckPoint> out;
  for (const auto& row : read_rows("its90_thermocouple_checkpoints.dat")) {
    out.push_back(
        {type_of(row.at(0)), std::stod(row.at(1)), std::stod(row.at(2)), std::stod(row.at(3)), row.at(4)});
  }
  return out;
}

long long in_table_digits(double e_mv) { return std::llround(e_mv * 1000.0); }  // table resolution 0.001 mV

constexpr ThermocoupleType all_types[] = {ThermocoupleType::K, ThermocoupleType::J, ThermocoupleType::T};

}  // namespace

TEST_CASE(
    "type K reference function equals the printed NIST 1 degC table at every check point (provenance a)") {
  int rows = 0;
  for (const auto& p : check_points()) {
    if (p.type != ThermocoupleType::K) continue;
    REQUIRE(p.provenance == "a");  // copied from a stored printed NIST Monograph 175 type K table
    const double e = thermocouple_emf_mv(p.type, p.t_c).value();
    INFO("type K, t = " << p.t_c << " degC, E = " << e << " mV, NIST table " << p.e_table_mv << " mV");
    CHECK(in_table_digits(e) == in_table_digits(p.e_table_mv));  // to the table's resolution, 0.001 mV
    CHECK(std::abs(e - p.e_function_mv) <= 0.5e-6);              // file's 6-decimal evaluation (computed)
    ++rows;
  }
  CHECK(rows == 10);
}

TEST_CASE(
    "types T and J reference functions equal their check points (provenance c: computed, "
    "NIST table values as remembered)") {
  int rows = 0;
  for (const auto& p : check_points()) {
    if (p.type == ThermocoupleType::K) continue;
    REQUIRE(p.provenance == "c");
    const double e = thermocouple_emf_mv(p.type, p.t_c).value();
    INFO("type " << thermocouple_type_name(p.type) << ", t = " << p.t_c << " degC, E = " << e << " mV");
    CHECK(in_table_digits(e) == in_table_digits(p.e_table_mv));
    CHECK(std::abs(e - p.e_function_mv) <= 0.5e-6);
    ++rows;
  }
  CHECK(rows == 18);
}

TEST_CASE("the library's coefficients are the NIST SRD 60 coefficients of the .coef files") {
  // Evaluating the file's polynomials independently must give the library's values to rounding
  // (1e-14 of the sum of |terms|, so one wrong digit of a 12-digit coefficient shows).
  for (ThermocoupleType type : all_types) {
    const auto fwd = file_polynomials(type, "fwd");
    const auto exp_rows = file_polynomials(type, "exp");  // type K only: a0, a1, a2
    REQUIRE(fwd.size() == 2);
    for (std::size_t piece = 0; piece < fwd.size(); ++piece) {
      const auto& p = fwd[piece];
      for (int k = 0; k <= 400; ++k) {
        const double t = p.lo + (p.hi - p.lo) * k / 400.0 - (piece == 0 && k == 400 ? 1e-9 : 0.0);
        PowerSum s = power_sum(p.c, t);
        if (!exp_rows.empty() && t >= exp_rows[0].lo) {
          const auto& a = exp_rows[0].c;
          s.value += a[0] * std::exp(a[1] * (t - a[2]) * (t - a[2]));
        }
        INFO("type " << thermocouple_type_name(type) << " forward at " << t << " degC");
        CHECK(std::abs(thermocouple_emf_mv(type, t).value() - s.value) <= 1e-14 * s.magnitude + 1e-15);
      }
    }
    const auto inv = file_polynomials(type, "inv");
    const auto bands = published_bands(type);
    REQUIRE(inv.size() == bands.size());
    for (std::size_t piece = 0; piece < inv.size(); ++piece) {
      // Inside both the printed emf limits and the emf of the published temperature limits.
      const double lo =
          std::max(inv[piece].lo, thermocouple_emf_mv(type, bands[piece].t_lo_c).value()) + 1e-9;
      const double hi =
          std::min(inv[piece].hi, thermocouple_emf_mv(type, bands[piece].t_hi_c).value()) - 1e-9;
      for (int k = 0; k <= 400; ++k) {
        const double e = lo + (hi - lo) * k / 400.0;
        const PowerSum s = power_sum(inv[piece].c, e);
        INFO("type " << thermocouple_type_name(type) << " inverse polynomial at " << e << " mV");
        CHECK(std::abs(thermocouple_temperature_inverse_polynomial_c(type, e).value() - s.value) <=
              1e-14 * s.magnitude + 1e-13);
      }
    }
  }
}

TEST_CASE("exact inverse recovers every tabulated temperature to the table's resolution in degC") {
  // E_table is E(t) rounded to 0.001 mV, at most 0.0005 mV off, i.e. 0.0005 mV / S(t) in temperature
  // (1 % allowed for the curvature over that interval).
  int inside = 0;
  int past_end = 0;
  for (const auto& p : check_points()) {
    const ThermocoupleRange range = thermocouple_range(p.type);
    INFO("type " << thermocouple_type_name(p.type) << ", t = " << p.t_c
                 << " degC, E_table = " << p.e_table_mv);
    const auto t = thermocouple_temperature_c(p.type, p.e_table_mv);
    if (p.e_table_mv < range.emf_min_mv || p.e_table_mv > range.emf_max_mv) {
      // K -270, T -270 and T 400 degC: rounding puts the printed emf just past the function's end,
      // where the contract is an error, not an extrapolation. The table is still consistent:
      const double end = p.e_table_mv < range.emf_min_mv ? range.emf_min_mv : range.emf_max_mv;
      CHECK(std::abs(p.e_table_mv - end) <= 0.0005);
      REQUIRE_FALSE(t.ok());
      CHECK(t.error().message.find("outside the range") != std::string::npos);
      ++past_end;
      continue;
    }
    REQUIRE(t.ok());
    const double resolution_c = 0.0005 / thermocouple_seebeck_mv_per_c(p.type, p.t_c);
    CHECK(std::abs(*t - p.t_c) <= 1.01 * resolution_c);
    ++inside;
  }
  CHECK(inside == 25);
  CHECK(past_end == 3);
}

TEST_CASE("round trip t -> E -> t is exact to 1e-6 degC over each type's full range (0.01 degC grid)") {
  for (ThermocoupleType type : all_types) {
    const ThermocoupleRange range = thermocouple_range(type);
    const long steps = std::lround((range.t_max_c - range.t_min_c) / 0.01);
    double worst_c = 0.0;
    for (long k = 0; k <= steps; ++k) {
      const double t = range.t_min_c +
                       (range.t_max_c - range.t_min_c) * static_cast<double>(k) / static_cast<double>(steps);
      const auto back = thermocouple_temperature_c(type, thermocouple_emf_mv(type, t).value());
      REQUIRE(back.ok());
      worst_c = std::max(worst_c, std::abs(*back - t));
    }
    INFO("type " << thermocouple_type_name(type) << ": worst round-trip error " << worst_c << " degC");
    CHECK(worst_c <= 1e-6);
  }
}

TEST_CASE("published inverse polynomials stay inside their published error bands (NIST SRD 60)") {
  // Each emf is judged against the band whose printed voltage range holds it (at a shared limit,
  // either band), the outermost band beyond the printed outer limits (E(-200 degC) = -5.891404 mV
  // for type K is printed -5.891). The bands are printed to 0.01 degC and so may be exceeded by up to
  // 0.005 degC: type J's first subrange peaks at +0.033 degC against a printed +0.03, type K's first
  // at +0.041 against +0.04.
  constexpr double printed_rounding_c = 0.005;
  for (ThermocoupleType type : all_types) {
    const auto bands = published_bands(type);
    std::vector<double> lowest(bands.size(), 1e9);
    std::vector<double> highest(bands.size(), -1e9);
    const double t_lo = bands.front().t_lo_c;
    const double t_hi = bands.back().t_hi_c;
    const long steps = std::lround((t_hi - t_lo) / 0.01);
    for (long k = 0; k <= steps; ++k) {
      const double t = t_lo + (t_hi - t_lo) * static_cast<double>(k) / static_cast<double>(steps);
      const double e = thermocouple_emf_mv(type, t).value();
      const double error_c = thermocouple_temperature_inverse_polynomial_c(type, e).value() - t;
      bool within_some_band = false;
      for (std::size_t b = 0; b < bands.size(); ++b) {
        const bool holds =
            (e >= bands[b].e_lo_mv || b == 0) && (e <= bands[b].e_hi_mv || b + 1 == bands.size());
        if (!holds) continue;
        within_some_band = within_some_band || (error_c >= bands[b].err_lo_c - printed_rounding_c &&
                                                error_c <= bands[b].err_hi_c + printed_rounding_c);
        lowest[b] = std::min(lowest[b], error_c);
        highest[b] = std::max(highest[b], error_c);
      }
      if (!within_some_band) {
        FAIL_CHECK("type " << thermocouple_type_name(type) << " at " << t
                           << " degC: inverse polynomial error " << error_c
                           << " degC is outside the published band");
      }
    }
    for (std::size_t b = 0; b < bands.size(); ++b) {
      INFO("type " << thermocouple_type_name(type) << " band " << b << ": error " << lowest[b] << " .. "
                   << highest[b] << " degC, published " << bands[b].err_lo_c << " .. " << bands[b].err_hi_c);
      CHECK(lowest[b] >= bands[b].err_lo_c - printed_rounding_c);
      CHECK(highest[b] <= bands[b].err_hi_c + printed_rounding_c);
    }
  }
}

TEST_CASE("an emf in the gap between type J's subranges at 760 degC converts to 760 degC") {
  // The two published polynomials differ by 7.5e-8 mV at 760 degC; no temperature has an emf in
  // between, and the Newton iteration once failed to converge there.
  const double below = thermocouple_emf_mv(ThermocoupleType::J, std::nextafter(760.0, 0.0)).value();
  const double above = thermocouple_emf_mv(ThermocoupleType::J, 760.0).value();
  REQUIRE(above - below > 1e-8);
  for (double e : {below, 0.5 * (below + above), above}) {
    const auto t = thermocouple_temperature_c(ThermocoupleType::J, e);
    REQUIRE(t.ok());
    CHECK(std::abs(*t - 760.0) <=
          (above - below) / thermocouple_seebeck_mv_per_c(ThermocoupleType::J, 760.0));
  }
}

TEST_CASE("cold-junction compensation adds the emf of the reference junction's temperature") {
  SECTION("type K junction at 25 degC, hot end at 100 degC") {
    const double measured = thermocouple_emf_mv(ThermocoupleType::K, 100.0).value() -
                            thermocouple_emf_mv(ThermocoupleType::K, 25.0).value();
    CHECK(thermocouple_temperature_c(ThermocoupleType::K, measured, 25.0).value() ==
          Approx(100.0).margin(1e-9));
    // Without compensation the same emf reads some 24 degC low: the error the compensation removes.
    CHECK(thermocouple_temperature_c(ThermocoupleType::K, measured).value() < 80.0);
  }
  SECTION("every type, junctions below and above 0 degC") {
    for (ThermocoupleType type : all_types) {
      for (double cj : {-20.0, 0.0, 23.5, 40.0}) {
        for (double t : {-150.0, 0.0, 150.0, 350.0}) {
          const double measured =
              thermocouple_emf_mv(type, t).value() - thermocouple_emf_mv(type, cj).value();
          CHECK(thermocouple_temperature_c(type, measured, cj).value() == Approx(t).margin(1e-8));
        }
      }
    }
  }
  SECTION("a junction at 0 degC is the uncompensated inverse") {
    CHECK(thermocouple_temperature_c(ThermocoupleType::T, 9.288, 0.0).value() ==
          thermocouple_temperature_c(ThermocoupleType::T, 9.288).value());
  }
  SECTION("errors name the cold junction or the compensated emf") {
    auto bad_cj = thermocouple_temperature_c(ThermocoupleType::T, 1.0, 500.0);
    REQUIRE_FALSE(bad_cj.ok());
    CHECK(bad_cj.error().message.find("cold-junction temperature 500 degC is outside") != std::string::npos);
    // 54.886 mV is within the type K range on its own, but not with a 25 degC junction added.
    auto too_hot = thermocouple_temperature_c(ThermocoupleType::K, 54.886, 25.0);
    REQUIRE_FALSE(too_hot.ok());
    CHECK(too_hot.error().message.find("with the cold junction at 25 degC") != std::string::npos);
    CHECK(too_hot.error().message.find("outside the range") != std::string::npos);
    CHECK_FALSE(thermocouple_temperature_c(ThermocoupleType::K, 1.0, std::nan("")).ok());
    CHECK_FALSE(thermocouple_temperature_c(ThermocoupleType::K, std::nan(""), 20.0).ok());
  }
}

TEST_CASE("Seebeck coefficient is the derivative of the reference function") {
  for (ThermocoupleType type : all_types) {
    const ThermocoupleRange range = thermocouple_range(type);
    // Start 10 degC in: at -270 degC the type T polynomial's rounding noise (~4e-11 mV) would swamp
    // a difference quotient of the tiny slope there.
    for (double t = range.t_min_c + 10.0; t < range.t_max_c - 1.0; t += 7.3) {
      const double h = 1e-2;
      const double central =
          (thermocouple_emf_mv(type, t + h).value() - thermocouple_emf_mv(type, t - h).value()) / (2 * h);
      INFO("type " << thermocouple_type_name(type) << " at " << t << " degC");
      CHECK(thermocouple_seebeck_mv_per_c(type, t) == Approx(central).epsilon(2e-6));
    }
  }
  // At 0 degC the slope is the first coefficient of the sub-zero polynomial (type K: 0.394501280250E-01
  // mV/degC in NIST SRD 60); the piece above 0 degC, with K's exponential term, must give the same.
  for (ThermocoupleType type : all_types) {
    const double c1 = file_polynomials(type, "fwd").at(0).c.at(1);
    CHECK(thermocouple_seebeck_mv_per_c(type, 0.0) == Approx(c1).epsilon(1e-8));
  }
}

TEST_CASE("thermocouple inputs outside the range or not finite give errors, never NaN") {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  for (ThermocoupleType type : all_types) {
    const ThermocoupleRange r = thermocouple_range(type);
    INFO("type " << thermocouple_type_name(type));
    for (double t : {r.t_min_c - 0.001, r.t_max_c + 0.001, 1e308, -1e308}) {
      auto e = thermocouple_emf_mv(type, t);
      REQUIRE_FALSE(e.ok());
      CHECK(e.error().message.find("outside the ITS-90 reference function's range") != std::string::npos);
      CHECK(std::isnan(thermocouple_seebeck_mv_per_c(type, t)));
    }
    for (double t : {nan, inf, -inf}) {
      auto e = thermocouple_emf_mv(type, t);
      REQUIRE_FALSE(e.ok());
      CHECK(e.error().message.find("is not a finite number") != std::string::npos);
    }
    CHECK(thermocouple_emf_mv(type, r.t_min_c).ok());
    CHECK(thermocouple_emf_mv(type, r.t_max_c).ok());
    for (double e : {r.emf_min_mv - 1e-6, r.emf_max_mv + 1e-6, 1e308, nan, inf, -inf}) {
      CHECK_FALSE(thermocouple_temperature_c(type, e).ok());
      CHECK_FALSE(thermocouple_temperature_inverse_polynomial_c(type, e).ok());
    }
    CHECK(thermocouple_temperature_c(type, r.emf_min_mv).value() == Approx(r.t_min_c).margin(1e-6));
    CHECK(thermocouple_temperature_c(type, r.emf_max_mv).value() == Approx(r.t_max_c).margin(1e-6));
    // Conversions that succeed are finite, whatever the input.
    for (double x : {-1e300, -10.0, -6.3, -0.0, 5e-324, 1e-300, 20.0, 60.0, 1e300}) {
      for (const auto& res : {thermocouple_emf_mv(type, x), thermocouple_temperature_c(type, x),
                              thermocouple_temperature_c(type, x, 25.0),
                              thermocouple_temperature_inverse_polynomial_c(type, x)}) {
        if (res.ok()) CHECK(std::isfinite(*res));
      }
    }
  }
  // Types K and T below -200 degC: inside the reference function, outside the published inverse.
  CHECK(thermocouple_temperature_c(ThermocoupleType::K, -6.2).ok());
  auto poly = thermocouple_temperature_inverse_polynomial_c(ThermocoupleType::K, -6.2);
  REQUIRE_FALSE(poly.ok());
  CHECK(poly.error().message.find("inverse polynomial") != std::string::npos);
}

TEST_CASE("thermocouple ranges and names") {
  CHECK(thermocouple_type_name(ThermocoupleType::K) == "K");
  CHECK(thermocouple_type_name(ThermocoupleType::J) == "J");
  CHECK(thermocouple_type_name(ThermocoupleType::T) == "T");
  // Limits of the reference functions per NIST Monograph 175 / IEC 60584-1.
  CHECK(thermocouple_range(ThermocoupleType::K).t_min_c == -270.0);
  CHECK(thermocouple_range(ThermocoupleType::K).t_max_c == 1372.0);
  CHECK(thermocouple_range(ThermocoupleType::J).t_min_c == -210.0);
  CHECK(thermocouple_range(ThermocoupleType::J).t_max_c == 1200.0);
  CHECK(thermocouple_range(ThermocoupleType::T).t_min_c == -270.0);
  CHECK(thermocouple_range(ThermocoupleType::T).t_max_c == 400.0);
}
