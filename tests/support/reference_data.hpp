#pragma once
// Readers for the published reference files in tests/data (formats described in tests/data/README.md):
// `.dat` files are '#' comments then whitespace-separated columns; `.certified` / `.expected` files
// are '#' comments then `name value` lines.
#include <cmath>
#include <fstream>
#include <map>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

namespace rigcal::test {

inline std::string data_path(const std::string& name) { return std::string(RIGCAL_TEST_DATA_DIR) + "/" + name; }

// Rows of whitespace-separated fields, comments and blank lines dropped.
inline std::vector<std::vector<std::string>> read_rows(const std::string& name) {
  std::ifstream in(data_path(name));
  if (!in) throw std::runtime_error("cannot open test data " + data_path(name));
  std::vector<std::vector<std::string>> rows;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    std::istringstream fields(line);
    std::vector<std::string> row;
    for (std::string f; fields >> f;) row.push_back(f);
    if (!row.empty()) rows.push_back(row);
  }
  return rows;
}

inline std::vector<double> column(const std::string& name, std::size_t index) {
  std::vector<double> out;
  for (const auto& row : read_rows(name)) out.push_back(std::stod(row.at(index)));
  return out;
}

inline std::map<std::string, double> read_named_values(const std::string& name) {
  std::map<std::string, double> out;
  for (const auto& row : read_rows(name)) out[row.at(0)] = std::stod(row.at(1));
  return out;
}

// Log relative error as NIST StRD defines it: the number of agreeing significant digits.
inline double log_relative_error(double computed, double certified) {
  if (computed == certified) return 16.0;
  if (certified == 0) return -std::log10(std::abs(computed));
  return -std::log10(std::abs(computed - certified) / std::abs(certified));
}

}  // namespace rigcal::test
