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

// Student t critical value t_p(nu) as printed in t_distribution_critical_values.dat (NIST/SEMATECH
// e-Handbook 1.3.6.7.2) for upper-tail p in {0.90, 0.95, 0.975, 0.99, 0.995, 0.999}; nu as printed
// (1..30, 40, 60, 100, or infinity).
inline double printed_t_critical(double nu, double p) {
  const double columns[] = {0.90, 0.95, 0.975, 0.99, 0.995, 0.999};
  std::size_t col = 0;
  while (col < 6 && columns[col] != p) ++col;
  if (col == 6) throw std::runtime_error("t table has no column for p = " + std::to_string(p));
  for (const auto& row : read_rows("t_distribution_critical_values.dat")) {
    if (std::stod(row.at(0)) == nu) return std::stod(row.at(1 + col));
  }
  throw std::runtime_error("t table has no row for nu = " + std::to_string(nu));
}

// Log relative error as NIST StRD defines it: the number of agreeing significant digits.
inline double log_relative_error(double computed, double certified) {
  if (computed == certified) return 16.0;
  if (certified == 0) return -std::log10(std::abs(computed));
  return -std::log10(std::abs(computed - certified) / std::abs(certified));
}

}  // namespace rigcal::test
