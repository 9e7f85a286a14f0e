// rigcal_bench_engine: the calibration engine alone, in process, with no I/O. From the same
// configuration file rigcald runs with and the same records the generator sends (bench_lines.hpp),
// it measures pair updates per second at four depths of the per-pair path:
//
//   accumulator   LineAccumulator::add: the streaming least-squares update and nothing else
//   window_fit    StreamingLineFit::add under the channel's window (adds the exact removal)
//   channel       ChannelEngine::on_pair: linearise, clock rule, outlier screen, fit, drift
//                 detector, alert machine, tolerance checks, averaging (events to a NullSink)
//   lookup        Engine::find(id) + on_pair: what rigcald's ingest does per record
//
// and the memory of the engine: bytes in use on the heap (mallinfo2) for the configuration and for
// the engine once every window is filled, per channel; and VmRSS growth for comparison (RSS also
// keeps what the YAML parser freed).
// Records go to channels round robin (warm-up: every window is filled before timing when that is
// at most 2e7 pairs). Each rate is the best of --repeat runs.
//   rigcal_bench_engine --config FILE --pairs N [--repeat R]
#include <malloc.h>

#include <fstream>
#include <memory>
#include <random>
#include <sstream>

#include "bench_common.hpp"
#include "rigcal/config/loader.hpp"
#include "rigcal/engine/engine.hpp"
#include "rigcal/stats/streaming_fit.hpp"

using namespace rigcal;
using namespace rigcal::bench;

namespace {

struct Pairs {
  std::vector<double> x, y;
  std::vector<protocol::TimeNs> t;
};

// The generator's values (same distributions, seed and order as bench_lines.hpp's LineMaker).
Pairs make_pairs(std::size_t n, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> ref(20.0, 180.0);
  std::normal_distribution<double> noise(0.0, 0.03);
  Pairs p;
  p.x.reserve(n);
  p.y.reserve(n);
  p.t.reserve(n);
  const protocol::TimeNs t0 = wall_ns();
  for (std::size_t i = 0; i < n; ++i) {
    p.x.push_back(ref(rng));
    p.y.push_back(p.x.back() + noise(rng));
    p.t.push_back(t0 + static_cast<protocol::TimeNs>(i) * 1000);
  }
  return p;
}

config::Config load(const std::string& path) {
  std::ifstream in(path);
  std::ostringstream text;
  text << in.rdbuf();
  auto r = config::load_config(text.str(), path);
  if (!r.ok()) {
    for (const auto& e : r.errors) std::fprintf(stderr, "%s\n", e.to_string().c_str());
    Args::fail("configuration refused");
  }
  return std::move(r.config);
}

template <class F>
double best_rate(std::size_t ops, int repeat, F&& body) {
  double best = 0;
  for (int r = 0; r < repeat; ++r) {
    const double t0 = mono_s();
    body();
    best = std::max(best, static_cast<double>(ops) / (mono_s() - t0));
  }
  return best;
}

double sink = 0;

std::size_t heap_in_use() {
  const struct mallinfo2 m = ::mallinfo2();
  return m.uordblks + m.hblkhd;  // small blocks in use + mmapped blocks
}

}  // namespace

int main(int argc, char** argv) {
  const Args args(argc, argv);
  args.check_known({"config", "pairs", "repeat", "seed"});
  const std::size_t n = args.count("pairs", 5'000'000);
  const int repeat = static_cast<int>(args.count("repeat", 3));
  const ProcSample before_config = sample_self();
  const std::size_t heap0 = heap_in_use();
  const config::Config cfg = load(args.text("config"));
  const ProcSample after_config = sample_self();
  const std::size_t heap_config = heap_in_use() - heap0;
  const std::size_t channels = cfg.channels.size();
  const std::size_t window = static_cast<std::size_t>(cfg.channels.front().fit.window_pairs);
  const Pairs p = make_pairs(n, args.count("seed", 1));

  // Bare update and window fit, on one state (the arithmetic floor of any per-pair path).
  const double acc_rate = best_rate(n, repeat, [&] {
    stats::LineAccumulator acc;
    for (std::size_t i = 0; i < n; ++i) acc.add(p.x[i], p.y[i]);
    sink += acc.moments().cxy;
  });
  const double fit_rate = best_rate(n, repeat, [&] {
    stats::StreamingLineFit fit(cfg.channels.front().fit.policy());
    for (std::size_t i = 0; i < n; ++i) fit.add(p.x[i], p.y[i]);
    sink += fit.moments().cxy;
  });

  const ProcSample before_engine = sample_self();
  const std::size_t heap1 = heap_in_use();
  engine::Engine eng(cfg);
  const ProcSample built = sample_self();
  const std::size_t heap_built = heap_in_use() - heap1;
  std::vector<engine::ChannelEngine*> by_index(channels);
  std::vector<std::string> ids(channels);
  for (std::size_t c = 0; c < channels; ++c) {
    by_index[c] = &eng.channel(c);
    ids[c] = eng.channel(c).config().id;
  }
  engine::NullSink null_sink;
  // Warm-up: fill every window (and get past learning) before timing, when affordable.
  const std::size_t warm = std::min<std::size_t>(std::max<std::size_t>(channels * window, channels * 200), 20'000'000);
  for (std::size_t i = 0; i < warm; ++i) {
    const std::size_t k = i % n;
    by_index[i % channels]->on_pair(p.t[k], p.x[k], p.y[k], null_sink);
  }
  const ProcSample warmed = sample_self();
  const std::size_t heap_warm = heap_in_use() - heap1;
  std::uint64_t base = warm;
  const double channel_rate = best_rate(n, repeat, [&] {
    for (std::size_t i = 0; i < n; ++i) by_index[(base + i) % channels]->on_pair(p.t[i], p.x[i], p.y[i], null_sink);
    base += n;
  });
  const double lookup_rate = best_rate(n, repeat, [&] {
    for (std::size_t i = 0; i < n; ++i) eng.find(ids[(base + i) % channels])->on_pair(p.t[i], p.x[i], p.y[i], null_sink);
    base += n;
  });
  std::uint64_t outliers = 0, in_fit = 0;
  for (std::size_t c = 0; c < channels; ++c) {
    outliers += eng.channel(c).counters().outliers;
    in_fit += eng.channel(c).counters().pairs_in_fit;
  }
  put("channels", static_cast<std::uint64_t>(channels));
  put("window", static_cast<std::uint64_t>(window));
  put("accumulator_per_s", acc_rate);
  put("window_fit_per_s", fit_rate);
  put("channel_per_s", channel_rate);
  put("lookup_per_s", lookup_rate);
  put("config_rss_kib", after_config.rss_kib - before_config.rss_kib);
  put("engine_built_rss_kib", built.rss_kib - before_engine.rss_kib);
  put("engine_warm_rss_kib", warmed.rss_kib - before_engine.rss_kib);
  put("warmup_pairs", static_cast<std::uint64_t>(warm));
  const auto per = [channels](std::size_t bytes) { return static_cast<double>(bytes) / static_cast<double>(channels); };
  put("config_heap_per_channel_b", per(heap_config));
  put("engine_heap_per_channel_b", per(heap_built));
  put("engine_warm_heap_per_channel_b", per(heap_warm));
  put("engine_warm_heap_beyond_window_b", per(heap_warm) - 16.0 * static_cast<double>(window));
  put("sizeof_channel_engine", static_cast<std::uint64_t>(sizeof(engine::ChannelEngine)));
  put("sizeof_channel_config", static_cast<std::uint64_t>(sizeof(config::ChannelConfig)));
  put("outliers", outliers);
  put("checksum", sink + static_cast<double>(in_fit));
  return 0;
}
