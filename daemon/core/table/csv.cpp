#include "rigcal/table/csv.hpp"

namespace rigcal::table {

namespace {

bool is_blank_or_comment(std::string_view line) {
  for (char c : line) {
    if (c == '#') return true;
    if (c != ' ' && c != '\t' && c != '\r') return false;
  }
  return true;
}

}  // namespace

Result<std::vector<CsvRow>> parse_csv(std::string_view text, char delimiter) {
  std::vector<CsvRow> rows;
  std::size_t pos = 0, line = 1;
  while (pos < text.size()) {
    // Skip whole comment / blank lines (only at the start of a record).
    std::size_t eol = text.find('\n', pos);
    std::string_view first_line = text.substr(pos, eol == std::string_view::npos ? text.size() - pos : eol - pos);
    if (is_blank_or_comment(first_line)) {
      if (eol == std::string_view::npos) break;
      pos = eol + 1;
      ++line;
      continue;
    }
    CsvRow row;
    row.line = line;
    std::string field;
    bool in_quotes = false, quoted = false;
    const std::size_t start_line = line;
    for (;; ++pos) {
      if (pos >= text.size()) {
        if (in_quotes) return Error{"line " + std::to_string(start_line) + ": quoted field is never closed"};
        break;
      }
      const char c = text[pos];
      if (in_quotes) {
        if (c == '"') {
          if (pos + 1 < text.size() && text[pos + 1] == '"') {
            field += '"';
            ++pos;
          } else {
            in_quotes = false;
          }
        } else {
          if (c == '\n') ++line;
          field += c;
        }
        continue;
      }
      if (c == '"' && field.find_first_not_of(" \t") == std::string::npos) {
        field.clear();
        in_quotes = quoted = true;
      } else if (c == delimiter) {
        row.fields.push_back(std::move(field));
        field.clear();
        quoted = false;
      } else if (c == '\n') {
        break;
      } else if (c == '\r' && (pos + 1 >= text.size() || text[pos + 1] == '\n')) {
        // CRLF: the CR belongs to the line ending
      } else {
        field += c;
      }
    }
    (void)quoted;
    row.fields.push_back(std::move(field));
    rows.push_back(std::move(row));
    if (pos < text.size()) {
      ++pos;  // past '\n'
      ++line;
    }
  }
  return rows;
}

}  // namespace rigcal::table
