// rigcal_core_bench: cost of the calibration core's hot paths, in nanoseconds per operation.
//
//   rigcal_core_bench [--pairs N] [--repeat R]
//
// Measures one pair update under each memory policy, and reading a state's summary, intervals and
// joint certificate test. Inputs are generated before timing (fixed seed); each figure is the best of
// R repeats (the least disturbed by the rest of the machine). Not a test: no pass/fail.
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal::stats;
using clock_type = std::chrono::steady_clock;

namespace {

double sink = 0;  // keeps results observable so the optimiser cannot drop the work

struct Data {
  std::vector<double> x, y, w;
};

Data make_data(std::size_t n) {
  std::mt19937_64 rng(42);
  std::uniform_real_distribution<double> ref(20.0, 180.0), wd(0.5, 2.0);
  std::normal_distribution<double> noise(0.0, 0.05);
  Data d;
  for (std::size_t i = 0; i < n; ++i) {
    d.x.push_back(ref(rng));
    d.y.push_back(0.12 + 1.0015 * d.x.back() + noise(rng));
    d.w.push_back(wd(rng));
  }
  return d;
}

template <class F>
double best_ns_per_op(std::size_t ops, int repeat, F&& body) {
  double best = 1e300;
  for (int r = 0; r < repeat; ++r) {
    const auto t0 = clock_type::now();
    body();
    const double ns = std::chrono::duration<double, std::nano>(clock_type::now() - t0).count();
    best = std::min(best, ns / static_cast<double>(ops));
  }
  return best;
}

double bench_updates(const Data& d, MemoryPolicy policy, bool weighted, int repeat) {
  return best_ns_per_op(d.x.size(), repeat, [&] {
    StreamingLineFit fit(policy, weighted);
    if (weighted)
      for (std::size_t i = 0; i < d.x.size(); ++i) fit.add(d.x[i], d.y[i], d.w[i]);
    else
      for (std::size_t i = 0; i < d.x.size(); ++i) fit.add(d.x[i], d.y[i]);
    sink += fit.moments().cxy;
  });
}

}  // namespace

int main(int argc, char** argv) {
  std::size_t pairs = 10'000'000;
  int repeat = 5;
  for (int i = 1; i + 1 < argc; i += 2) {
    if (!std::strcmp(argv[i], "--pairs")) pairs = std::strtoull(argv[i + 1], nullptr, 10);
    if (!std::strcmp(argv[i], "--repeat")) repeat = std::atoi(argv[i + 1]);
  }
  const Data d = make_data(pairs);
  std::printf("rigcal core benchmark: %zu pairs per run, best of %d runs\n\n", pairs, repeat);
  std::printf("%-44s %10s %14s\n", "operation", "ns/op", "million ops/s");
  auto row = [](const char* name, double ns) { std::printf("%-44s %10.2f %14.1f\n", name, ns, 1e3 / ns); };

  row("update, cumulative", bench_updates(d, MemoryPolicy::cumulative(), false, repeat));
  row("update, cumulative, weighted", bench_updates(d, MemoryPolicy::cumulative(), true, repeat));
  row("update, window 100", bench_updates(d, MemoryPolicy::window(100), false, repeat));
  row("update, window 10000", bench_updates(d, MemoryPolicy::window(10000), false, repeat));
  row("update, window 10000, weighted", bench_updates(d, MemoryPolicy::window(10000), true, repeat));
  row("update, forgetting 0.999", bench_updates(d, MemoryPolicy::forgetting(0.999), false, repeat));

  // Reading a state: vary the state between reads so nothing is hoisted out of the loop.
  const std::size_t reads = std::min<std::size_t>(pairs, 2'000'000);
  std::vector<LineMoments> states;
  {
    StreamingLineFit fit(MemoryPolicy::window(500));
    for (std::size_t i = 0; i < reads; ++i) {
      fit.add(d.x[i], d.y[i]);
      if (i % (reads / 1000) == 0 && i > 10) states.push_back(fit.moments());
    }
  }
  const TwoSidedT t(0.95);
  const CertifiedLine cert{0.1, 1.0015, 0.01, 0.0002, 0};
  row("read summary (LineFit)", best_ns_per_op(reads, repeat, [&] {
        for (std::size_t i = 0; i < reads; ++i) sink += summarize(states[i % states.size()], Model::line)->b1;
      }));
  row("read summary + coefficient intervals", best_ns_per_op(reads, repeat, [&] {
        for (std::size_t i = 0; i < reads; ++i) {
          auto f = summarize(states[i % states.size()], Model::line);
          sink += coefficient_intervals(f.value(), t).b1.hi;
        }
      }));
  row("read summary + intervals + joint test", best_ns_per_op(reads, repeat, [&] {
        for (std::size_t i = 0; i < reads; ++i) {
          auto f = summarize(states[i % states.size()], Model::line);
          sink += coefficient_intervals(f.value(), t).b1.hi;
          sink += judge_against_certificate(f.value(), cert, t, true).joint_statistic;
        }
      }));
  row("read summary + inverse prediction (m = 10)", best_ns_per_op(reads, repeat, [&] {
        for (std::size_t i = 0; i < reads; ++i) {
          auto f = summarize(states[i % states.size()], Model::line);
          sink += inverse_predict(f.value(), 100.0, 10, t)->u;
        }
      }));
  std::printf("\n(checksum %g)\n", sink);
  return 0;
}
