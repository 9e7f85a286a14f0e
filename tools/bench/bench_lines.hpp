#pragma once
// The benchmark's synthetic records: pairs for channels c000000 ... c(N-1), round robin, so that
// after W x N pairs every window of W pairs is full and record i belongs to channel i mod N as its
// (i / N + 1)-th pair. Reference values are uniform over the configured range [20, 180], the sensor
// follows the certificate (intercept 0, slope 1) with N(0, 0.03) noise. Fixed seed: every run sends
// the same bytes.
//
//   P c000123 1764634924.000123456 101.2345 101.2871
#include <charconv>
#include <cstdint>
#include <cstring>
#include <random>
#include <string>

namespace rigcal::bench {

inline void append_channel_id(std::string& out, std::uint64_t channel) {
  char id[8] = {'c', '0', '0', '0', '0', '0', '0', 0};
  for (int i = 6; i >= 1 && channel > 0; --i, channel /= 10) id[i] = static_cast<char>('0' + channel % 10);
  out.append(id, 7);
}

inline void append_fixed(std::string& out, double v, int digits) {
  char buf[32];
  const auto r = std::to_chars(buf, buf + sizeof buf, v, std::chars_format::fixed, digits);
  out.append(buf, r.ptr);
}

// Epoch seconds with nine fractional digits.
inline void append_time(std::string& out, std::int64_t t_ns) {
  char buf[32];
  auto r = std::to_chars(buf, buf + sizeof buf, t_ns / 1'000'000'000);
  *r.ptr++ = '.';
  auto frac = static_cast<std::uint32_t>(t_ns % 1'000'000'000);
  for (int i = 8; i >= 0; --i, frac /= 10) r.ptr[i] = static_cast<char>('0' + frac % 10);
  out.append(buf, r.ptr + 9);
}

class LineMaker {
 public:
  LineMaker(std::uint64_t channels, std::uint64_t seed) : channels_(channels), rng_(seed) {}

  // Appends record `index` stamped `t_ns`.
  void append(std::string& out, std::uint64_t index, std::int64_t t_ns) {
    const double x = ref_(rng_);
    const double y = x + noise_(rng_);
    out.append("P ");
    append_channel_id(out, index % channels_);
    out.push_back(' ');
    append_time(out, t_ns);
    out.push_back(' ');
    append_fixed(out, x, 4);
    out.push_back(' ');
    append_fixed(out, y, 4);
    out.push_back('\n');
  }

 private:
  std::uint64_t channels_;
  std::mt19937_64 rng_;
  std::uniform_real_distribution<double> ref_{20.0, 180.0};
  std::normal_distribution<double> noise_{0.0, 0.03};
};

}  // namespace rigcal::bench
