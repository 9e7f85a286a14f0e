#pragma once
// Writes one JSON object as text directly, for records made many thousand times a second (the
// historian feed): building an nlohmann::ordered_json first cost ~90 000 instructions a record,
// mostly allocations for its keys and values. The text is the same as nlohmann's dump(-1) of the
// same object: numbers in its format (shortest round-trip digits; 100.0, 1e-05, 1.5e+20), NaN and
// infinity as null, strings escaped as nlohmann escapes them (invalid UTF-8 replaced by U+FFFD).
#include <cstdint>
#include <string>
#include <string_view>

namespace rigcal::service {

class JsonLine {
 public:
  explicit JsonLine(std::string& out) : out_(out) {}

  JsonLine& open(std::string_view key = {});  // "{" or "key":{
  JsonLine& close();                          // "}"
  JsonLine& text(std::string_view key, std::string_view value);
  JsonLine& number(std::string_view key, double value);  // null unless finite
  JsonLine& unsigned_number(std::string_view key, std::uint64_t value);
  JsonLine& boolean(std::string_view key, bool value);
  JsonLine& null(std::string_view key);

 private:
  void key(std::string_view k);
  std::string& out_;
  bool first_ = true;
};

// nlohmann's text for a finite double.
void append_json_double(std::string& out, double v);
// A JSON string literal, quotes included.
void append_json_string(std::string& out, std::string_view s);

}  // namespace rigcal::service
