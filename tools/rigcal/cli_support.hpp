#pragma once
// Helpers the commands share: option parsing with uniform error messages, reading input files.
#include <boost/program_options.hpp>
#include <cstdint>
#include <optional>
#include <string>

#include "command.hpp"

namespace rigcal::tool {

namespace po = boost::program_options;

// Parses `args` into `vm`. On --help prints `usage`, `description` (when given) and the options and
// returns exit_ok; on a bad command line prints the problem and returns exit_usage; returns nothing
// when the command should run. `style` is Boost's command-line style; a command whose options take
// negative numbers (--range -50 150) turns short options off so that "-50" reads as a value (it then
// accepts -h by rewriting it to --help).
std::optional<int> parse_command_line(const char* command, const std::string& usage, const Args& args,
                                      const po::options_description& options,
                                      const po::positional_options_description& positional, po::variables_map& vm,
                                      const std::string& description = "",
                                      int style = po::command_line_style::default_style);

// A count given on the command line: digits only (Program_options would read "-1" as 2^64 - 1).
std::optional<std::uint64_t> parse_count(const std::string& text);

// Whole file as text, or a message naming the file and the OS error.
std::optional<std::string> read_text_file(const std::string& path, std::string& error);

}  // namespace rigcal::tool
