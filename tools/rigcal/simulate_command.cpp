// rigcal simulate: a reproducible rig simulator. Records of a scenario to standard output, a file,
// rigcald over TCP or a serial device.
#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <charconv>
#include <chrono>
#include <cstring>
#include <fmt/format.h>
#include <iostream>

#include "cli_support.hpp"
#include "delivery.hpp"
#include "delivery_run.hpp"
#include "line_writer.hpp"
#include "rigcal/sim/scenario_loader.hpp"
#include "simulation_feed.hpp"

namespace rigcal::tool {

namespace {

const char* simulate_description =
    "Simulates the rig described by SCENARIO (a YAML file; its format is documented at the top of\n"
    "config/demo-scenario.yaml) on a simulated clock and writes its records as protocol lines.\n"
    "The same scenario, seed and start give the same records, byte for byte.\n"
    "\n"
    "Output goes to standard output (default), --output FILE, rigcald over --tcp (acknowledged and\n"
    "resent like rigcal send) or a --serial device (written only: a serial line has no\n"
    "acknowledgements). Files and standard output are written as fast as possible by default; TCP and\n"
    "serial follow the simulated clock in real time, so that rigcald sees a live rig. --rate and\n"
    "--as-fast-as-possible change the pace of the output, never the simulated timestamps. rigcald\n"
    "refuses records stamped more than time.max_future_s ahead of its clock: to send a long simulation\n"
    "quickly, start it in the past or use --arrival-time.\n"
    "\n"
    "Exit status: 0 on success; 64 for a bad command line; 65 for a scenario that is not valid (each\n"
    "problem named FILE:LINE:COLUMN) or a simulation error; 66 when SCENARIO cannot be read; 74 when\n"
    "the output cannot be written; for TCP and serial, as for rigcal send.\n";

struct SimulateOptions {
  std::string scenario_file, output, seed_text, start_text;
  std::optional<double> duration_s;
  std::optional<std::uint64_t> records;
  bool arrival_time = false;
  DeliveryOptions delivery;
};

protocol::TimeNs now_ms() {
  const auto now = std::chrono::system_clock::now().time_since_epoch();
  return std::chrono::duration_cast<std::chrono::milliseconds>(now).count() * 1'000'000;
}

std::optional<int> usage(const std::string& message) {
  std::cerr << "rigcal simulate: " << message << "\n";
  return exit_usage;
}

// The seed, start and limits: from the command line, else from the scenario.
std::optional<int> resolve_run(const SimulateOptions& o, const sim::Scenario& s, std::uint64_t& seed,
                               protocol::TimeNs& start, SimulationLimits& limits) {
  seed = s.seed;
  if (!o.seed_text.empty()) {
    const auto [end, ec] = std::from_chars(o.seed_text.data(), o.seed_text.data() + o.seed_text.size(), seed);
    if (ec != std::errc{} || end != o.seed_text.data() + o.seed_text.size())
      return usage("--seed must be an integer from 0 to 18446744073709551615, got '" + o.seed_text + "'");
  }
  if (o.start_text == "now") {
    start = now_ms();
  } else if (!o.start_text.empty()) {
    const auto t = protocol::parse_timestamp(o.start_text);
    if (!t.time) return usage("--start '" + o.start_text + "': " + t.error.reason + " (give RFC 3339 UTC or 'now')");
    start = *t.time;
  } else {
    start = s.start_ns.value_or(now_ms());
  }
  if (o.duration_s && !(*o.duration_s > 0)) return usage("--duration must be a number of seconds above 0");
  if (o.records && *o.records == 0) return usage("--records must be at least 1");
  limits.records = o.records;
  limits.duration_s = o.duration_s;
  if (!limits.records && !limits.duration_s) limits.duration_s = s.duration_s;
  if (!limits.records && !limits.duration_s)
    return usage("the scenario sets no duration_s: give --duration SECONDS or --records N");
  return std::nullopt;
}

std::string header_line(const sim::Scenario& s, std::uint64_t seed, protocol::TimeNs start,
                        const SimulationLimits& limits) {
  std::string h = fmt::format("# rigcal simulate: scenario {}, seed {}, start {}", s.name, seed,
                              protocol::format_rfc3339(start, 3));
  if (limits.duration_s) h += fmt::format(", {} s simulated", *limits.duration_s);
  if (limits.records) h += fmt::format(", at most {} records", *limits.records);
  return h + "\n";
}

int write_to_file(const SimulateOptions& o, const sim::Scenario& s, std::uint64_t seed, protocol::TimeNs start,
                  const SimulationLimits& limits, SimulationFeed& feed, Pacer pacer) {
  int fd = STDOUT_FILENO;
  if (!o.output.empty()) {
    fd = ::open(o.output.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
    if (fd < 0) {
      std::cerr << "rigcal simulate: --output " << o.output << ": " << std::strerror(errno) << "\n";
      return exit_io;
    }
  }
  LineWriterSettings settings;
  settings.target = o.output.empty() ? "standard output" : o.output;
  settings.header = header_line(s, seed, start, limits);
  const DeliveryResult r = write_lines(fd, settings, feed, pacer, nullptr);
  if (fd != STDOUT_FILENO && ::close(fd) != 0 && r.failure.empty()) {
    std::cerr << "rigcal simulate: --output " << o.output << ": " << std::strerror(errno) << "\n";
    return exit_io;
  }
  if (!r.failure.empty()) {
    std::cerr << "rigcal simulate: " << r.failure << "\n";
    return r.failure_status;
  }
  return exit_ok;
}

}  // namespace

int run_simulate(const Args& args) {
  SimulateOptions o;
  DeliveryOptions& d = o.delivery;
  po::options_description options("options");
  options.add_options()
      ("scenario", po::value(&o.scenario_file)->required(), "scenario file (YAML)")
      ("output", po::value(&o.output), "write the records to FILE (default: standard output)")
      ("tcp", po::value(&d.tcp), "send the records to rigcald's TCP listener at HOST:PORT ([IPV6]:PORT)")
      ("serial", po::value(&d.serial), "write the records to the serial DEVICE")
      ("seed", po::value(&o.seed_text), "seed of the random numbers (default: the scenario's seed, else 1)")
      ("start", po::value(&o.start_text), "simulated start, RFC 3339 UTC or 'now' (default: the scenario's start, else now)")
      ("duration", po::value<double>(), "simulated seconds to run (default: the scenario's duration_s)")
      ("records", po::value<std::string>(), "stop after N records (with --duration: whichever comes first)")
      ("rate", po::value<double>(), "write N records per second of real time")
      ("as-fast-as-possible", po::bool_switch(&d.as_fast_as_possible), "no pacing (default for files)")
      ("arrival-time", po::bool_switch(&o.arrival_time), "write '-' as the time: rigcald stamps records on arrival");
  options.add(tcp_option_descriptions(d)).add(serial_option_descriptions(d));
  po::positional_options_description positional;
  positional.add("scenario", 1);
  po::variables_map vm;
  if (auto done = parse_command_line("simulate", "SCENARIO [options]", args, options, positional, vm,
                                     simulate_description))
    return *done;
  if (vm.count("rate")) d.rate = vm["rate"].as<double>();
  if (vm.count("duration")) o.duration_s = vm["duration"].as<double>();
  if (vm.count("records")) {
    o.records = parse_count(vm["records"].as<std::string>());
    if (!o.records) return *usage("--records must be a whole number, got '" + vm["records"].as<std::string>() + "'");
  }
  if (!o.output.empty() && (!d.tcp.empty() || !d.serial.empty()))
    return *usage("give one of --output, --tcp and --serial");
  if (auto bad = check_delivery_options("simulate", d)) return *bad;

  std::string error;
  auto text = read_text_file(o.scenario_file, error);
  if (!text) {
    std::cerr << "rigcal simulate: " << error << "\n";
    return exit_no_input;
  }
  const auto loaded = sim::load_scenario(*text, o.scenario_file);
  for (const auto& e : loaded.errors) std::cerr << "rigcal simulate: " << e.to_string() << "\n";
  if (!loaded.ok()) return exit_data;
  const sim::Scenario& s = loaded.scenario;

  std::uint64_t seed = 0;
  protocol::TimeNs start = 0;
  SimulationLimits limits;
  if (auto bad = resolve_run(o, s, seed, start, limits)) return *bad;
  SimulationFeed feed(s, seed, start, limits, o.arrival_time);

  if (d.tcp.empty() && d.serial.empty())
    return write_to_file(o, s, seed, start, limits, feed, choose_pacer(d, Pacer::as_fast_as_possible()));
  // A rerun of the same simulation (scenario, seed, start) is the same stream and resumes; any
  // other is a stream of its own, so that the daemon never takes its records for duplicates.
  const std::string stream =
      stream_name_from(fmt::format("sim:{}:{}:{}:{}", host_name(), s.name, seed, start / 1'000'000'000));
  DeliveryPlan plan{"simulate", o.scenario_file, d, stream, choose_pacer(d, Pacer::simulated_clock())};
  return run_delivery(plan, feed, vm);
}

}  // namespace rigcal::tool
