#pragma once
// Calibration pairs read from CSV text: which columns hold the reference value, the sensor reading
// and (optionally) weights and standard uncertainties, and the numbers themselves, checked.
//
// Column choice: a column is named by its header or given by 1-based index ("2"). By default the
// columns named `reference` and `sensor` are used when the file has a header with those names,
// otherwise the first column is the reference value x and the second the sensor reading y.
// A header is recognised when the first row has a field that is not a number.
//
// Every error names the source (as given by the caller), the line and the field, e.g.
//   asfound.csv:14: field 2 (sensor): "12,5" is not a number
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/result.hpp"

namespace rigcal::table {

struct PairColumns {
  std::string reference;    // empty: default
  std::string sensor;       // empty: default
  std::string weight;       // empty: no weights
  std::string u_reference;  // empty: none (standard uncertainty of x per row)
  std::string u_sensor;     // empty: none (standard uncertainty of y per row)
  std::string time;         // empty: none (kept as text, for reports)
};

struct PairTable {
  std::vector<double> x, y;
  std::vector<double> w;             // empty unless a weight column was chosen
  std::vector<double> u_x, u_y;      // empty unless chosen
  std::vector<std::string> time;     // empty unless chosen
  std::vector<std::size_t> line;     // source line of each pair
  std::string reference_name = "reference";
  std::string sensor_name = "sensor";
};

Result<PairTable> read_pair_table(std::string_view text, std::string_view source, const PairColumns& columns,
                                  char delimiter = ',');

// Strict decimal number: the whole field must parse, finite values only. Accepts leading/trailing
// blanks, a leading '+', exponents. Returns nothing for anything else (including "nan", "inf").
std::optional<double> parse_finite_number(std::string_view field);

}  // namespace rigcal::table
