#include "rigcal/stats/line_accumulator.hpp"

#include <algorithm>
#include <cmath>

namespace rigcal::stats {

namespace {
// Residual sum of squares gained when a point at deviation (dx, dy) from the old means joins a state
// with co-moments (cxx, cxy), g = w W_old / W_new. Recursive least squares: g e^2 / (1 + g dx^2 / cxx),
// e = dy - b_old dx. With cxx == 0 the old line is undetermined: a point at the same x adds its scatter
// about the mean, a point elsewhere fixes the line through both and adds nothing.
double ssr_increment(double g, double dx, double dy, double cxx, double cxy) {
  if (cxx > 0) {
    // One division: g (dy cxx - cxy dx)^2 / (cxx (cxx + g dx^2)). The product of co-moments can
    // overflow for readings beyond ~1e77; fall back to the two-division form there.
    const double num = dy * cxx - cxy * dx;
    const double inc = g * num * num / (cxx * (cxx + g * dx * dx));
    if (std::isfinite(inc)) [[likely]]
      return inc;
    const double e = dy - cxy / cxx * dx;
    return g * e * e / (1.0 + g * dx * dx / cxx);
  }
  return dx == 0 ? g * dy * dy : 0.0;
}
}  // namespace

void LineAccumulator::add(double x, double y, double w) {
  const double w_old = m_.sum_w;
  m_.count += 1;
  m_.a1 += 1.0;
  m_.a2 += 1.0;
  if (w_old <= 0) {
    m_.sum_w = w;
    m_.shift_x = x;
    m_.shift_y = y;
    m_.dmean_x = m_.dmean_y = 0;
    m_.cxx = m_.cxy = m_.cyy = m_.ssr = 0;
    return;
  }
  const double w_new = w_old + w;
  const double dx = (x - m_.shift_x) - m_.dmean_x;
  const double dy = (y - m_.shift_y) - m_.dmean_y;
  const double f = w / w_new;
  const double g = w - w * f;  // = w W_old / W_new without forming the product of sums
  m_.ssr += ssr_increment(g, dx, dy, m_.cxx, m_.cxy);
  m_.sum_w = w_new;
  m_.dmean_x += f * dx;
  m_.dmean_y += f * dy;
  m_.cxx += g * dx * dx;
  m_.cxy += g * dx * dy;
  m_.cyy += g * dy * dy;
}

void LineAccumulator::remove(double x, double y, double w) {
  if (m_.count <= 1 || m_.sum_w - w <= 0) {
    reset();
    return;
  }
  const double w_full = m_.sum_w;
  const double w_rest = w_full - w;
  // Means of the remaining pairs, then the deviation of the removed pair from them: exactly the
  // quantities add() used when this pair joined a state equal to the remainder.
  const double sx = x - m_.shift_x;
  const double sy = y - m_.shift_y;
  const double f = w / w_rest;
  const double mean_x_rest = m_.dmean_x - f * (sx - m_.dmean_x);
  const double mean_y_rest = m_.dmean_y - f * (sy - m_.dmean_y);
  const double dx = sx - mean_x_rest;
  const double dy = sy - mean_y_rest;
  const double g = w * w_rest / w_full;
  const double cxx_rest = std::max(0.0, m_.cxx - g * dx * dx);
  const double cxy_rest = m_.cxy - g * dx * dy;
  const double cyy_rest = std::max(0.0, m_.cyy - g * dy * dy);
  const double ssr_rest =
      cxx_rest > 0 ? m_.ssr - ssr_increment(g, dx, dy, cxx_rest, cxy_rest) : cyy_rest;
  m_.count -= 1;
  m_.a1 -= 1.0;
  m_.a2 -= 1.0;
  m_.sum_w = w_rest;
  m_.dmean_x = mean_x_rest;
  m_.dmean_y = mean_y_rest;
  m_.cxx = cxx_rest;
  m_.cxy = cxy_rest;
  m_.cyy = cyy_rest;
  m_.ssr = std::clamp(ssr_rest, 0.0, cyy_rest);
}

void LineAccumulator::forget(double lambda) {
  m_.sum_w *= lambda;
  m_.cxx *= lambda;
  m_.cxy *= lambda;
  m_.cyy *= lambda;
  m_.ssr *= lambda;
  m_.a1 *= lambda;
  m_.a2 *= lambda * lambda;
}

void LineAccumulator::merge(const LineAccumulator& other) {
  const LineMoments& a = m_;
  const LineMoments& b = other.m_;
  if (b.count == 0) return;
  if (a.count == 0) {
    m_ = b;
    return;
  }
  LineMoments r;
  r.count = a.count + b.count;
  r.a1 = a.a1 + b.a1;
  r.a2 = a.a2 + b.a2;
  r.sum_w = a.sum_w + b.sum_w;
  // Work in a's shifted frame; b's means are moved into it once.
  r.shift_x = a.shift_x;
  r.shift_y = a.shift_y;
  const double dx = ((b.shift_x - a.shift_x) + b.dmean_x) - a.dmean_x;
  const double dy = ((b.shift_y - a.shift_y) + b.dmean_y) - a.dmean_y;
  const double fb = b.sum_w / r.sum_w;
  const double g = a.sum_w * fb;  // Wa Wb / W
  r.dmean_x = a.dmean_x + fb * dx;
  r.dmean_y = a.dmean_y + fb * dy;
  r.cxx = a.cxx + b.cxx + g * dx * dx;
  r.cxy = a.cxy + b.cxy + g * dx * dy;
  r.cyy = a.cyy + b.cyy + g * dy * dy;
  if (r.cxx > 0) {
    // Residuals about the common line: each part's own residuals, plus the disagreement of each part's
    // slope with the common slope, plus the offset of the two centroids from the common line.
    const double slope = r.cxy / r.cxx;
    auto slope_term = [slope](const LineMoments& p) {
      if (p.cxx <= 0) return 0.0;
      const double d = p.cxy / p.cxx - slope;
      return p.cxx * d * d;
    };
    const double offset = dy - slope * dx;
    r.ssr = a.ssr + b.ssr + slope_term(a) + slope_term(b) + g * offset * offset;
    r.ssr = std::min(r.ssr, r.cyy);
  } else {
    r.ssr = r.cyy;
  }
  m_ = r;
}

LineAccumulator LineAccumulator::from_moments(const LineMoments& m) {
  LineAccumulator acc;
  acc.m_ = m;
  return acc;
}

}  // namespace rigcal::stats
