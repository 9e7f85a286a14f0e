#include "cli_support.hpp"

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <iostream>
#include <sstream>

namespace rigcal::tool {

std::optional<int> parse_command_line(const char* command, const std::string& usage, const Args& args,
                                      const po::options_description& options,
                                      const po::positional_options_description& positional,
                                      po::variables_map& vm, const std::string& description, int style) {
  po::options_description all = options;
  all.add_options()("help,h", "show this help");
  Args words = args;
  if (!(style & po::command_line_style::allow_short))
    std::replace(words.begin(), words.end(), std::string("-h"), std::string("--help"));
  try {
    po::store(po::command_line_parser(words).options(all).positional(positional).style(style).run(), vm);
    if (vm.count("help")) {
      std::cout << "usage: rigcal " << command << " " << usage << "\n\n";
      if (!description.empty()) std::cout << description << "\n";
      std::cout << all << "\n";
      return exit_ok;
    }
    po::notify(vm);
  } catch (const po::error& e) {
    std::cerr << "rigcal " << command << ": " << e.what() << "\nusage: rigcal " << command << " " << usage
              << "  (--help for options)\n";
    return exit_usage;
  }
  return std::nullopt;
}

std::optional<std::uint64_t> parse_count(const std::string& text) {
  std::uint64_t v = 0;
  const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
  if (text.empty() || ec != std::errc{} || end != text.data() + text.size()) return std::nullopt;
  return v;
}

std::optional<std::string> read_text_file(const std::string& path, std::string& error) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    error = path + ": " + std::strerror(errno);
    return std::nullopt;
  }
  std::ostringstream text;
  text << in.rdbuf();
  if (in.bad()) {
    error = path + ": read error";
    return std::nullopt;
  }
  return text.str();
}

}  // namespace rigcal::tool
