#include "rigcal/table/pair_table.hpp"

#include <charconv>
#include <cmath>

#include "rigcal/table/csv.hpp"

namespace rigcal::table {

std::optional<double> parse_finite_number(std::string_view field) {
  while (!field.empty() && (field.front() == ' ' || field.front() == '\t')) field.remove_prefix(1);
  while (!field.empty() && (field.back() == ' ' || field.back() == '\t')) field.remove_suffix(1);
  if (!field.empty() && field.front() == '+') field.remove_prefix(1);
  if (field.empty()) return std::nullopt;
  double value = 0;
  const auto [end, ec] = std::from_chars(field.data(), field.data() + field.size(), value);
  if (ec != std::errc{} || end != field.data() + field.size() || !std::isfinite(value)) return std::nullopt;
  return value;
}

namespace {

struct Column {
  std::size_t index = 0;  // 0-based
  std::string name;
};

bool looks_like_header(const CsvRow& row) {
  for (const auto& f : row.fields)
    if (!parse_finite_number(f)) return true;
  return false;
}

// Resolves a column given by header name or 1-based index; `fallback` is used when `spec` is empty.
Result<Column> resolve(const std::string& spec, const std::vector<std::string>* header, std::string_view source,
                       std::size_t fallback, const char* role) {
  if (spec.empty()) {
    Column c{fallback, header && fallback < header->size() ? (*header)[fallback] : role};
    return c;
  }
  if (header) {
    for (std::size_t i = 0; i < header->size(); ++i)
      if ((*header)[i] == spec) return Column{i, spec};
  }
  std::size_t index = 0;
  const auto [end, ec] = std::from_chars(spec.data(), spec.data() + spec.size(), index);
  if (ec == std::errc{} && end == spec.data() + spec.size() && index >= 1)
    return Column{index - 1, header && index - 1 < header->size() ? (*header)[index - 1] : spec};
  std::string known;
  if (header)
    for (const auto& h : *header) known += (known.empty() ? "" : ", ") + h;
  return Error{std::string(source) + ": no column '" + spec + "' for the " + role +
               (header ? " (the header has: " + known + ")" : " (the file has no header; give a 1-based index)")};
}

std::size_t default_index(const std::vector<std::string>* header, const char* name, std::size_t fallback) {
  if (header)
    for (std::size_t i = 0; i < header->size(); ++i)
      if ((*header)[i] == name) return i;
  return fallback;
}

}  // namespace

Result<PairTable> read_pair_table(std::string_view text, std::string_view source, const PairColumns& columns,
                                  char delimiter) {
  auto parsed = parse_csv(text, delimiter);
  if (!parsed) return Error{std::string(source) + ": " + parsed.error().message};
  std::vector<CsvRow>& rows = parsed.value();
  if (rows.empty()) return Error{std::string(source) + ": no data rows"};

  const bool has_header = looks_like_header(rows.front());
  const std::vector<std::string>* header = has_header ? &rows.front().fields : nullptr;
  const std::size_t x_default = default_index(header, "reference", 0);
  const std::size_t y_default = default_index(header, "sensor", x_default == 0 ? 1 : 0);

  struct Want {
    const std::string& spec;
    std::vector<double>* out;
    const char* role;
    std::size_t fallback;
    bool optional;
  };
  PairTable table;
  std::vector<Want> wanted = {
      {columns.reference, &table.x, "reference value", x_default, false},
      {columns.sensor, &table.y, "sensor reading", y_default, false},
      {columns.weight, &table.w, "weight", 0, true},
      {columns.u_reference, &table.u_x, "reference uncertainty", 0, true},
      {columns.u_sensor, &table.u_y, "sensor uncertainty", 0, true},
  };
  std::vector<std::pair<Column, Want*>> chosen;
  for (auto& want : wanted) {
    if (want.optional && want.spec.empty()) continue;
    auto col = resolve(want.spec, header, source, want.fallback, want.role);
    if (!col) return col.error();
    chosen.emplace_back(col.value(), &want);
  }
  table.reference_name = chosen[0].first.name;
  table.sensor_name = chosen[1].first.name;
  std::optional<Column> time_col;
  if (!columns.time.empty()) {
    auto col = resolve(columns.time, header, source, 0, "time");
    if (!col) return col.error();
    time_col = col.value();
  }

  for (std::size_t r = has_header ? 1 : 0; r < rows.size(); ++r) {
    const CsvRow& row = rows[r];
    const std::string where = std::string(source) + ":" + std::to_string(row.line) + ": ";
    for (auto& [col, want] : chosen) {
      if (col.index >= row.fields.size())
        return Error{where + "row has " + std::to_string(row.fields.size()) + " field(s), but the " + want->role +
                     " is field " + std::to_string(col.index + 1) + " (" + col.name + ")"};
      const std::string& field = row.fields[col.index];
      auto value = parse_finite_number(field);
      if (!value)
        return Error{where + "field " + std::to_string(col.index + 1) + " (" + col.name + "): \"" + field +
                     "\" is not a finite number"};
      if ((want->out == &table.w || want->out == &table.u_x || want->out == &table.u_y) && !(*value > 0))
        return Error{where + "field " + std::to_string(col.index + 1) + " (" + col.name + "): " + want->role +
                     " must be greater than zero, got " + field};
      want->out->push_back(*value);
    }
    if (time_col) {
      if (time_col->index >= row.fields.size())
        return Error{where + "row has no field " + std::to_string(time_col->index + 1) + " (" + time_col->name + ")"};
      table.time.push_back(row.fields[time_col->index]);
    }
    table.line.push_back(row.line);
  }
  return table;
}

}  // namespace rigcal::table
