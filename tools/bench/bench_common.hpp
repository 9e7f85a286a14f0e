#pragma once
// Small helpers shared by the benchmark programs: a strict `--key value` argument reader, clocks,
// /proc readings of another process (CPU time, resident memory), percentiles, and key=value output
// (the run_bench.sh script reads these lines; the programs never decide pass or fail).
#include <algorithm>
#include <charconv>
#include <cmath>
#include <chrono>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <string_view>
#include <time.h>
#include <unistd.h>
#include <vector>

namespace rigcal::bench {

// `--key value` pairs; a flag without a value is "1". Unknown keys are refused by check_known().
class Args {
 public:
  Args(int argc, char** argv) {
    for (int i = 1; i < argc; ++i) {
      std::string k = argv[i];
      if (k.rfind("--", 0) != 0) fail("unexpected argument " + k);
      k = k.substr(2);
      if (i + 1 < argc && std::string_view(argv[i + 1]).rfind("--", 0) != 0)
        values_[k] = argv[++i];
      else
        values_[k] = "1";
    }
  }
  void check_known(std::initializer_list<std::string_view> known) const {
    for (const auto& [k, v] : values_)
      if (std::find(known.begin(), known.end(), k) == known.end()) fail("unknown option --" + k);
  }
  bool has(const std::string& k) const { return values_.count(k) > 0; }
  std::string text(const std::string& k, std::string fallback = "") const {
    auto it = values_.find(k);
    return it == values_.end() ? fallback : it->second;
  }
  double number(const std::string& k, double fallback) const {
    auto it = values_.find(k);
    if (it == values_.end()) return fallback;
    double v = 0;
    const auto& s = it->second;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc{} || end != s.data() + s.size()) fail("--" + k + ": not a number: " + s);
    return v;
  }
  std::uint64_t count(const std::string& k, std::uint64_t fallback) const {
    return static_cast<std::uint64_t>(number(k, static_cast<double>(fallback)));
  }
  [[noreturn]] static void fail(const std::string& why) {
    std::fprintf(stderr, "bench: %s\n", why.c_str());
    std::exit(2);
  }

 private:
  std::map<std::string, std::string> values_;
};

inline std::int64_t wall_ns() {
  timespec ts{};
  ::clock_gettime(CLOCK_REALTIME, &ts);
  return static_cast<std::int64_t>(ts.tv_sec) * 1'000'000'000 + ts.tv_nsec;
}

inline double mono_s() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}

// What /proc says about a process: user+system CPU seconds and memory in KiB.
struct ProcSample {
  double cpu_s = 0;
  std::uint64_t rss_kib = 0, hwm_kib = 0;
  bool ok = false;
};

inline ProcSample sample_process(long pid) {
  ProcSample s;
  std::ifstream stat("/proc/" + std::to_string(pid) + "/stat");
  std::string line;
  if (!std::getline(stat, line)) return s;
  // Fields after the command name (which may hold spaces) start after the last ')'.
  std::istringstream rest(line.substr(line.rfind(')') + 2));
  std::string field;
  double utime = 0, stime = 0;
  for (int i = 3; rest >> field; ++i) {
    if (i == 14) utime = std::strtod(field.c_str(), nullptr);
    if (i == 15) {
      stime = std::strtod(field.c_str(), nullptr);
      break;
    }
  }
  s.cpu_s = (utime + stime) / static_cast<double>(::sysconf(_SC_CLK_TCK));
  std::ifstream status("/proc/" + std::to_string(pid) + "/status");
  while (std::getline(status, line)) {
    if (line.rfind("VmRSS:", 0) == 0) s.rss_kib = std::strtoull(line.c_str() + 6, nullptr, 10);
    if (line.rfind("VmHWM:", 0) == 0) s.hwm_kib = std::strtoull(line.c_str() + 6, nullptr, 10);
  }
  s.ok = true;
  return s;
}

inline ProcSample sample_self() { return sample_process(static_cast<long>(::getpid())); }

// Nearest-rank percentile of an unsorted sample (sorted in place).
inline double percentile(std::vector<double>& v, double p) {
  if (v.empty()) return 0;
  std::sort(v.begin(), v.end());
  const auto rank = static_cast<std::size_t>(std::max(1.0, std::ceil(p / 100.0 * static_cast<double>(v.size()))));
  return v[std::min(rank, v.size()) - 1];
}

inline void put(const char* key, double v) { std::printf("%s=%.6g\n", key, v); }
inline void put(const char* key, std::uint64_t v) { std::printf("%s=%llu\n", key, static_cast<unsigned long long>(v)); }
inline void put(const char* key, const std::string& v) { std::printf("%s=%s\n", key, v.c_str()); }

}  // namespace rigcal::bench
