#pragma once
// The rigcal tool's commands. Each takes the arguments after its name and returns the process exit
// status (see exit_code).
#include <string>
#include <vector>

namespace rigcal::tool {

// Exit statuses shared by every command (documented in README "Exit statuses").
enum exit_code : int {
  exit_ok = 0,
  exit_usage = 64,      // bad command line
  exit_data = 65,       // input data rejected (file, line and field named on stderr)
  exit_no_input = 66,   // an input file cannot be read
  exit_unavailable = 69,  // the daemon or a network peer cannot be reached
  exit_io = 74,         // an output cannot be written
};

using Args = std::vector<std::string>;

int run_fit(const Args& args);
int run_simulate(const Args& args);
int run_send(const Args& args);
int run_status(const Args& args);
int run_watch(const Args& args);
int run_report(const Args& args);

}  // namespace rigcal::tool
