// rigcal_bench_send: the load generator. Sends the benchmark's records (bench_lines.hpp) to a TCP
// listener, into a pseudo-terminal or into a file, as fast as possible or at a fixed rate, and
// optionally measures, at the same time:
//   --control SOCKET   when rigcald has processed everything (polls `status CHANNEL` for the last
//                      channel, which receives the last record), so the rate is end to end;
//   --watch-pid PID    the receiver's CPU seconds and resident memory over the run (/proc), with a
//                      timeline of memory for the back-pressure report (--timeline FILE);
//   --historian H:P    latency: a subscriber thread reads the historian feed; a record (channel c,
//                      seq s) is closed by the channel's (s x block)-th pair, i.e. line
//                      (s x block - 1) x channels + c, whose write time the sender noted. Latency =
//                      arrival of the record at the subscriber - write(2) of the batch holding
//                      that line (same clock, same machine). Records closed in the first 10 % of
//                      the run are left out (start-up).
// Prints key=value lines. Usage:
//   rigcal_bench_send (--connect HOST:PORT | --pty-link PATH | --file PATH) --channels N --pairs N
//                     [--rate PAIRS_PER_S] [--seed S] [--control SOCKET] [--watch-pid PID]
//                     [--timeline FILE] [--historian HOST:PORT --block B]
#include <arpa/inet.h>
#include <fcntl.h>
#include <netinet/in.h>
#include <netinet/tcp.h>
#include <sys/socket.h>
#include <sys/un.h>
#include <termios.h>

#include <atomic>
#include <cerrno>
#include <cstring>
#include <memory>
#include <string>
#include <thread>
#include <vector>

#include "bench_common.hpp"
#include "bench_lines.hpp"

using namespace rigcal::bench;

namespace {

int connect_tcp(const std::string& host_port) {
  const auto colon = host_port.rfind(':');
  sockaddr_in a{};
  a.sin_family = AF_INET;
  a.sin_port = htons(static_cast<std::uint16_t>(std::stoi(host_port.substr(colon + 1))));
  ::inet_pton(AF_INET, host_port.substr(0, colon).c_str(), &a.sin_addr);
  for (int attempt = 0; attempt < 200; ++attempt) {
    const int fd = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
    if (::connect(fd, reinterpret_cast<sockaddr*>(&a), sizeof a) == 0) {
      const int one = 1;
      ::setsockopt(fd, IPPROTO_TCP, TCP_NODELAY, &one, sizeof one);
      return fd;
    }
    ::close(fd);
    ::usleep(50'000);
  }
  Args::fail("cannot connect to " + host_port);
}

// A pseudo-terminal whose slave is reachable as `link`. Returns the master; waits until the receiver
// has opened the slave and put it in raw mode (before that, the line discipline would echo and
// cook what is written).
int open_pty(const std::string& link, double wait_s) {
  const int master = ::posix_openpt(O_RDWR | O_NOCTTY | O_CLOEXEC);
  if (master < 0 || ::grantpt(master) != 0 || ::unlockpt(master) != 0) Args::fail("posix_openpt failed");
  const std::string slave_name = ::ptsname(master);
  const int watch = ::open(slave_name.c_str(), O_RDONLY | O_NOCTTY | O_CLOEXEC);  // only to read its termios
  ::unlink(link.c_str());
  if (::symlink(slave_name.c_str(), link.c_str()) != 0) Args::fail("symlink " + link + ": " + std::strerror(errno));
  const double deadline = mono_s() + wait_s;
  for (;;) {
    termios t{};
    if (::tcgetattr(watch, &t) == 0 && !(t.c_lflag & ICANON) && !(t.c_lflag & ECHO)) break;
    if (mono_s() > deadline) Args::fail("nobody opened " + link + " in raw mode");
    ::usleep(20'000);
  }
  return master;  // `watch` stays open: the slave must not be hung up under the receiver
}

// One request on rigcald's control socket; the whole answer.
std::string control(const std::string& path, const std::string& request) {
  const int fd = ::socket(AF_UNIX, SOCK_STREAM | SOCK_CLOEXEC, 0);
  sockaddr_un a{};
  a.sun_family = AF_UNIX;
  std::strncpy(a.sun_path, path.c_str(), sizeof a.sun_path - 1);
  std::string out;
  if (::connect(fd, reinterpret_cast<sockaddr*>(&a), sizeof a) == 0) {
    const std::string line = request + "\n";
    if (::write(fd, line.data(), line.size()) == static_cast<ssize_t>(line.size())) {
      char buf[4096];
      for (ssize_t n; (n = ::read(fd, buf, sizeof buf)) > 0;) out.append(buf, static_cast<std::size_t>(n));
    }
  }
  ::close(fd);
  return out;
}

// counters.pairs of one channel from `status CHANNEL` (0 if unreadable).
std::uint64_t channel_pairs(const std::string& socket_path, const std::string& channel) {
  const std::string j = control(socket_path, "status " + channel);
  const auto at = j.find("\"counters\"");
  if (at == std::string::npos) return 0;
  const auto p = j.find("\"pairs\":", at);
  return p == std::string::npos ? 0 : std::strtoull(j.c_str() + p + 8, nullptr, 10);
}

void write_all(int fd, const char* p, std::size_t n) {
  while (n > 0) {
    const ssize_t w = ::write(fd, p, n);
    if (w < 0 && errno == EINTR) continue;
    if (w <= 0) Args::fail(std::string("write: ") + std::strerror(errno));
    p += w;
    n -= static_cast<std::size_t>(w);
  }
}

// Memory and CPU of the receiver, sampled every 100 ms on a thread of its own.
class Watcher {
 public:
  explicit Watcher(long pid) : pid_(pid) {
    if (pid_ > 0) thread_ = std::thread([this] { loop(); });
  }
  ~Watcher() { stop(); }
  void stop() {
    done_ = true;
    if (thread_.joinable()) thread_.join();
  }
  struct Point {
    double t_s;
    ProcSample s;
  };
  const std::vector<Point>& points() const { return points_; }

 private:
  void loop() {
    const double t0 = mono_s();
    while (!done_) {
      points_.push_back({mono_s() - t0, sample_process(pid_)});
      ::usleep(100'000);
    }
    points_.push_back({mono_s() - t0, sample_process(pid_)});
  }
  long pid_;
  std::atomic<bool> done_{false};
  std::vector<Point> points_;
  std::thread thread_;
};

// The historian subscriber of latency mode.
class LatencyProbe {
 public:
  LatencyProbe(const std::string& host_port, std::uint64_t channels, std::uint64_t block, std::uint64_t batch_lines,
               std::vector<std::atomic<std::int64_t>>& batch_times, std::uint64_t skip_lines)
      : fd_(connect_tcp(host_port)),
        channels_(channels),
        block_(block),
        batch_lines_(batch_lines),
        batch_times_(batch_times),
        skip_lines_(skip_lines) {
    thread_ = std::thread([this] { loop(); });
  }
  // Waits until `expected` records were seen or `timeout_s` passed.
  void finish(std::uint64_t expected, double timeout_s) {
    const double deadline = mono_s() + timeout_s;
    while (records_.load() < expected && mono_s() < deadline) ::usleep(10'000);
    ::shutdown(fd_, SHUT_RDWR);
    thread_.join();
    ::close(fd_);
  }
  std::vector<double>& latencies_us() { return latencies_; }
  std::uint64_t records() const { return records_.load(); }
  std::uint64_t unmatched() const { return unmatched_; }

 private:
  void loop() {
    std::string pending;
    char buf[1 << 16];
    for (ssize_t n; (n = ::read(fd_, buf, sizeof buf)) > 0;) {
      const std::int64_t now = wall_ns();
      pending.append(buf, static_cast<std::size_t>(n));
      std::size_t start = 0;
      for (std::size_t nl; (nl = pending.find('\n', start)) != std::string::npos; start = nl + 1)
        on_record(std::string_view(pending).substr(start, nl - start), now);
      pending.erase(0, start);
    }
  }
  void on_record(std::string_view r, std::int64_t now) {
    const auto c = r.find("\"channel\":\"c");
    const auto s = r.find("\"seq\":");
    if (c == std::string_view::npos || s == std::string_view::npos) return;
    const std::uint64_t channel = std::strtoull(r.data() + c + 12, nullptr, 10);
    const std::uint64_t seq = std::strtoull(r.data() + s + 6, nullptr, 10);
    records_.fetch_add(1);
    const std::uint64_t line = (seq * block_ - 1) * channels_ + channel;
    const std::uint64_t batch = line / batch_lines_;
    if (batch >= batch_times_.size() || batch_times_[batch].load() == 0) {
      ++unmatched_;
      return;
    }
    if (line < skip_lines_) return;
    latencies_.push_back(static_cast<double>(now - batch_times_[batch].load()) / 1e3);
  }

  int fd_;
  std::uint64_t channels_, block_, batch_lines_;
  std::vector<std::atomic<std::int64_t>>& batch_times_;
  std::uint64_t skip_lines_;
  std::vector<double> latencies_;
  std::atomic<std::uint64_t> records_{0};
  std::uint64_t unmatched_ = 0;
  std::thread thread_;
};

struct Buffer {
  std::string bytes;
  std::vector<std::size_t> line_end;  // offset after each line's newline
};

// `lines` records (a multiple of the channel count, so that repeating the buffer keeps record i on
// channel i mod N). Times advance 1 us per record from now; repeats go back by the buffer's span,
// well within rigcald's default time.max_backwards_s.
Buffer make_buffer(std::uint64_t lines, std::uint64_t channels, std::uint64_t seed) {
  Buffer b;
  LineMaker maker(channels, seed);
  const std::int64_t t0 = wall_ns();
  b.bytes.reserve(lines * 52);
  b.line_end.reserve(lines);
  for (std::uint64_t i = 0; i < lines; ++i) {
    maker.append(b.bytes, i, t0 + static_cast<std::int64_t>(i) * 1000);
    b.line_end.push_back(b.bytes.size());
  }
  return b;
}

}  // namespace

int main(int argc, char** argv) {
  const Args args(argc, argv);
  args.check_known({"connect", "pty-link", "file", "channels", "pairs", "rate", "seed", "control", "watch-pid",
                    "timeline", "historian", "block", "buffer-lines", "pty-wait-s", "drain-timeout-s",
                    "watch-pid-file"});
  const std::uint64_t channels = std::max<std::uint64_t>(1, args.count("channels", 1));
  const std::uint64_t pairs = args.count("pairs", 1'000'000);
  const double rate = args.number("rate", 0);
  std::uint64_t buffer_lines = args.count("buffer-lines", 1 << 20);
  buffer_lines = std::max(channels, buffer_lines / channels * channels);
  buffer_lines = std::min(buffer_lines, (pairs + channels - 1) / channels * channels);
  const Buffer buf = make_buffer(buffer_lines, channels, args.count("seed", 1));

  int fd = -1;
  if (args.has("connect")) fd = connect_tcp(args.text("connect"));
  else if (args.has("pty-link")) fd = open_pty(args.text("pty-link"), args.number("pty-wait-s", 60));
  else if (args.has("file")) fd = ::open(args.text("file").c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd < 0) Args::fail("give --connect, --pty-link or --file");

  // Batches: whole buffers when unpaced; about 10 000 batches a second when paced.
  const std::uint64_t batch_lines =
      rate > 0 ? std::max<std::uint64_t>(1, static_cast<std::uint64_t>(rate / 10'000)) : std::min<std::uint64_t>(buffer_lines, 4096);
  std::vector<std::atomic<std::int64_t>> batch_times(pairs / batch_lines + 2);
  std::unique_ptr<LatencyProbe> probe;
  const std::uint64_t block = args.count("block", 100);
  if (args.has("historian"))
    probe = std::make_unique<LatencyProbe>(args.text("historian"), channels, block, batch_lines, batch_times,
                                           pairs / 10);
  const std::string socket_path = args.text("control");
  const std::string last_channel = [&] {
    std::string s;
    append_channel_id(s, channels - 1);
    return s;
  }();
  const std::uint64_t last_before = socket_path.empty() ? 0 : channel_pairs(socket_path, last_channel);
  // The receiver's pid: given, or (pty: rigcald starts after the pty exists) read from a file once
  // the receiver has opened the pty.
  long pid = static_cast<long>(args.count("watch-pid", 0));
  for (const double deadline = mono_s() + 600; args.has("watch-pid-file") && pid <= 0 && mono_s() < deadline;) {
    std::ifstream(args.text("watch-pid-file")) >> pid;
    if (pid <= 0) ::usleep(20'000);
  }
  Watcher watcher(pid);
  const ProcSample cpu0 = pid > 0 ? sample_process(pid) : ProcSample{};

  const double t0 = mono_s();
  std::uint64_t sent = 0, bytes = 0, batch = 0;
  while (sent < pairs) {
    const std::uint64_t n = std::min(batch_lines, pairs - sent);
    if (rate > 0) {
      const double due = t0 + static_cast<double>(sent) / rate;
      const double wait = due - mono_s();
      if (wait > 0) ::usleep(static_cast<useconds_t>(wait * 1e6));
    }
    // Lines [sent, sent + n) of the repeated buffer, possibly wrapping around its end.
    std::uint64_t first = sent % buffer_lines, left = n;
    batch_times[batch++].store(wall_ns());
    while (left > 0) {
      const std::uint64_t take = std::min(left, buffer_lines - first);
      const std::size_t from = first == 0 ? 0 : buf.line_end[first - 1];
      const std::size_t to = buf.line_end[first + take - 1];
      write_all(fd, buf.bytes.data() + from, to - from);
      bytes += to - from;
      left -= take;
      first = 0;
    }
    sent += n;
  }
  const double t_written = mono_s();
  double t_done = t_written;
  if (!socket_path.empty()) {
    const std::uint64_t want = last_before + pairs / channels;
    const double deadline = t_written + args.number("drain-timeout-s", 600);
    while (channel_pairs(socket_path, last_channel) < want && mono_s() < deadline) ::usleep(2'000);
    t_done = mono_s();
  }
  watcher.stop();
  put("pairs", sent);
  put("bytes", bytes);
  put("write_s", t_written - t0);
  put("seconds", t_done - t0);
  put("pairs_per_s", static_cast<double>(sent) / (t_done - t0));
  if (pid > 0 && !watcher.points().empty()) {
    const ProcSample last = watcher.points().back().s;
    std::uint64_t peak = 0;
    for (const auto& p : watcher.points()) peak = std::max(peak, p.s.rss_kib);
    put("receiver_cpu_s", last.cpu_s - cpu0.cpu_s);
    put("receiver_rss_kib", last.rss_kib);
    put("receiver_rss_peak_kib", peak);
    put("receiver_hwm_kib", last.hwm_kib);
    if (args.has("timeline")) {
      std::FILE* f = std::fopen(args.text("timeline").c_str(), "w");
      std::fprintf(f, "t_s,cpu_s,rss_kib\n");
      for (const auto& p : watcher.points()) std::fprintf(f, "%.2f,%.3f,%llu\n", p.t_s, p.s.cpu_s - cpu0.cpu_s,
                                                          static_cast<unsigned long long>(p.s.rss_kib));
      std::fclose(f);
    }
  }
  if (probe) {
    probe->finish(pairs / block, 10);
    auto& lat = probe->latencies_us();
    put("historian_records", probe->records());
    put("latency_samples", static_cast<std::uint64_t>(lat.size()));
    put("latency_unmatched", probe->unmatched());
    put("latency_p50_us", percentile(lat, 50));
    put("latency_p99_us", percentile(lat, 99));
    put("latency_p999_us", percentile(lat, 99.9));
    put("latency_max_us", lat.empty() ? 0.0 : lat.back());
  }
  ::close(fd);
  return 0;
}
