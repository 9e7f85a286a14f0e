// Two more schema visitors: the Markdown configuration reference and the channel fingerprint.
#include <cinttypes>
#include <cstdio>
#include <sstream>

#include <cmath>
#include <optional>
#include <vector>

#include "rigcal/config/fingerprint.hpp"
#include "rigcal/config/schema.hpp"

namespace rigcal::config {

namespace schema {
namespace {
// Whole numbers in full (10000000, not 1e+07); others in the shortest general form.
std::string bound_text(double v) {
  if (v == std::floor(v) && std::abs(v) < 1e15) return std::to_string(static_cast<long long>(v));
  std::ostringstream s;
  s << v;
  return s.str();
}
}  // namespace

std::string describe_range(const Range& r, bool integer) {
  std::ostringstream s;
  s << (integer ? "an integer" : "a number");
  const bool has_lo = std::isfinite(r.lo), has_hi = std::isfinite(r.hi);
  if (has_lo && has_hi) {
    if (!r.lo_open && !r.hi_open) {
      s << " from " << bound_text(r.lo) << " to " << bound_text(r.hi);
    } else {
      s << (r.lo_open ? " greater than " : " at least ") << bound_text(r.lo) << (r.hi_open ? " and less than " : " and at most ")
        << bound_text(r.hi);
    }
  } else if (has_lo) {
    s << (r.lo_open ? " greater than " : " at least ") << bound_text(r.lo);
  } else if (has_hi) {
    s << (r.hi_open ? " less than " : " at most ") << bound_text(r.hi);
  }
  return s.str();
}

bool in_range(const Range& r, double v) {
  if (r.lo_open ? !(v > r.lo) : !(v >= r.lo)) return false;
  if (r.hi_open ? !(v < r.hi) : !(v <= r.hi)) return false;
  return true;
}

}  // namespace schema

namespace {

using schema::describe_range;

std::string number_text(double v) {
  if (std::isinf(v)) return v > 0 ? "infinite" : "-infinite";
  std::ostringstream s;
  s << v;
  return s.str();
}

// Collects one row per key: path, accepted values, default, meaning.
class ReferenceWriter {
 public:
  explicit ReferenceWriter(std::string path, std::vector<std::string>& rows) : path_(std::move(path)), rows_(rows) {}

  void text(const char* key, std::string& v, const char* doc, schema::Need need) {
    row(key, "text", need == schema::Need::required ? "required" : (v.empty() ? "empty" : "`" + v + "`"), doc);
  }
  void flag(const char* key, bool& v, const char* doc) { row(key, "true or false", v ? "true" : "false", doc); }
  template <class Int>
  void integer(const char* key, Int& v, schema::Range r, const char* unit, const char* doc, schema::Need need) {
    row(key, describe_range(r, true) + unit_text(unit),
        need == schema::Need::required ? "required" : number_text(static_cast<double>(v)), doc);
  }
  void number(const char* key, double& v, schema::Range r, const char* unit, const char* doc, schema::Need need) {
    row(key, describe_range(r, false) + unit_text(unit), need == schema::Need::required ? "required" : number_text(v),
        doc);
  }
  void optional_number(const char* key, std::optional<double>&, schema::Range r, const char* unit, const char* doc) {
    row(key, describe_range(r, false) + unit_text(unit), "absent", doc);
  }
  void optional_integer(const char* key, std::optional<int>&, schema::Range r, const char* unit, const char* doc) {
    row(key, describe_range(r, true) + unit_text(unit), "absent", doc);
  }
  template <class E>
  void choice(const char* key, E& v, schema::Options<E> options, const char* doc) {
    std::string words, def, notes;
    for (const auto& o : options) {
      words += (words.empty() ? "" : ", ") + std::string("`") + o.name + "`";
      if (o.value == v) def = std::string("`") + o.name + "`";
      if (*o.doc) notes += std::string(" `") + o.name + "`: " + o.doc + ".";
    }
    row(key, "one of " + words, def, std::string(doc) + "." + notes);
  }
  void texts(const char* key, std::vector<std::string>&, const char* doc) { row(key, "list of text", "[]", doc); }
  void networks(const char* key, std::vector<Network>&, const char* doc) {
    row(key, "list of CIDR networks", "[]", doc);
  }
  void number_pair(const char* key, std::optional<double>&, std::optional<double>&, const char* unit,
                   const char* doc) {
    row(key, "[low, high]" + unit_text(unit), "absent", doc);
  }
  template <class T>
  void section(const char* key, T& v, const char* doc) {
    row(key, "map", "", doc);
    ReferenceWriter sub(child(key), rows_);
    schema::describe(sub, v);
  }
  template <class T>
  void optional_section(const char* key, std::optional<T>&, const char* doc) {
    row(key, "map", "absent", doc);
    T v{};
    ReferenceWriter sub(child(key), rows_);
    schema::describe(sub, v);
  }
  template <class T>
  void list(const char* key, std::vector<T>&, const char* doc) {
    row(key, "list of maps", "[]", doc);
    T v{};
    ReferenceWriter sub(child(key) + "[]", rows_);
    schema::describe(sub, v);
  }

 private:
  static std::string unit_text(const char* unit) { return *unit ? std::string(", ") + unit : std::string(); }
  std::string child(const char* key) const { return path_.empty() ? key : path_ + "." + key; }
  void row(const char* key, const std::string& type, const std::string& def, const std::string& doc) {
    rows_.push_back("| `" + child(key) + "` | " + type + " | " + def + " | " + doc + " |");
  }
  std::string path_;
  std::vector<std::string>& rows_;
};

// Serialises every field of a channel exactly (hex floats) and hashes it with FNV-1a, 64 bit.
class FingerprintWriter {
 public:
  void text(const char* key, std::string& v, const char*, schema::Need) { put(key, v); }
  void flag(const char* key, bool& v, const char*) { put(key, v ? "1" : "0"); }
  template <class Int>
  void integer(const char* key, Int& v, schema::Range, const char*, const char*, schema::Need) {
    put(key, std::to_string(v));
  }
  void number(const char* key, double& v, schema::Range, const char*, const char*, schema::Need) { put(key, hex(v)); }
  void optional_number(const char* key, std::optional<double>& v, schema::Range, const char*, const char*) {
    put(key, v ? hex(*v) : "-");
  }
  void optional_integer(const char* key, std::optional<int>& v, schema::Range, const char*, const char*) {
    put(key, v ? std::to_string(*v) : "-");
  }
  template <class E>
  void choice(const char* key, E& v, schema::Options<E>, const char*) {
    put(key, std::to_string(static_cast<int>(v)));
  }
  void texts(const char* key, std::vector<std::string>& v, const char*) {
    for (const auto& s : v) put(key, s);
  }
  void networks(const char* key, std::vector<Network>& v, const char*) {
    for (const auto& n : v) put(key, n.text);
  }
  void number_pair(const char* key, std::optional<double>& lo, std::optional<double>& hi, const char*, const char*) {
    put(key, (lo ? hex(*lo) : "-") + "," + (hi ? hex(*hi) : "-"));
  }
  template <class T>
  void section(const char* key, T& v, const char*) {
    put(key, "{");
    schema::describe(*this, v);
    put(key, "}");
  }
  template <class T>
  void optional_section(const char* key, std::optional<T>& v, const char* doc) {
    if (v) section(key, *v, doc);
  }
  template <class T>
  void list(const char* key, std::vector<T>& v, const char* doc) {
    for (auto& item : v) section(key, item, doc);
  }
  std::uint64_t hash = 1469598103934665603ull;

 private:
  static std::string hex(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%a", v);
    return buf;
  }
  void put(const char* key, const std::string& value) {
    for (const char* p = key; *p; ++p) mix(static_cast<unsigned char>(*p));
    mix('=');
    for (unsigned char c : value) mix(c);
    mix(';');
  }
  void mix(unsigned char c) {
    hash ^= c;
    hash *= 1099511628211ull;
  }
};

}  // namespace

std::string config_reference_markdown() {
  std::vector<std::string> rows;
  Config config;
  ReferenceWriter top("", rows);
  schema::describe_top(top, config);
  std::vector<std::string> channel_rows;
  ChannelConfig channel;
  ReferenceWriter ch("channels[]", channel_rows);
  schema::describe(ch, channel);

  std::string out =
      "# rigcald configuration reference\n\n"
      "Generated from the schema in `daemon/config/schema.hpp` by `rigcald --config-reference`; a test\n"
      "checks that this file matches it. Relative paths are inside `state_directory`. Unknown keys are\n"
      "errors. A commented example is `config/rigcald.yaml`.\n\n"
      "## Daemon\n\n| key | accepted values | default | meaning |\n|---|---|---|---|\n";
  for (const auto& r : rows) out += r + "\n";
  out +=
      "\n## Channels\n\n"
      "Each entry of `channels` describes one sensor. `channel_defaults` takes the same keys except `id`,\n"
      "`description` and `certificate`, and supplies them to every channel that does not set them.\n\n"
      "| key | accepted values | default | meaning |\n|---|---|---|---|\n";
  for (const auto& r : channel_rows) out += r + "\n";
  return out;
}

std::uint64_t channel_fingerprint(const ChannelConfig& c) {
  ChannelConfig copy = c;
  FingerprintWriter w;
  schema::describe(w, copy);
  return w.hash;
}

}  // namespace rigcal::config
