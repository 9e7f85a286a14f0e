// The EWMA Markov chain (see ewma_chain.hpp and arl.hpp).
#include "ewma_chain.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "arl_limits.hpp"
#include "normal_tails.hpp"

namespace rigcal::detect::detail {
namespace {

// A cell at most this fraction of lambda wide (lambda is the standard deviation of the step lambda z
// that moves the statistic) keeps the extrapolated error near 1e-5 at ARL0 ~ 500 and below 1e-3 at
// ARL0 ~ 1e10. The bounds keep tiny charts honest and small lambdas affordable.
constexpr double max_cell_over_lambda = 0.2;
constexpr int min_cells = 31;
constexpr int max_cells = 301;
// Beyond 9 standard deviations a normal tail is below 1e-19: those transitions are left at zero,
// which makes building the matrix cost O(cells) per row instead of O(cells^2) for small lambda.
constexpr double negligible_z = 9.0;

// P[i][j] = P(cell j's bounds contain (1 - lambda) c_i + lambda z), z ~ N(mu, 1), c_i cell i's centre.
Eigen::MatrixXd transitions(double lambda, double limit, double mu, int m) {
  const double width = 2.0 * limit / m;
  Eigen::MatrixXd p = Eigen::MatrixXd::Zero(m, m);
  std::vector<double> arg(static_cast<std::size_t>(m) + 1);
  std::vector<NormalTails> tail(arg.size());
  for (int i = 0; i < m; ++i) {
    const double centre = -limit + (i + 0.5) * width;
    // Bounds j whose standardised distance from the step's mean is within negligible_z.
    const double offset = (1.0 - lambda) * centre + limit;
    const auto first = static_cast<std::size_t>(
        std::clamp(std::floor(((mu - negligible_z) * lambda + offset) / width), 0.0, static_cast<double>(m)));
    const auto last = static_cast<std::size_t>(
        std::clamp(std::ceil(((mu + negligible_z) * lambda + offset) / width), 0.0, static_cast<double>(m)));
    for (std::size_t j = first; j <= last; ++j) {
      const double bound = -limit + static_cast<double>(j) * width;
      arg[j] = (bound - (1.0 - lambda) * centre) / lambda - mu;
      tail[j] = normal_tails(arg[j]);
    }
    for (std::size_t j = first; j < last; ++j) {
      p(i, static_cast<Eigen::Index>(j)) = normal_interval(arg[j], tail[j], arg[j + 1], tail[j + 1]);
    }
  }
  return p;
}

}  // namespace

int ewma_coarse_cells(double lambda, double limit) {
  const double cells = 2.0 * limit / (max_cell_over_lambda * lambda);
  const int m = std::clamp(static_cast<int>(std::ceil(cells)), min_cells, max_cells);
  return m % 2 == 1 ? m : m + 1;
}

// In control the chain is symmetric about 0, so the ARL of cell i equals that of cell m-1-i: folding
// mirror cells together halves the unknowns (an eighth of the elimination) with no approximation.
double ewma_chain_arl(double lambda, double limit, double mu, int cells) {
  const Eigen::MatrixXd p = transitions(lambda, limit, mu, cells);
  const int mid = (cells - 1) / 2;
  if (mu != 0) {
    const Eigen::MatrixXd a = Eigen::MatrixXd::Identity(cells, cells) - p;
    return a.partialPivLu().solve(Eigen::VectorXd::Ones(cells))(mid);
  }
  Eigen::MatrixXd a(mid + 1, mid + 1);
  for (int i = 0; i <= mid; ++i) {
    for (int j = 0; j <= mid; ++j) {
      const double mirror = j == mid ? 0.0 : p(i, cells - 1 - j);
      a(i, j) = (i == j ? 1.0 : 0.0) - p(i, j) - mirror;
    }
  }
  return a.partialPivLu().solve(Eigen::VectorXd::Ones(mid + 1))(mid);
}

double ewma_extrapolated_arl(double lambda, double limit, double mu, int coarse_cells) {
  const int m1 = coarse_cells;
  const int m2 = 2 * m1 + 1;
  const double a1 = finite_arl_or_infinity(ewma_chain_arl(lambda, limit, mu, m1));
  const double a2 = finite_arl_or_infinity(ewma_chain_arl(lambda, limit, mu, m2));
  if (std::isinf(a1) || std::isinf(a2)) return std::numeric_limits<double>::infinity();
  // Error ~ c / m^2: eliminate c between the two chains.
  const double q1 = static_cast<double>(m1) * m1;
  const double q2 = static_cast<double>(m2) * m2;
  return finite_arl_or_infinity((q2 * a2 - q1 * a1) / (q2 - q1));
}

}  // namespace rigcal::detect::detail
