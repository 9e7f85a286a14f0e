// CUSUM average run lengths by the Nystroem method (see arl.hpp for the equation and its sources).
#include <Eigen/Dense>
#include <algorithm>
#include <boost/math/quadrature/gauss.hpp>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "arl_limits.hpp"
#include "format_number.hpp"
#include "normal_tails.hpp"
#include "rigcal/detect/arl.hpp"

namespace rigcal::detect {
namespace {

using detail::normal_cdf;
using detail::normal_pdf;

// Panels at most this wide (in innovation standard deviations, the width of the kernel) keep the
// 10-point rule converged to ~1e-10: doubling the panels changes nothing at that level (tests).
constexpr double max_panel_width = 2.0;
using Rule = boost::math::quadrature::gauss<double, 10>;

struct Nodes {
  std::vector<double> x;
  std::vector<double> w;
};

// Composite Gauss-Legendre nodes on [0, h].
Nodes panel_nodes(double h) {
  const int panels = std::max(2, static_cast<int>(std::ceil(h / max_panel_width)));
  const double half = 0.5 * h / panels;
  Nodes n;
  for (int p = 0; p < panels; ++p) {
    const double mid = (2 * p + 1) * half;
    for (std::size_t i = 0; i < Rule::abscissa().size(); ++i) {
      const double a = Rule::abscissa()[i] * half;
      const double w = Rule::weights()[i] * half;
      n.x.push_back(mid - a);
      n.w.push_back(w);
      if (a != 0) {
        n.x.push_back(mid + a);
        n.w.push_back(w);
      }
    }
  }
  return n;
}

// Zero-state ARL of C+ for valid arguments. Unknowns: L(0) and L at the nodes; equation i is the
// integral equation at u = 0 (i = 0) or at node i - 1.
double upper_arl(double k, double h, double mu) {
  const Nodes n = panel_nodes(h);
  const Eigen::Index r = static_cast<Eigen::Index>(n.x.size());
  Eigen::MatrixXd a(r + 1, r + 1);
  for (Eigen::Index i = 0; i <= r; ++i) {
    const double u = i == 0 ? 0.0 : n.x[static_cast<std::size_t>(i - 1)];
    a(i, 0) = (i == 0 ? 1.0 : 0.0) - normal_cdf(k - u - mu);
    for (Eigen::Index j = 0; j < r; ++j) {
      const auto js = static_cast<std::size_t>(j);
      a(i, j + 1) = (i == j + 1 ? 1.0 : 0.0) - n.w[js] * normal_pdf(n.x[js] - u + k - mu);
    }
  }
  const Eigen::VectorXd arl = a.partialPivLu().solve(Eigen::VectorXd::Ones(r + 1));
  return detail::finite_arl_or_infinity(arl(0));
}

Status check_cusum_arguments(double k, double h, double mu) {
  if (!std::isfinite(k) || k < 0)
    return Error{"CUSUM reference value k must be finite and >= 0, got " + detail::format_number(k)};
  if (!std::isfinite(h) || h <= 0 || h > max_cusum_h) {
    return Error{"CUSUM decision interval h must be > 0 and <= " + detail::format_number(max_cusum_h) +
                 ", got " + detail::format_number(h)};
  }
  if (!std::isfinite(mu)) return Error{"the mean shift mu must be finite"};
  return ok_status();
}

}  // namespace

Result<double> cusum_arl_one_sided(double k, double h, double mu) {
  if (auto s = check_cusum_arguments(k, h, mu); !s) return s.error();
  return upper_arl(k, h, mu);
}

Result<double> cusum_arl_two_sided(double k, double h, double mu) {
  if (auto s = check_cusum_arguments(k, h, mu); !s) return s.error();
  const double up = upper_arl(k, h, mu);
  // In control the two sides are mirror images: one solve.
  const double down = mu == 0 ? up : upper_arl(k, h, -mu);
  return detail::combine_two_sided(up, down);
}

}  // namespace rigcal::detect
