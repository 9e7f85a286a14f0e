#include "line_writer.hpp"

#include <fcntl.h>
#include <signal.h>
#include <termios.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <thread>

namespace rigcal::tool {

namespace {

volatile sig_atomic_t stop_requested = 0;
extern "C" void request_stop(int) { stop_requested = 1; }

// Installs request_stop for SIGINT and SIGTERM without SA_RESTART, so that a blocked write or sleep
// returns and the loop can end with a summary; restores the old handlers on destruction.
class StopOnSignal {
 public:
  explicit StopOnSignal(bool enabled) : enabled_(enabled) {
    if (!enabled_) return;
    stop_requested = 0;
    struct sigaction sa {};
    sa.sa_handler = request_stop;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, &old_int_);
    sigaction(SIGTERM, &sa, &old_term_);
  }
  ~StopOnSignal() {
    if (!enabled_) return;
    sigaction(SIGINT, &old_int_, nullptr);
    sigaction(SIGTERM, &old_term_, nullptr);
  }
  StopOnSignal(const StopOnSignal&) = delete;
  StopOnSignal& operator=(const StopOnSignal&) = delete;

 private:
  bool enabled_;
  struct sigaction old_int_ {}, old_term_ {};
};

// Writes all of `data`; false with errno set on failure (EINTR from a stop signal included).
bool write_all(int fd, const std::string& data) {
  std::size_t done = 0;
  while (done < data.size()) {
    const ssize_t n = ::write(fd, data.data() + done, data.size() - done);
    if (n < 0) {
      if (errno == EINTR && !stop_requested) continue;
      return false;
    }
    done += static_cast<std::size_t>(n);
  }
  return true;
}

constexpr std::size_t batch_bytes = 64 * 1024;

}  // namespace

DeliveryResult write_lines(int fd, const LineWriterSettings& settings, RecordFeed& feed, Pacer pacer,
                           ProgressLine* progress) {
  using Clock = Pacer::Clock;
  StopOnSignal stop(settings.stop_on_signal);
  DeliveryResult result;
  result.serial = true;
  std::string batch = settings.header;
  std::uint64_t batched = 0;
  auto flush = [&]() {
    if (batch.empty()) return true;
    if (!write_all(fd, batch)) {
      if (stop_requested) return false;
      result.failure = "writing to " + settings.target + ": " + std::strerror(errno);
      result.failure_status = exit_io;
      return false;
    }
    result.counts.sent += batched;
    batch.clear();
    batched = 0;
    return true;
  };
  auto report = [&]() {
    if (progress)
      progress->update(ProgressFigures{result.counts.sent, result.counts.sent, 0, result.counts.sent,
                                       feed.expected_total(), false},
                       Clock::now());
  };
  for (;;) {
    auto item = feed.next();
    if (!item) {
      flush();
      result.failure = item.error().message;
      result.failure_status = exit_data;
      break;
    }
    if (!item.value()) {
      flush();
      break;
    }
    const auto due = pacer.due(*item.value(), Clock::now());
    if (due > Clock::now() || batch.size() >= batch_bytes) {
      // Whatever is batched goes before waiting, so that a paced record is not held back.
      if (!flush()) break;
      report();
      std::this_thread::sleep_until(due);
    }
    if (stop_requested) {
      result.interrupted = true;
      result.not_sent += 1;
      break;
    }
    if (settings.with_seq) {
      batch += '@';
      batch += std::to_string(item.value()->seq);
      batch += ' ';
    }
    batch += item.value()->text;
    batch += '\n';
    ++batched;
  }
  if (stop_requested) {
    result.interrupted = true;
    result.not_sent += batched;
  }
  if (progress) progress->clear();
  return result;
}

namespace {

struct BaudEntry {
  unsigned baud;
  speed_t speed;
};
constexpr BaudEntry baud_table[] = {
    {50, B50},         {75, B75},         {110, B110},       {134, B134},       {150, B150},
    {200, B200},       {300, B300},       {600, B600},       {1200, B1200},     {1800, B1800},
    {2400, B2400},     {4800, B4800},     {9600, B9600},     {19200, B19200},   {38400, B38400},
    {57600, B57600},   {115200, B115200}, {230400, B230400}, {460800, B460800}, {500000, B500000},
    {576000, B576000}, {921600, B921600}, {1000000, B1000000}, {1152000, B1152000}, {1500000, B1500000},
    {2000000, B2000000}, {2500000, B2500000}, {3000000, B3000000}, {3500000, B3500000}, {4000000, B4000000},
};

std::optional<speed_t> speed_of(unsigned baud) {
  for (const auto& e : baud_table)
    if (e.baud == baud) return e.speed;
  return std::nullopt;
}

}  // namespace

bool supported_baud(unsigned baud) { return speed_of(baud).has_value(); }

Result<int> open_serial_device(const std::string& device, const SerialLine& line) {
  // O_NONBLOCK so that opening does not wait for a carrier; CLOCAL below makes that moot afterwards.
  const int fd = ::open(device.c_str(), O_WRONLY | O_NOCTTY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) return Error{"cannot open " + device + ": " + std::strerror(errno)};
  auto fail = [&](const std::string& what) {
    const std::string message = device + ": " + what + ": " + std::strerror(errno);
    ::close(fd);
    return Error{message};
  };
  const auto speed = speed_of(line.baud);
  if (!speed) {
    ::close(fd);
    return Error{device + ": " + std::to_string(line.baud) + " bit/s is not a standard speed"};
  }
  termios t{};
  if (tcgetattr(fd, &t) != 0) return fail("not a serial device");
  cfmakeraw(&t);
  cfsetispeed(&t, *speed);
  cfsetospeed(&t, *speed);
  t.c_cflag &= ~static_cast<tcflag_t>(CSIZE | PARENB | PARODD | CSTOPB | CRTSCTS);
  t.c_cflag |= CLOCAL | CREAD;
  switch (line.data_bits) {
    case 5: t.c_cflag |= CS5; break;
    case 6: t.c_cflag |= CS6; break;
    case 7: t.c_cflag |= CS7; break;
    default: t.c_cflag |= CS8; break;
  }
  if (line.parity != config::Parity::none) t.c_cflag |= PARENB;
  if (line.parity == config::Parity::odd) t.c_cflag |= PARODD;
  if (line.stop_bits == config::StopBits::two) t.c_cflag |= CSTOPB;
  if (line.flow_control == config::FlowControl::hardware) t.c_cflag |= CRTSCTS;
  if (line.flow_control == config::FlowControl::software) t.c_iflag |= IXON | IXOFF;
  if (tcsetattr(fd, TCSANOW, &t) != 0) return fail("cannot set the line settings");
  // Blocking writes from here on: the line's speed paces them.
  const int flags = fcntl(fd, F_GETFL);
  if (flags < 0 || fcntl(fd, F_SETFL, flags & ~O_NONBLOCK) != 0) return fail("fcntl");
  return fd;
}

}  // namespace rigcal::tool
