// rigcal status: asks a running rigcald (through its local control socket) where each channel stands.
#include <sys/socket.h>
#include <sys/un.h>
#include <unistd.h>

#include <cerrno>
#include <cmath>
#include <cstring>
#include <fmt/format.h>
#include <iostream>
#include <nlohmann/json.hpp>

#include "cli_support.hpp"

namespace rigcal::tool {

namespace {

using nlohmann::json;

// One request, one answer: connect, optionally authenticate, send, read to EOF.
bool ask(const std::string& socket_path, const std::string& secret, const std::string& request, std::string& answer,
         std::string& error) {
  sockaddr_un addr{};
  addr.sun_family = AF_UNIX;
  if (socket_path.size() >= sizeof addr.sun_path) {
    error = socket_path + ": path too long for a Unix socket";
    return false;
  }
  std::memcpy(addr.sun_path, socket_path.c_str(), socket_path.size() + 1);
  const int fd = ::socket(AF_UNIX, SOCK_STREAM | SOCK_CLOEXEC, 0);
  if (fd < 0 || ::connect(fd, reinterpret_cast<sockaddr*>(&addr), sizeof addr) != 0) {
    error = socket_path + ": " + std::strerror(errno) + " (is rigcald running? see --socket)";
    if (fd >= 0) ::close(fd);
    return false;
  }
  timeval tv{30, 0};
  ::setsockopt(fd, SOL_SOCKET, SO_RCVTIMEO, &tv, sizeof tv);
  std::string out = secret.empty() ? "" : "AUTH " + secret + "\n";
  out += request + "\n";
  if (::send(fd, out.data(), out.size(), MSG_NOSIGNAL) != static_cast<ssize_t>(out.size())) {
    error = socket_path + ": send: " + std::strerror(errno);
    ::close(fd);
    return false;
  }
  char buf[65536];
  for (ssize_t n; (n = ::recv(fd, buf, sizeof buf, 0)) > 0;) answer.append(buf, static_cast<std::size_t>(n));
  ::close(fd);
  if (answer.rfind("ERR ", 0) == 0) {
    error = answer.substr(4);
    while (!error.empty() && error.back() == '\n') error.pop_back();
    return false;
  }
  return true;
}

std::string num(const json& v, const char* f = "{:.6g}") {
  if (!v.is_number()) return "-";
  return fmt::format(fmt::runtime(f), v.get<double>());
}

std::string interval(const json& v) {
  if (!v.is_array() || v.size() != 2) return "";
  return "[" + num(v[0]) + ", " + num(v[1]) + "]";
}

void print_channel(const json& c) {
  const json& fit = c["fit"];
  const json& drift = c["drift"];
  std::cout << fmt::format("{} ({}){}\n", c["id"].get<std::string>(), c["units"].get<std::string>(),
                           c["description"].get<std::string>().empty() ? "" : " - " + c["description"].get<std::string>());
  if (fit["valid"].get<bool>()) {
    const json& v = fit["verdict"];
    std::cout << fmt::format("  fit       n {}  b0 {} {}  b1 {} {}  s {}  ({} % intervals)\n", fit["n"].get<std::uint64_t>(),
                             num(fit["b0"]), interval(fit["ci_b0"]), num(fit["b1"]), interval(fit["ci_b1"]), num(fit["s"]),
                             num(json(fit["confidence"].get<double>() * 100), "{:g}"));
    auto word = [](bool ok) { return ok ? "consistent" : "NOT consistent"; };
    if (fit.value("spread_sufficient", true))
      std::cout << fmt::format("  vs cert   slope {}, intercept {}, joint {}\n", word(v["slope_consistent"].get<bool>()),
                               word(v["intercept_consistent"].get<bool>()), word(v["joint_consistent"].get<bool>()));
    else
      std::cout << fmt::format("  vs cert   no verdict: the reference values in the fit spread too little (RMS {})\n",
                               num(fit["reference_spread"], "{:.3g}"));
  } else {
    std::cout << "  fit       " << fit["problem"].get<std::string>() << "\n";
  }
  std::string detector = drift["detector"].get<std::string>() + ", " + drift["phase"].get<std::string>();
  if (drift.contains("problem")) detector += ": " + drift["problem"].get<std::string>();
  const bool raised = c["alert"]["raised"].get<bool>();
  std::cout << "  drift     " << detector
            << (raised ? "  ** DRIFT ALERT since " + c["alert"]["since"].get<std::string>() + " **" : "  no alert") << "\n";
  const json& tol = c["tolerance"];
  if (tol["available"].get<bool>())
    std::cout << fmt::format("  tolerance {} ({}), worst error {} (U {}) at {} vs MPE {}\n", tol["verdict"].get<std::string>(),
                             tol["rule"].get<std::string>(), num(tol["worst_error"], "{:.4g}"), num(tol["worst_U"], "{:.3g}"),
                             num(tol["worst_x"], "{:.5g}"), num(tol["worst_mpe"], "{:.4g}"));
  const json& due = c["calibration_due"];
  if (!due["due_by"].is_null()) std::cout << "  due by    " << due["due_by"].get<std::string>() << (due["alert"].get<bool>() ? "  ** calibration due **" : "") << "\n";
  const json& last = c["last_average"];
  if (!last.is_null())
    std::cout << fmt::format("  last avg  {} -> {} {} (U {}, k {}, m {}), {} at {}\n", num(last["indication"]),
                             num(last["corrected"]), c["units"].get<std::string>(), num(last["U"], "{:.3g}"),
                             num(last["k"], "{:.3g}"), last["m"].get<std::uint64_t>(), last["quality"].get<std::string>(),
                             last["window_end"].get<std::string>());
  const json& k = c["counters"];
  std::cout << fmt::format("  counts    pairs {}, readings {}, outliers {}, signal {}, clock {}, last record {}\n\n",
                           k["pairs"].get<std::uint64_t>(), k["readings"].get<std::uint64_t>(), k["outliers"].get<std::uint64_t>(),
                           k["signal_rejects"].get<std::uint64_t>(), k["clock_rejects"].get<std::uint64_t>(),
                           c["last_time"].is_null() ? "-" : c["last_time"].get<std::string>());
}

void print_status(const json& s) {
  const json& d = s["daemon"];
  std::cout << fmt::format("rigcald {} up since {}, state {}\n", d["version"].get<std::string>(), d["started"].get<std::string>(),
                           d["state_directory"].get<std::string>());
  if (d["journal"]["blocked"].get<bool>())
    std::cout << "  ** JOURNAL BLOCKED: " << d["journal"]["error"].get<std::string>() << " (inputs paused) **\n";
  for (const auto& in : s["inputs"])
    if (in["name"] == "engine")
      std::cout << fmt::format("  screened by the channels (outliers, signal range, clock): {} rejected\n",
                               in["rejects_total"].get<std::uint64_t>());
    else
      std::cout << fmt::format("  input {}: {} lines, {} pairs, {} readings, {} duplicates, {} rejected\n",
                             in["name"].get<std::string>(), in["lines"].get<std::uint64_t>(), in["pairs"].get<std::uint64_t>(),
                             in["readings"].get<std::uint64_t>(), in["duplicates"].get<std::uint64_t>(),
                             in["rejects_total"].get<std::uint64_t>());
  std::cout << "\n";
  for (const auto& c : s["channels"]) print_channel(c);
  std::cout << "Decision support only: not a safety function.\n";
}

}  // namespace

int run_status(const Args& args) {
  std::string socket = "/var/lib/rigcald/control.sock", state_dir, secret_file, channel, reset;
  bool as_json = false, metrics = false;
  po::options_description options("options");
  options.add_options()
      ("socket", po::value(&socket), "control socket of rigcald (default /var/lib/rigcald/control.sock)")
      ("state-directory", po::value(&state_dir), "use STATE_DIRECTORY/control.sock")
      ("secret-file", po::value(&secret_file), "file holding the control secret, if rigcald requires one")
      ("channel", po::value(&channel), "only this channel")
      ("json", po::bool_switch(&as_json), "print rigcald's JSON answer")
      ("metrics", po::bool_switch(&metrics), "print the counters in the OpenMetrics text format")
      ("reset", po::value(&reset), "reset CHANNEL after its recalibration (as-left): fit, detectors and alert restart");
  po::positional_options_description positional;
  po::variables_map vm;
  if (auto done = parse_command_line("status", "[options]", args, options, positional, vm)) return *done;
  if (!state_dir.empty()) socket = state_dir + "/control.sock";
  std::string secret;
  if (!secret_file.empty()) {
    std::string error;
    auto text = read_text_file(secret_file, error);
    if (!text) {
      std::cerr << "rigcal status: " << error << "\n";
      return exit_no_input;
    }
    secret = text->substr(0, text->find('\n'));
  }
  const std::string request = metrics ? "metrics" : !reset.empty() ? "reset " + reset : channel.empty() ? "status" : "status " + channel;
  std::string answer, error;
  if (!ask(socket, secret, request, answer, error)) {
    std::cerr << "rigcal status: " << error << "\n";
    return exit_unavailable;
  }
  if (metrics || !reset.empty() || as_json) {
    std::cout << answer;
    return exit_ok;
  }
  try {
    const json j = json::parse(answer);
    if (channel.empty())
      print_status(j);
    else
      print_channel(j);
  } catch (const json::exception& e) {
    std::cerr << "rigcal status: unexpected answer from rigcald: " << e.what() << "\n";
    return exit_unavailable;
  }
  return exit_ok;
}

}  // namespace rigcal::tool
