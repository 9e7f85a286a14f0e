#include "rigcal/stats/batch_fit.hpp"

#include <Eigen/Dense>
#include <cmath>

namespace rigcal::stats {

namespace {
using Real = long double;
using Matrix = Eigen::Matrix<Real, Eigen::Dynamic, Eigen::Dynamic>;
using Vector = Eigen::Matrix<Real, Eigen::Dynamic, 1>;
}  // namespace

Result<LineFit> batch_fit(std::span<const double> x, std::span<const double> y, std::span<const double> w,
                          Model model) {
  const auto n = static_cast<Eigen::Index>(x.size());
  const bool line = model == Model::line;
  const int params = line ? 2 : 1;
  if (n < params + 1) return Error{"too few pairs"};
  auto weight = [&](Eigen::Index i) -> Real { return w.empty() ? 1.0L : static_cast<Real>(w[i]); };

  Real sw = 0, mx = 0, my = 0;
  for (Eigen::Index i = 0; i < n; ++i) {
    sw += weight(i);
    mx += weight(i) * x[i];
    my += weight(i) * y[i];
  }
  mx /= sw;
  my /= sw;
  if (!line) mx = my = 0;  // the origin model is not centred

  Matrix design(n, params);
  Vector rhs(n);
  for (Eigen::Index i = 0; i < n; ++i) {
    const Real r = std::sqrt(weight(i));
    if (line) {
      design(i, 0) = r;
      design(i, 1) = r * (x[i] - mx);
    } else {
      design(i, 0) = r * x[i];
    }
    rhs(i) = r * (y[i] - my);
  }
  Eigen::HouseholderQR<Matrix> qr(design);
  const Matrix r_upper = qr.matrixQR().topRows(params).template triangularView<Eigen::Upper>();
  if (std::abs(r_upper(params - 1, params - 1)) == 0) return Error{"design matrix is singular"};
  const Vector beta = qr.solve(rhs);
  const Vector resid = rhs - design * beta;
  const Real ssr = resid.squaredNorm();
  const Real dof = static_cast<Real>(n - params);
  const Real s2 = ssr / dof;
  const Matrix r_inv = r_upper.inverse();
  const Matrix cov = s2 * r_inv * r_inv.transpose();  // (X'WX)^-1 s^2 in centred coordinates

  LineFit f;
  f.model = model;
  f.count = static_cast<std::uint64_t>(n);
  f.n = static_cast<double>(n);
  f.dof = static_cast<double>(dof);
  f.ssr = static_cast<double>(ssr);
  f.s = static_cast<double>(std::sqrt(s2));
  f.sum_w = static_cast<double>(sw);
  Real syy = 0;  // centred (line) or uncentred (origin) sum of squares of y
  for (Eigen::Index i = 0; i < n; ++i) syy += rhs(i) * rhs(i);
  if (line) {
    // Centred parameters: level a at mean_x and slope b; b0 = my + a - b mx.
    const Real a = beta(0), b = beta(1);
    f.mean_x = static_cast<double>(mx);
    f.mean_y = static_cast<double>(my + a);
    f.b1 = static_cast<double>(b);
    f.b0 = static_cast<double>(my + a - b * mx);
    const Real var_a = cov(0, 0), var_b = cov(1, 1), cov_ab = cov(0, 1);
    const Real var_b0 = var_a + mx * mx * var_b - 2 * mx * cov_ab;
    const Real cov_b0b1 = cov_ab - mx * var_b;
    f.se_b0 = static_cast<double>(std::sqrt(var_b0));
    f.se_b1 = static_cast<double>(std::sqrt(var_b));
    f.cov_b0_b1 = static_cast<double>(cov_b0b1);
    f.corr_b0_b1 = static_cast<double>(cov_b0b1 / std::sqrt(var_b0 * var_b));
    Real sxx = 0;
    for (Eigen::Index i = 0; i < n; ++i) sxx += weight(i) * (x[i] - mx) * (x[i] - mx);
    f.sxx = static_cast<double>(sxx);
  } else {
    Real sxx = 0, sx = 0, sy = 0;
    for (Eigen::Index i = 0; i < n; ++i) {
      sxx += weight(i) * x[i] * x[i];
      sx += weight(i) * x[i];
      sy += weight(i) * y[i];
    }
    f.mean_x = static_cast<double>(sx / sw);
    f.mean_y = static_cast<double>(sy / sw);
    f.b1 = static_cast<double>(beta(0));
    f.se_b1 = static_cast<double>(std::sqrt(cov(0, 0)));
    f.sxx = static_cast<double>(sxx);
  }
  if (syy > 0) f.r2 = static_cast<double>(1 - ssr / syy);
  return f;
}

}  // namespace rigcal::stats
