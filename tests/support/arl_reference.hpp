#pragma once
// Independent ARL solvers for the tests: different numerical methods from the library's, so that
// agreement at ARLs no table prints (1e6 - 1e8) says something.
//  - CUSUM: the Markov chain of Brook & Evans (1972), cells of width w = h / (m - 1/2) centred on i w
//    (cell 0 holds the atom at 0), Richardson-extrapolated twice from m, 2m and 4m cells: its error
//    goes as c2 w^2 + c3 w^3 + ... (measured: the once-extrapolated error falls 8-fold per halving).
//  - EWMA: the Nystroem solution of Crowder's (1987) integral equation
//        L(u) = 1 + (1/lambda) integral_{-c}^{c} L(v) phi((v - (1 - lambda) u) / lambda - mu) dv,
//    composite Gauss-Legendre panels one lambda wide (the kernel's width), 10 nodes each.
#include <Eigen/Dense>
#include <boost/math/quadrature/gauss.hpp>
#include <cmath>
#include <numbers>
#include <vector>

namespace rigcal::test {

inline double std_normal_cdf(double x) { return 0.5 * std::erfc(-x / std::numbers::sqrt2); }
inline double std_normal_pdf(double x) {
  return std::exp(-0.5 * x * x) * std::numbers::inv_sqrtpi / std::numbers::sqrt2;
}

inline double brook_evans_chain(double k, double h, double mu, int m) {
  const double w = h / (m - 0.5);
  Eigen::MatrixXd a(m, m);
  for (int i = 0; i < m; ++i) {
    for (int j = 0; j < m; ++j) {
      const double upper = (j + 0.5) * w - i * w + k - mu;
      const double p = j == 0 ? std_normal_cdf(upper) : std_normal_cdf(upper) - std_normal_cdf(upper - w);
      a(i, j) = (i == j ? 1.0 : 0.0) - p;
    }
  }
  return a.partialPivLu().solve(Eigen::VectorXd::Ones(m))(0);
}

inline double brook_evans_upper_arl(double k, double h, double mu, int m) {
  const double a1 = brook_evans_chain(k, h, mu, m);
  const double a2 = brook_evans_chain(k, h, mu, 2 * m);
  const double a4 = brook_evans_chain(k, h, mu, 4 * m);
  const double r1 = (4.0 * a2 - a1) / 3.0, r2 = (4.0 * a4 - a2) / 3.0;
  return (8.0 * r2 - r1) / 7.0;
}

inline double ewma_nystroem_arl(double lambda, double L, double mu) {
  using Rule = boost::math::quadrature::gauss<double, 10>;
  const double c = L * std::sqrt(lambda / (2.0 - lambda));
  const int panels = static_cast<int>(std::ceil(2.0 * c / lambda));
  const double half = c / panels;
  std::vector<double> x, w;
  for (int p = 0; p < panels; ++p) {
    const double mid = -c + (2 * p + 1) * half;
    for (std::size_t i = 0; i < Rule::abscissa().size(); ++i) {
      const double a = Rule::abscissa()[i] * half;
      x.push_back(mid - a);
      w.push_back(Rule::weights()[i] * half);
      if (a != 0) {
        x.push_back(mid + a);
        w.push_back(Rule::weights()[i] * half);
      }
    }
  }
  const auto n = static_cast<Eigen::Index>(x.size());
  auto kernel = [&](double u, std::size_t j) {
    return w[j] / lambda * std_normal_pdf((x[j] - (1.0 - lambda) * u) / lambda - mu);
  };
  Eigen::MatrixXd a(n, n);
  for (Eigen::Index i = 0; i < n; ++i) {
    for (Eigen::Index j = 0; j < n; ++j) {
      a(i, j) = (i == j ? 1.0 : 0.0) - kernel(x[static_cast<std::size_t>(i)], static_cast<std::size_t>(j));
    }
  }
  const Eigen::VectorXd at_nodes = a.partialPivLu().solve(Eigen::VectorXd::Ones(n));
  double from_zero = 1.0;
  for (Eigen::Index j = 0; j < n; ++j) from_zero += kernel(0.0, static_cast<std::size_t>(j)) * at_nodes(j);
  return from_zero;
}

}  // namespace rigcal::test
