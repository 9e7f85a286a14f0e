// rigcald: the calibration-monitoring daemon. Parses the command line, then either answers a
// one-shot question (--version, --check-config, --config-reference) or runs the service.
#include <boost/program_options.hpp>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <sstream>

#include "rigcal/config/loader.hpp"
#include "rigcal/version.hpp"
#include "service/exit_codes.hpp"
#include "service/run.hpp"

namespace po = boost::program_options;
namespace exit_code = rigcal::service::exit_code;

namespace {

// Reads and validates a configuration file; prints every problem to stderr.
std::optional<rigcal::config::Config> load(const std::string& path) {
  std::ifstream in(path);
  if (!in) {
    std::cerr << "rigcald: " << path << ": cannot read the configuration file\n";
    return std::nullopt;
  }
  std::ostringstream text;
  text << in.rdbuf();
  auto result = rigcal::config::load_config(text.str(), path);
  for (const auto& e : result.errors) std::cerr << e.to_string() << "\n";
  if (!result.ok()) {
    std::cerr << "rigcald: " << result.errors.size() << " problem(s) in " << path << "\n";
    return std::nullopt;
  }
  return std::move(result.config);
}

}  // namespace

int main(int argc, char** argv) {
  po::options_description options("rigcald options");
  std::string config_path, check_path, state_override;
  options.add_options()
      ("help,h", "show this help and exit")
      ("version", "print the version and exit")
      ("config,c", po::value(&config_path), "configuration file (YAML) to run with")
      ("check-config", po::value(&check_path), "validate a configuration file and exit (0 if valid)")
      ("config-reference", "print the configuration reference (Markdown) and exit")
      ("state-directory", po::value(&state_override), "use this state directory instead of the file's");
  po::positional_options_description positional;
  positional.add("config", 1);
  po::variables_map vm;
  try {
    po::store(po::command_line_parser(argc, argv).options(options).positional(positional).run(), vm);
    po::notify(vm);
  } catch (const po::error& e) {
    std::cerr << "rigcald: " << e.what() << "\nusage: rigcald [--config] FILE  (--help for options)\n";
    return exit_code::usage;
  }
  if (vm.count("help")) {
    std::cout << "usage: rigcald [--config] FILE\n\n"
                 "Monitors the straight-line calibration of plant sensors against reference standards,\n"
                 "alerts on drift and feeds corrected averages to the historian. Decision support only:\n"
                 "not a safety function.\n\n"
              << options << "\nExit statuses: 0 clean stop, 64 usage, 78 bad configuration, 73 state\n"
                 "directory unusable, 74 state could not be restored, 75 an input or output could not be\n"
                 "opened, 70 internal error.\n";
    return exit_code::ok;
  }
  if (vm.count("version")) {
    std::cout << "rigcald " << rigcal::version_string << "\n";
    return exit_code::ok;
  }
  if (vm.count("config-reference")) {
    std::cout << rigcal::config::config_reference_markdown();
    return exit_code::ok;
  }
  if (!check_path.empty()) {
    auto config = load(check_path);
    if (!config) return exit_code::config;
    std::cout << check_path << ": valid (" << config->channels.size() << " channel(s), "
              << config->inputs.tcp.size() << " TCP and " << config->inputs.serial.size() << " serial input(s))\n";
    return exit_code::ok;
  }
  if (config_path.empty()) {
    std::cerr << "rigcald: no configuration file given\nusage: rigcald [--config] FILE  (--help for options)\n";
    return exit_code::usage;
  }
  auto config = load(config_path);
  if (!config) return exit_code::config;
  if (!state_override.empty()) config->state_directory = state_override;
  return rigcal::service::run(std::move(*config));
}
