#pragma once
// YamlReader: the schema visitor that reads one YAML map into a config struct, strictly. Absent keys
// leave the struct's value (its default) untouched; present keys must parse completely and lie in
// range; unknown and duplicate keys are errors. All problems go to the shared ReadContext.
#include <yaml-cpp/yaml.h>

#include <charconv>
#include <cmath>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "rigcal/config/loader.hpp"
#include "rigcal/config/schema.hpp"

namespace rigcal::config {

struct ReadContext {
  std::string file;
  std::vector<ConfigError> errors;
  std::map<std::string, YAML::Mark> marks;  // path -> where its value is in the file

  void error(const YAML::Mark& mark, const std::string& path, std::string message);
  // Error tied to a path read earlier (its mark), for checks that look at several fields.
  void error_at_path(const std::string& path, std::string message);
};

using schema::describe_range;
using schema::in_range;
std::optional<Network> parse_network(const std::string& text);
std::string suggest_key(const std::string& unknown, const std::vector<std::string>& known);

// Parses a YAML document whose top level must be a map; on failure records the error (with the file
// named after `example` for the expected shape) and returns nothing.
std::optional<YAML::Node> parse_top_map(std::string_view yaml_text, ReadContext& ctx, const char* example);

class YamlReader {
 public:
  YamlReader(YAML::Node map, std::string path, ReadContext& ctx);

  void text(const char* key, std::string& out, const char* doc, schema::Need need);
  void flag(const char* key, bool& out, const char* doc);
  template <class Int>
  void integer(const char* key, Int& out, schema::Range range, const char* unit, const char* doc, schema::Need need);
  void number(const char* key, double& out, schema::Range range, const char* unit, const char* doc, schema::Need need);
  void optional_number(const char* key, std::optional<double>& out, schema::Range range, const char* unit,
                       const char* doc);
  void optional_integer(const char* key, std::optional<int>& out, schema::Range range, const char* unit,
                        const char* doc);
  template <class E>
  void choice(const char* key, E& out, schema::Options<E> options, const char* doc);
  void texts(const char* key, std::vector<std::string>& out, const char* doc);
  void networks(const char* key, std::vector<Network>& out, const char* doc);
  void number_pair(const char* key, std::optional<double>& lo, std::optional<double>& hi, const char* unit,
                   const char* doc);
  template <class T>
  void section(const char* key, T& out, const char* doc);
  template <class T>
  void optional_section(const char* key, std::optional<T>& out, const char* doc);
  template <class T>
  void list(const char* key, std::vector<T>& out, const char* doc);

  // Reads the node under `key` (if present) and marks the key as known; returns the undefined node
  // when absent. Used for keys the schema does not describe (channel_defaults, channels).
  YAML::Node take(const char* key);
  // Reports keys that no visitor call named, and duplicate keys.
  void check_unknown_keys();

  const std::string& path() const { return path_; }
  ReadContext& context() { return ctx_; }

 private:
  std::string child(const char* key) const { return path_.empty() ? key : path_ + "." + key; }
  std::optional<double> scalar_number(const YAML::Node& n, const std::string& path, schema::Range range,
                                      bool integer);
  void error(const YAML::Node& n, const std::string& path, std::string message) {
    ctx_.error(n.Mark(), path, std::move(message));
  }

  YAML::Node map_;
  std::string path_;
  ReadContext& ctx_;
  std::vector<std::string> known_;
};

// ---- templates ----

template <class Int>
void YamlReader::integer(const char* key, Int& out, schema::Range range, const char* unit, const char*,
                         schema::Need need) {
  (void)unit;
  YAML::Node n = take(key);
  if (!n.IsDefined()) {
    if (need == schema::Need::required) ctx_.error(map_.Mark(), child(key), "required key is missing");
    return;
  }
  if (auto v = scalar_number(n, child(key), range, true)) out = static_cast<Int>(*v);
}

template <class E>
void YamlReader::choice(const char* key, E& out, schema::Options<E> options, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  std::string words;
  for (const auto& o : options) words += (words.empty() ? "" : ", ") + std::string(o.name);
  if (!n.IsScalar()) {
    error(n, child(key), "expected one of " + words);
    return;
  }
  for (const auto& o : options) {
    if (n.Scalar() == o.name) {
      out = o.value;
      return;
    }
  }
  error(n, child(key), "expected one of " + words + ", got '" + n.Scalar() + "'");
}

template <class T>
void YamlReader::section(const char* key, T& out, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  if (!n.IsMap()) {
    error(n, child(key), "expected a map of keys");
    return;
  }
  YamlReader sub(n, child(key), ctx_);
  schema::describe(sub, out);
  sub.check_unknown_keys();
}

template <class T>
void YamlReader::optional_section(const char* key, std::optional<T>& out, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  if (!n.IsMap()) {
    error(n, child(key), "expected a map of keys");
    return;
  }
  out.emplace();
  YamlReader sub(n, child(key), ctx_);
  schema::describe(sub, *out);
  sub.check_unknown_keys();
}

template <class T>
void YamlReader::list(const char* key, std::vector<T>& out, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined() || n.IsNull()) return;
  if (!n.IsSequence()) {
    error(n, child(key), "expected a list");
    return;
  }
  for (std::size_t i = 0; i < n.size(); ++i) {
    const std::string p = child(key) + "[" + std::to_string(i) + "]";
    YAML::Node item = n[i];
    if (!item.IsMap()) {
      error(item, p, "expected a map of keys");
      continue;
    }
    ctx_.marks[p] = item.Mark();
    T value{};
    YamlReader sub(item, p, ctx_);
    schema::describe(sub, value);
    sub.check_unknown_keys();
    out.push_back(std::move(value));
  }
}

}  // namespace rigcal::config
