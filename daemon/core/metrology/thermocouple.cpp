#include "rigcal/metrology/thermocouple.hpp"

#include <array>
#include <cmath>
#include <span>
#include <string>

#include "monotone_root.hpp"
#include "number_text.hpp"

namespace rigcal::metrology {

namespace {

// ---- Coefficients ---------------------------------------------------------------------------------
// ITS-90 reference functions and inverse polynomials as published in NIST Monograph 175 (1993) and
// NIST Standard Reference Database 60 (srdata.nist.gov/its90, allcoeff.tab and type_?.tab), identical
// to IEC 60584-1:2013. Digits as printed there (transcribed from tests/data/its90_thermocouple_type_?.coef,
// which names the copies used; the tests re-read that file and compare).
// Forward: E/mV = sum c_i t^i, t in degC. Inverse: t/degC = sum d_i E^i, E in mV.

constexpr std::array<double, 11> k_forward_below_0 = {
    // -270 .. 0 degC
    0.000000000000E+00,  0.394501280250E-01,  0.236223735980E-04,  -0.328589067840E-06,
    -0.499048287770E-08, -0.675090591730E-10, -0.574103274280E-12, -0.310888728940E-14,
    -0.104516093650E-16, -0.198892668780E-19, -0.163226974860E-22,
};
constexpr std::array<double, 10> k_forward_above_0 = {
    // 0 .. 1372 degC, plus the exponential term
    -0.176004136860E-01, 0.389212049750E-01, 0.185587700320E-04,  -0.994575928740E-07, 0.318409457190E-09,
    -0.560728448890E-12, 0.560750590590E-15, -0.320207200030E-18, 0.971511471520E-22,  -0.121047212750E-25,
};
// Type K, t >= 0: E += a0 exp(a1 (t - a2)^2).
constexpr double k_a0_mv = 0.118597600000E+00;
constexpr double k_a1_per_c2 = -0.118343200000E-03;
constexpr double k_a2_c = 0.126968600000E+03;

constexpr std::array<double, 9> k_inverse_0 = {
    // -5.891 .. 0 mV, -200 .. 0 degC
    0.0000000E+00,  2.5173462E+01,  -1.1662878E+00, -1.0833638E+00, -8.9773540E-01,
    -3.7342377E-01, -8.6632643E-02, -1.0450598E-02, -5.1920577E-04,
};
constexpr std::array<double, 10> k_inverse_1 = {
    // 0 .. 20.644 mV, 0 .. 500 degC
    0.000000E+00,  2.508355E+01, 7.860106E-02,  -2.503131E-01, 8.315270E-02,
    -1.228034E-02, 9.804036E-04, -4.413030E-05, 1.057734E-06,  -1.052755E-08,
};
constexpr std::array<double, 7> k_inverse_2 = {
    // 20.644 .. 54.886 mV, 500 .. 1372 degC
    -1.318058E+02, 4.830222E+01, -1.646031E+00, 5.464731E-02, -9.650715E-04, 8.802193E-06, -3.110810E-08,
};

constexpr std::array<double, 9> j_forward_below_760 = {
    // -210 .. 760 degC
    0.000000000000E+00,  0.503811878150E-01, 0.304758369300E-04,  -0.856810657200E-07, 0.132281952950E-09,
    -0.170529583370E-12, 0.209480906970E-15, -0.125383953360E-18, 0.156317256970E-22,
};
constexpr std::array<double, 6> j_forward_above_760 = {
    // 760 .. 1200 degC
    0.296456256810E+03,  -0.149761277860E+01, 0.317871039240E-02,
    -0.318476867010E-05, 0.157208190040E-08,  -0.306913690560E-12,
};
constexpr std::array<double, 9> j_inverse_0 = {
    // -8.095 .. 0 mV, -210 .. 0 degC
    0.0000000E+00,  1.9528268E+01,  -1.2286185E+00, -1.0752178E+00, -5.9086933E-01,
    -1.7256713E-01, -2.8131513E-02, -2.3963370E-03, -8.3823321E-05,
};
constexpr std::array<double, 8> j_inverse_1 = {
    // 0 .. 42.919 mV, 0 .. 760 degC
    0.000000E+00,  1.978425E+01, -2.001204E-01, 1.036969E-02,
    -2.549687E-04, 3.585153E-06, -5.344285E-08, 5.099890E-10,
};
constexpr std::array<double, 6> j_inverse_2 = {
    // 42.919 .. 69.553 mV, 760 .. 1200 degC
    -3.11358187E+03, 3.00543684E+02, -9.94773230E+00, 1.70276630E-01, -1.43033468E-03, 4.73886084E-06,
};

constexpr std::array<double, 15> t_forward_below_0 = {
    // -270 .. 0 degC
    0.000000000000E+00, 0.387481063640E-01, 0.441944343470E-04, 0.118443231050E-06, 0.200329735540E-07,
    0.901380195590E-09, 0.226511565930E-10, 0.360711542050E-12, 0.384939398830E-14, 0.282135219250E-16,
    0.142515947790E-18, 0.487686622860E-21, 0.107955392700E-23, 0.139450270620E-26, 0.797951539270E-30,
};
constexpr std::array<double, 9> t_forward_above_0 = {
    // 0 .. 400 degC
    0.000000000000E+00, 0.387481063640E-01,  0.332922278800E-04, 0.206182434040E-06,  -0.218822568460E-08,
    0.109968809280E-10, -0.308157587720E-13, 0.454791352900E-16, -0.275129016730E-19,
};
constexpr std::array<double, 8> t_inverse_0 = {
    // -5.603 .. 0 mV, -200 .. 0 degC
    0.0000000E+00, 2.5949192E+01, -2.1316967E-01, 7.9018692E-01,
    4.2527777E-01, 1.3304473E-01, 2.0241446E-02,  1.2668171E-03,
};
constexpr std::array<double, 7> t_inverse_1 = {
    // 0 .. 20.872 mV, 0 .. 400 degC
    0.000000E+00, 2.592800E+01, -7.602961E-01, 4.637791E-02, -2.165394E-03, 6.048144E-05, -7.293422E-07,
};

// ---- Tables per type ------------------------------------------------------------------------------

struct ForwardPiece {
  double t_lo_c;  // the piece covers t_lo_c <= t < t_hi_c (the last piece includes t_hi_c)
  double t_hi_c;
  std::span<const double> c;
  bool k_exponential;
};

struct InversePiece {
  double t_lo_c;  // published temperature range of the inverse subrange
  double t_hi_c;
  double e_hi_mv;  // printed upper emf limit, used only to choose between adjacent subranges
  std::span<const double> d;
};

struct TypeTable {
  std::string_view name;
  std::span<const ForwardPiece> forward;
  std::span<const InversePiece> inverse;
};

constexpr std::array<ForwardPiece, 2> k_forward = {{
    {-270.0, 0.0, k_forward_below_0, false},
    {0.0, 1372.0, k_forward_above_0, true},
}};
constexpr std::array<InversePiece, 3> k_inverse = {{
    {-200.0, 0.0, 0.0, k_inverse_0},
    {0.0, 500.0, 20.644, k_inverse_1},
    {500.0, 1372.0, 54.886, k_inverse_2},
}};
constexpr std::array<ForwardPiece, 2> j_forward = {{
    {-210.0, 760.0, j_forward_below_760, false},
    {760.0, 1200.0, j_forward_above_760, false},
}};
constexpr std::array<InversePiece, 3> j_inverse = {{
    {-210.0, 0.0, 0.0, j_inverse_0},
    {0.0, 760.0, 42.919, j_inverse_1},
    {760.0, 1200.0, 69.553, j_inverse_2},
}};
constexpr std::array<ForwardPiece, 2> t_forward = {{
    {-270.0, 0.0, t_forward_below_0, false},
    {0.0, 400.0, t_forward_above_0, false},
}};
constexpr std::array<InversePiece, 2> t_inverse = {{
    {-200.0, 0.0, 0.0, t_inverse_0},
    {0.0, 400.0, 20.872, t_inverse_1},
}};

const TypeTable& table(ThermocoupleType type) {
  static constexpr TypeTable k{"K", k_forward, k_inverse};
  static constexpr TypeTable j{"J", j_forward, j_inverse};
  static constexpr TypeTable t{"T", t_forward, t_inverse};
  switch (type) {
    case ThermocoupleType::K:
      return k;
    case ThermocoupleType::J:
      return j;
    case ThermocoupleType::T:
      return t;
  }
  return k;  // unreachable for a valid enumerator
}

// ---- Evaluation -----------------------------------------------------------------------------------

double horner(std::span<const double> c, double x) {
  double sum = 0.0;
  for (auto it = c.rbegin(); it != c.rend(); ++it) sum = sum * x + *it;
  return sum;
}

double horner_derivative(std::span<const double> c, double x) {
  double sum = 0.0;
  for (std::size_t i = c.size() - 1; i >= 1; --i) sum = sum * x + static_cast<double>(i) * c[i];
  return sum;
}

double min_c(const TypeTable& tt) { return tt.forward.front().t_lo_c; }
double max_c(const TypeTable& tt) { return tt.forward.back().t_hi_c; }

const ForwardPiece& forward_piece(const TypeTable& tt, double t) {
  for (const auto& p : tt.forward)
    if (t < p.t_hi_c) return p;
  return tt.forward.back();
}

// REQUIRES: t within the type's range.
double emf(const TypeTable& tt, double t) {
  const ForwardPiece& p = forward_piece(tt, t);
  double e = horner(p.c, t);
  if (p.k_exponential) e += k_a0_mv * std::exp(k_a1_per_c2 * (t - k_a2_c) * (t - k_a2_c));
  return e;
}

double seebeck(const TypeTable& tt, double t) {
  const ForwardPiece& p = forward_piece(tt, t);
  double s = horner_derivative(p.c, t);
  if (p.k_exponential) {
    s += k_a0_mv * std::exp(k_a1_per_c2 * (t - k_a2_c) * (t - k_a2_c)) * 2.0 * k_a1_per_c2 * (t - k_a2_c);
  }
  return s;
}

const InversePiece& inverse_piece(const TypeTable& tt, double e) {
  for (const auto& p : tt.inverse)
    if (e < p.e_hi_mv) return p;
  return tt.inverse.back();
}

bool in_temperature_range(const TypeTable& tt, double t) { return t >= min_c(tt) && t <= max_c(tt); }

std::string prefix(const TypeTable& tt) { return "type " + std::string(tt.name) + " thermocouple: "; }

std::string temperature_range_text(const TypeTable& tt) {
  return detail::number_text(min_c(tt)) + " .. " + detail::number_text(max_c(tt)) + " degC";
}

Error not_finite_error(const TypeTable& tt, std::string_view what, double v, std::string_view unit) {
  return Error{prefix(tt) + std::string(what) + " " + detail::number_text(v) + " " + std::string(unit) +
               " is not a finite number"};
}

Error temperature_error(const TypeTable& tt, std::string_view what, double t) {
  if (!std::isfinite(t)) return not_finite_error(tt, what, t, "degC");
  return Error{prefix(tt) + std::string(what) + " " + detail::number_text(t) +
               " degC is outside the ITS-90 reference function's range " + temperature_range_text(tt)};
}

std::string emf_range_text(double e_lo, double e_hi) {
  return detail::number_text(e_lo) + " .. " + detail::number_text(e_hi) + " mV";
}

Error emf_error(const TypeTable& tt, std::string_view what, double e, double e_lo, double e_hi) {
  if (!std::isfinite(e)) return not_finite_error(tt, what, e, "mV");
  return Error{prefix(tt) + std::string(what) + " " + detail::number_text(e) + " mV is outside the range " +
               emf_range_text(e_lo, e_hi)};
}

// The exact inverse for an emf already known to be inside the range.
Result<double> invert(const TypeTable& tt, double e) {
  const double t_inv_lo = tt.inverse.front().t_lo_c;
  double lo = min_c(tt);
  double hi = max_c(tt);
  double guess = 0.0;
  if (e >= emf(tt, t_inv_lo)) {
    guess = horner(inverse_piece(tt, e).d, e);
  } else {
    // Types K and T below -200 degC: no published inverse, but the bracket is known.
    hi = t_inv_lo;
    guess = 0.5 * (lo + hi);
  }
  const auto root = detail::increasing_root([&](double t) { return emf(tt, t) - e; },
                                            [&](double t) { return seebeck(tt, t); }, lo, hi, guess,
                                            {thermocouple_inverse_tolerance_mv, 0.0});
  if (!root)
    return Error{prefix(tt) + "Newton inverse did not converge for " + detail::number_text(e) + " mV"};
  return *root;
}

}  // namespace

std::string_view thermocouple_type_name(ThermocoupleType type) { return table(type).name; }

ThermocoupleRange thermocouple_range(ThermocoupleType type) {
  const TypeTable& tt = table(type);
  return {min_c(tt), max_c(tt), emf(tt, min_c(tt)), emf(tt, max_c(tt))};
}

Result<double> thermocouple_emf_mv(ThermocoupleType type, double t90_c) {
  const TypeTable& tt = table(type);
  if (!in_temperature_range(tt, t90_c)) return temperature_error(tt, "temperature", t90_c);
  return emf(tt, t90_c);
}

Result<double> thermocouple_temperature_c(ThermocoupleType type, double emf_mv) {
  const TypeTable& tt = table(type);
  const double e_lo = emf(tt, min_c(tt));
  const double e_hi = emf(tt, max_c(tt));
  if (!(emf_mv >= e_lo && emf_mv <= e_hi)) return emf_error(tt, "emf", emf_mv, e_lo, e_hi);
  return invert(tt, emf_mv);
}

Result<double> thermocouple_temperature_c(ThermocoupleType type, double measured_emf_mv,
                                          double cold_junction_c) {
  const TypeTable& tt = table(type);
  if (!in_temperature_range(tt, cold_junction_c)) {
    return temperature_error(tt, "cold-junction temperature", cold_junction_c);
  }
  if (!std::isfinite(measured_emf_mv)) return not_finite_error(tt, "measured emf", measured_emf_mv, "mV");
  const double compensated = measured_emf_mv + emf(tt, cold_junction_c);
  const double e_lo = emf(tt, min_c(tt));
  const double e_hi = emf(tt, max_c(tt));
  if (!(compensated >= e_lo && compensated <= e_hi)) {
    return Error{prefix(tt) + "measured emf " + detail::number_text(measured_emf_mv) +
                 " mV with the cold junction at " + detail::number_text(cold_junction_c) + " degC is " +
                 detail::number_text(compensated) + " mV against 0 degC, outside the range " +
                 emf_range_text(e_lo, e_hi)};
  }
  return invert(tt, compensated);
}

Result<double> thermocouple_temperature_inverse_polynomial_c(ThermocoupleType type, double emf_mv) {
  const TypeTable& tt = table(type);
  const double e_lo = emf(tt, tt.inverse.front().t_lo_c);
  const double e_hi = emf(tt, tt.inverse.back().t_hi_c);
  if (!(emf_mv >= e_lo && emf_mv <= e_hi)) {
    return emf_error(tt, "emf (inverse polynomial)", emf_mv, e_lo, e_hi);
  }
  return horner(inverse_piece(tt, emf_mv).d, emf_mv);
}

double thermocouple_seebeck_mv_per_c(ThermocoupleType type, double t90_c) {
  const TypeTable& tt = table(type);
  if (!in_temperature_range(tt, t90_c)) return std::nan("");
  return seebeck(tt, t90_c);
}

}  // namespace rigcal::metrology
