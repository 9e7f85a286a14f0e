// rigcal watch: follows rigcald's historian feed (and optionally its alert file) and prints each
// corrected average and alert event as one readable line; ends when the feed closes.
#include <fcntl.h>
#include <netdb.h>
#include <poll.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <csignal>
#include <cstring>
#include <fmt/format.h>
#include <map>
#include <iostream>
#include <nlohmann/json.hpp>

#include "cli_support.hpp"

namespace rigcal::tool {

namespace {

using nlohmann::json;

volatile std::sig_atomic_t stop_requested = 0;
void on_signal(int) { stop_requested = 1; }

int connect_to(const std::string& host_port, std::string& error) {
  const auto colon = host_port.rfind(':');
  if (colon == std::string::npos) {
    error = "expected HOST:PORT, got '" + host_port + "'";
    return -1;
  }
  std::string host = host_port.substr(0, colon);
  if (host.size() > 1 && host.front() == '[' && host.back() == ']') host = host.substr(1, host.size() - 2);
  addrinfo hints{};
  hints.ai_socktype = SOCK_STREAM;
  addrinfo* res = nullptr;
  if (const int rc = ::getaddrinfo(host.c_str(), host_port.substr(colon + 1).c_str(), &hints, &res); rc != 0) {
    error = host_port + ": " + ::gai_strerror(rc);
    return -1;
  }
  int fd = -1;
  for (addrinfo* a = res; a && fd < 0; a = a->ai_next) {
    fd = ::socket(a->ai_family, a->ai_socktype | SOCK_CLOEXEC, a->ai_protocol);
    if (fd >= 0 && ::connect(fd, a->ai_addr, a->ai_addrlen) != 0) {
      error = host_port + ": " + std::strerror(errno);
      ::close(fd);
      fd = -1;
    }
  }
  ::freeaddrinfo(res);
  return fd;
}

std::string num(const json& v, const char* f) {
  return v.is_number() ? fmt::format(fmt::runtime(f), v.get<double>()) : "-";
}

void print_average(const json& r) {
  const std::string units = r.value("units", "");
  std::string corrected = r["corrected"].is_null()
                              ? "no correction"
                              : fmt::format("corrected {} ± {} (k {}, ν_eff {})", num(r["corrected"], "{:.4f}"),
                                            num(r["U"], "{:.3g}"), num(r["k"], "{:.2f}"),
                                            r["nu_eff"].is_null() ? std::string("∞") : num(r["nu_eff"], "{:.0f}"));
  std::cout << fmt::format("{}  {:<8} {} {} -> {} {}, m {}, {}{}\n", r.value("window_end", ""), r.value("channel", ""),
                           num(r["indication"], "{:.4f}"), units, corrected, units, r.value("m", 0),
                           r.value("quality", ""),
                           r.value("drift_alert", false) ? " (drift alert)" : "");
}

void print_alert(const json& a) {
  std::cout << fmt::format("{} {} {} {} ({}, {}): {}\n",
                           a.value("event", "") == "raised" ? "** ALERT RAISED" : "-- alert cleared",
                           a.value("time", ""), a.value("channel", ""), a.value("kind", ""), a.value("detector", ""),
                           a.value("test", ""), a.value("message", ""));
}

}  // namespace

int run_watch(const Args& args) {
  std::string historian, alerts;
  unsigned every = 1;
  po::options_description options("options");
  options.add_options()
      ("historian", po::value(&historian)->required(), "rigcald's historian feed, HOST:PORT")
      ("alerts", po::value(&alerts), "also follow this alert file (rigcald's outputs.alerts.file)")
      ("every", po::value(&every)->default_value(1), "print every N-th average of each channel (alerts always)");
  po::positional_options_description positional;
  po::variables_map vm;
  if (auto done = parse_command_line("watch", "--historian HOST:PORT [options]", args, options, positional, vm))
    return *done;
  if (every == 0) every = 1;
  std::string error;
  const int fd = connect_to(historian, error);
  if (fd < 0) {
    std::cerr << "rigcal watch: " << error << "\n";
    return exit_unavailable;
  }
  std::signal(SIGINT, on_signal);
  std::signal(SIGTERM, on_signal);
  int afd = -1;
  off_t alerts_offset = 0;
  if (!alerts.empty()) {
    afd = ::open(alerts.c_str(), O_RDONLY | O_CLOEXEC);
    struct stat st{};
    if (afd >= 0 && ::fstat(afd, &st) == 0) alerts_offset = st.st_size;  // only new events
  }
  std::string feed, alert_text;
  std::map<std::string, unsigned> seen;
  char buf[65536];
  while (!stop_requested) {
    pollfd p{fd, POLLIN, 0};
    const int rc = ::poll(&p, 1, 200);
    if (rc > 0) {
      const ssize_t n = ::recv(fd, buf, sizeof buf, 0);
      if (n <= 0) break;  // rigcald stopped
      feed.append(buf, static_cast<std::size_t>(n));
      for (std::size_t nl; (nl = feed.find('\n')) != std::string::npos; feed.erase(0, nl + 1)) {
        try {
          const json r = json::parse(feed.substr(0, nl));
          if (r.value("type", "") == "gap")
            std::cout << "(" << r.value("dropped", 0) << " records dropped by the feed: this watcher was too slow)\n";
          else if (r.value("type", "") == "average" && seen[r.value("channel", "")]++ % every == 0)
            print_average(r);
        } catch (const json::exception&) {
          std::cout << feed.substr(0, nl) << "\n";
        }
      }
      std::cout.flush();
    }
    if (afd < 0 && !alerts.empty()) afd = ::open(alerts.c_str(), O_RDONLY | O_CLOEXEC);
    if (afd >= 0) {
      for (ssize_t n; (n = ::pread(afd, buf, sizeof buf, alerts_offset)) > 0; alerts_offset += n)
        alert_text.append(buf, static_cast<std::size_t>(n));
      for (std::size_t nl; (nl = alert_text.find('\n')) != std::string::npos; alert_text.erase(0, nl + 1)) {
        try {
          print_alert(json::parse(alert_text.substr(0, nl)));
        } catch (const json::exception&) {
        }
      }
      std::cout.flush();
    }
  }
  ::close(fd);
  if (afd >= 0) ::close(afd);
  return exit_ok;
}

}  // namespace rigcal::tool
