// rigcal_bench_refit_eigen: the conventional alternative in C++. After each new pair, refit
// ordinary least squares on the current window from scratch: Householder QR of the W x 2 design
// matrix [1 x], coefficients, and the residual standard deviation (what the interval detector and
// the screening need from every fit). Same values and seed as the generator. The window is full
// before timing; --updates refits are timed and the rate is per pair (best of --repeat).
//   rigcal_bench_refit_eigen --window W --updates N [--repeat R]
#include <Eigen/Dense>
#include <random>

#include "bench_common.hpp"

using namespace rigcal::bench;

int main(int argc, char** argv) {
  const Args args(argc, argv);
  args.check_known({"window", "updates", "repeat", "seed"});
  const auto window = static_cast<Eigen::Index>(args.count("window", 100));
  const std::size_t updates = args.count("updates", 2000);
  const int repeat = static_cast<int>(args.count("repeat", 3));
  std::mt19937_64 rng(args.count("seed", 1));
  std::uniform_real_distribution<double> ref(20.0, 180.0);
  std::normal_distribution<double> noise(0.0, 0.03);
  const std::size_t total = static_cast<std::size_t>(window) + updates;
  std::vector<double> xs(total), ys(total);
  for (std::size_t i = 0; i < total; ++i) {
    xs[i] = ref(rng);
    ys[i] = xs[i] + noise(rng);
  }
  double best = 0, sink = 0;
  Eigen::MatrixXd a(window, 2);
  Eigen::VectorXd b(window);
  for (int r = 0; r < repeat; ++r) {
    const double t0 = mono_s();
    for (std::size_t u = 0; u < updates; ++u) {
      // The window after pair window + u arrived: pairs u+1 .. u+window.
      for (Eigen::Index i = 0; i < window; ++i) {
        a(i, 0) = 1.0;
        a(i, 1) = xs[u + 1 + static_cast<std::size_t>(i)];
        b(i) = ys[u + 1 + static_cast<std::size_t>(i)];
      }
      const Eigen::HouseholderQR<Eigen::MatrixXd> qr(a);
      const Eigen::VectorXd coef = qr.solve(b);
      const double ssr = (b - a * coef).squaredNorm();
      sink += coef(1) + std::sqrt(ssr / static_cast<double>(window - 2));
    }
    best = std::max(best, static_cast<double>(updates) / (mono_s() - t0));
  }
  put("window", static_cast<std::uint64_t>(window));
  put("updates", static_cast<std::uint64_t>(updates));
  put("refit_per_s", best);
  put("checksum", sink);
  return 0;
}
