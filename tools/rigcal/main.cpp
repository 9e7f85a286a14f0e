// rigcal: command-line companion of the rigcald daemon. Dispatches to one command per file.
#include <cstdio>
#include <cstring>
#include <exception>
#include <string_view>

#include "command.hpp"
#include "rigcal/version.hpp"

namespace {

struct CommandEntry {
  const char* name;
  int (*run)(const rigcal::tool::Args&);
  const char* summary;
};

constexpr CommandEntry commands[] = {
    {"fit", rigcal::tool::run_fit, "fit a straight-line calibration to a CSV file of reference/sensor pairs"},
    {"simulate", rigcal::tool::run_simulate, "simulate a calibration rig from a scenario file, reproducibly"},
    {"send", rigcal::tool::run_send, "replay a record file to rigcald over TCP (acknowledged) or a serial line"},
    {"status", rigcal::tool::run_status, "ask a running rigcald where each channel stands"},
    {"watch", rigcal::tool::run_watch, "follow rigcald's historian feed and alerts, one readable line each"},
    {"report", rigcal::tool::run_report, "write the calibration report (HTML and text) from a CSV file or the journal"},
};

void print_usage(std::FILE* out) {
  std::fprintf(out, "usage: rigcal COMMAND [OPTIONS]\n\ncommands:\n");
  for (const auto& c : commands) std::fprintf(out, "  %-10s %s\n", c.name, c.summary);
  std::fprintf(out, "\n'rigcal COMMAND --help' describes a command's options.\n");
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    print_usage(stderr);
    return rigcal::tool::exit_usage;
  }
  const std::string_view name = argv[1];
  if (name == "--help" || name == "-h" || name == "help") {
    print_usage(stdout);
    return rigcal::tool::exit_ok;
  }
  if (name == "--version") {
    std::printf("rigcal %s\n", rigcal::version_string);
    return rigcal::tool::exit_ok;
  }
  for (const auto& c : commands) {
    if (name != c.name) continue;
    try {
      return c.run(rigcal::tool::Args(argv + 2, argv + argc));
    } catch (const std::exception& e) {
      std::fprintf(stderr, "rigcal %s: %s\n", c.name, e.what());
      return rigcal::tool::exit_io;
    }
  }
  std::fprintf(stderr, "rigcal: unknown command '%s'\n\n", argv[1]);
  print_usage(stderr);
  return rigcal::tool::exit_usage;
}
