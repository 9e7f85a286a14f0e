#include "rigcal/stats/line_fit.hpp"

#include <cmath>
#include <cstdio>
#include <string>

namespace rigcal::stats {

namespace {

bool all_finite(const LineFit& f) {
  return std::isfinite(f.b0) && std::isfinite(f.b1) && std::isfinite(f.s) && std::isfinite(f.se_b0) &&
         std::isfinite(f.se_b1) && std::isfinite(f.cov_b0_b1) && std::isfinite(f.sxx);
}

Error too_few(double n, int needed) {
  char have[32];
  std::snprintf(have, sizeof have, "%.6g", n);
  return Error{"too few pairs for a fit with uncertainty: have " + std::string(have) + ", need at least " +
               std::to_string(needed)};
}

}  // namespace

double LineFit::predict(double x) const {
  return model == Model::line ? mean_y + b1 * (x - mean_x) : b1 * x;
}

double LineFit::leverage(double x) const {
  if (model == Model::through_origin) return x * x / sxx;
  const double d = x - mean_x;
  return 1.0 / sum_w + d * d / sxx;
}

double LineFit::reference_spread() const {
  if (model == Model::line) return sum_w > 0 ? std::sqrt(sxx / sum_w) : 0.0;
  const double centred = sxx - sum_w * mean_x * mean_x;  // sxx is uncentred through the origin
  return sum_w > 0 && centred > 0 ? std::sqrt(centred / sum_w) : 0.0;
}

Result<LineFit> summarize(const LineMoments& m, Model model) {
  LineFit f;
  f.model = model;
  f.count = m.count;
  f.n = m.a2 > 0 ? m.a1 * m.a1 / m.a2 : 0;
  // Without forgetting a1 == a2 == count exactly; keep n integral there despite rounding of a1^2/a2.
  if (m.a1 == m.a2) f.n = m.a1;
  const double scale = m.a2 > 0 ? m.a1 / m.a2 : 1.0;
  f.sum_w = scale * m.sum_w;
  f.mean_x = m.shift_x + m.dmean_x;
  f.mean_y = m.shift_y + m.dmean_y;
  const int params = model == Model::line ? 2 : 1;
  f.dof = f.n - params;
  if (m.count <= static_cast<std::uint64_t>(params) || !(f.dof > 0)) return too_few(f.n, params + 1);

  if (model == Model::line) {
    if (!(m.cxx > 0)) return Error{"no spread in the reference values: every pair has the same reference value"};
    f.sxx = scale * m.cxx;
    f.b1 = m.cxy / m.cxx;
    // The large cancellation (shift_y - b1 shift_x) is kept apart from the small one.
    f.b0 = (m.shift_y - f.b1 * m.shift_x) + (m.dmean_y - f.b1 * m.dmean_x);
    f.ssr = scale * m.ssr;
    const double s2 = f.ssr / f.dof;
    f.s = std::sqrt(s2);
    f.se_b1 = std::sqrt(s2 / f.sxx);
    f.se_b0 = std::sqrt(s2 * (1.0 / f.sum_w + f.mean_x * f.mean_x / f.sxx));
    f.cov_b0_b1 = -f.mean_x * s2 / f.sxx;
    const double denom = f.se_b0 * f.se_b1;
    f.corr_b0_b1 = denom > 0 ? f.cov_b0_b1 / denom : 0.0;
    if (m.cyy > 0) f.r2 = 1.0 - m.ssr / m.cyy;
  } else {
    // Uncentred sums rebuilt from the centred ones: both terms are non-negative for sxx and syy.
    const double sxx0 = m.cxx + m.sum_w * f.mean_x * f.mean_x;
    const double sxy0 = m.cxy + m.sum_w * f.mean_x * f.mean_y;
    const double syy0 = m.cyy + m.sum_w * f.mean_y * f.mean_y;
    if (!(sxx0 > 0)) return Error{"every reference value is zero: a line through the origin is undetermined"};
    f.sxx = scale * sxx0;
    f.b1 = sxy0 / sxx0;
    f.b0 = 0;
    // SSR about the origin line = SSR about the free line + the cost of the slope change + the cost of
    // forcing the line through the origin at the centroid; every term is non-negative.
    const double free_slope = m.cxx > 0 ? m.cxy / m.cxx : f.b1;
    const double ds = f.b1 - free_slope;
    const double off = f.mean_y - f.b1 * f.mean_x;
    const double ssr0 = m.ssr + m.cxx * ds * ds + m.sum_w * off * off;
    f.ssr = scale * ssr0;
    const double s2 = f.ssr / f.dof;
    f.s = std::sqrt(s2);
    f.se_b1 = std::sqrt(s2 / f.sxx);
    f.se_b0 = 0;
    f.cov_b0_b1 = 0;
    f.corr_b0_b1 = 0;
    if (syy0 > 0) f.r2 = 1.0 - ssr0 / syy0;
  }
  if (!all_finite(f)) return Error{"fit overflows double precision: readings too large in magnitude"};
  return f;
}

}  // namespace rigcal::stats
