#pragma once
// A small CSV reader for calibration data files (RFC 4180 quoting; '#' comment lines and blank lines
// skipped; CRLF or LF). Text in, rows with their line numbers out: no file access here.
#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/result.hpp"

namespace rigcal::table {

struct CsvRow {
  std::size_t line = 0;  // 1-based line number in the text where the row starts
  std::vector<std::string> fields;
};

// Fails on an unterminated quoted field, naming the line where it started.
Result<std::vector<CsvRow>> parse_csv(std::string_view text, char delimiter = ',');

}  // namespace rigcal::table
