// rigcal_bench_read: the bare limit. Reads a byte stream in 64 KiB reads (rigcald's read size) and
// counts newlines, nothing else: what this machine can move from the same generator through the
// same kind of channel when nothing is done with the records.
//   rigcal_bench_read --listen PORT [--port-file F]   one TCP connection on 127.0.0.1, until EOF
//   rigcal_bench_read --device PATH --lines N        a tty (pty slave), raw mode, until N lines
//   rigcal_bench_read --file PATH                    a file (page cache: read it once before)
// Latency floor: with --feed PORT --channels N --block B it also accepts one subscriber and, as
// soon as it has read the pair that completes a block (the benchmark's records are round robin,
// so line i is the (i / N + 1)-th pair of channel i mod N), writes the record the historian feed
// would write for it ({"channel":"c...","seq":K}). rigcal_bench_send's latency probe then measures
// what the machine itself adds, with nothing done per pair.
// Prints key=value lines; the clock runs from the first byte to the end.
#include <arpa/inet.h>
#include <fcntl.h>
#include <netinet/in.h>
#include <netinet/tcp.h>
#include <sys/socket.h>
#include <termios.h>

#include <cstring>

#include "bench_common.hpp"

using namespace rigcal::bench;

namespace {

int listen_on(int port) {
  const int ls = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
  const int one = 1;
  ::setsockopt(ls, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one);
  sockaddr_in a{};
  a.sin_family = AF_INET;
  a.sin_port = htons(static_cast<std::uint16_t>(port));
  a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  if (::bind(ls, reinterpret_cast<sockaddr*>(&a), sizeof a) != 0 || ::listen(ls, 1) != 0)
    Args::fail("listen on port " + std::to_string(port) + ": " + std::strerror(errno));
  return ls;
}

int accept_one(int ls) {
  const int fd = ::accept4(ls, nullptr, nullptr, SOCK_CLOEXEC);
  ::close(ls);
  const int one = 1;
  ::setsockopt(fd, IPPROTO_TCP, TCP_NODELAY, &one, sizeof one);
  return fd;
}

// Writes the feed record for every line that completes a block.
class FloorFeed {
 public:
  FloorFeed(int fd, std::uint64_t channels, std::uint64_t block) : fd_(fd), channels_(channels), block_(block) {}
  void on_line() {
    const std::uint64_t i = line_++;
    const std::uint64_t k = i / channels_ + 1;  // the pair's number on its channel
    if (fd_ < 0 || k % block_ != 0) return;
    char rec[96];
    const int n = std::snprintf(rec, sizeof rec, "{\"type\":\"average\",\"channel\":\"c%06llu\",\"seq\":%llu}\n",
                                static_cast<unsigned long long>(i % channels_), static_cast<unsigned long long>(k / block_));
    if (::write(fd_, rec, static_cast<std::size_t>(n)) != n) fd_ = -1;
  }

 private:
  int fd_;
  std::uint64_t channels_, block_, line_ = 0;
};

int open_raw_tty(const std::string& path) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_NOCTTY | O_CLOEXEC);
  if (fd < 0) Args::fail(path + ": " + std::strerror(errno));
  termios t{};
  ::tcgetattr(fd, &t);
  ::cfmakeraw(&t);
  ::tcsetattr(fd, TCSANOW, &t);
  return fd;
}

}  // namespace

int main(int argc, char** argv) {
  const Args args(argc, argv);
  args.check_known({"listen", "device", "file", "lines", "feed", "channels", "block"});
  int fd = -1;
  int feed_fd = -1;
  if (args.has("listen")) {
    const int ls = listen_on(static_cast<int>(args.count("listen", 0)));
    const int feed_ls = args.has("feed") ? listen_on(static_cast<int>(args.count("feed", 0))) : -1;
    std::printf("listening=1\n");
    std::fflush(stdout);
    fd = accept_one(ls);  // the sender connects its input first, then its probe
    if (feed_ls >= 0) feed_fd = accept_one(feed_ls);
  }
  else if (args.has("device")) fd = open_raw_tty(args.text("device"));
  else if (args.has("file")) fd = ::open(args.text("file").c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) Args::fail("give --listen, --device or --file");
  const std::uint64_t want = args.has("lines") ? args.count("lines", 0) : UINT64_MAX;
  FloorFeed floor(feed_fd, std::max<std::uint64_t>(1, args.count("channels", 1)), std::max<std::uint64_t>(1, args.count("block", 100)));
  static char buf[64 * 1024];
  std::uint64_t lines = 0, bytes = 0;
  double t0 = 0;
  while (lines < want) {
    const ssize_t n = ::read(fd, buf, sizeof buf);
    if (n <= 0) break;  // EOF, or EIO once a pty's master is closed
    if (bytes == 0) t0 = mono_s();
    bytes += static_cast<std::uint64_t>(n);
    for (const char* p = buf; (p = static_cast<const char*>(std::memchr(p, '\n', static_cast<std::size_t>(buf + n - p))));
         ++p) {
      ++lines;
      floor.on_line();
    }
  }
  const double s = mono_s() - t0;
  put("lines", lines);
  put("bytes", bytes);
  put("seconds", s);
  put("lines_per_s", static_cast<double>(lines) / s);
  put("mib_per_s", static_cast<double>(bytes) / s / (1 << 20));
  return 0;
}
