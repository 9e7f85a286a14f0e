#include "reader.hpp"

#include <arpa/inet.h>

#include <algorithm>
#include <sstream>

#include "rigcal/table/pair_table.hpp"

namespace rigcal::config {

void ReadContext::error(const YAML::Mark& mark, const std::string& path, std::string message) {
  ConfigError e;
  e.file = file;
  if (!mark.is_null()) {
    e.line = mark.line + 1;
    e.column = mark.column + 1;
  }
  e.path = path;
  e.message = std::move(message);
  errors.push_back(std::move(e));
}

void ReadContext::error_at_path(const std::string& path, std::string message) {
  // Use the mark of the path itself, or of its nearest enclosing part that was read.
  std::string p = path;
  while (!p.empty()) {
    if (auto it = marks.find(p); it != marks.end()) {
      error(it->second, path, std::move(message));
      return;
    }
    const auto cut = p.find_last_of(".[");
    p = cut == std::string::npos ? std::string() : p.substr(0, cut);
  }
  error(YAML::Mark::null_mark(), path, std::move(message));
}

std::optional<Network> parse_network(const std::string& text) {
  Network n;
  n.text = text;
  const auto slash = text.find('/');
  const std::string addr = text.substr(0, slash);
  n.v6 = addr.find(':') != std::string::npos;
  if (inet_pton(n.v6 ? AF_INET6 : AF_INET, addr.c_str(), n.bytes) != 1) return std::nullopt;
  const int max_prefix = n.v6 ? 128 : 32;
  n.prefix = max_prefix;
  if (slash != std::string::npos) {
    const std::string p = text.substr(slash + 1);
    int prefix = -1;
    const auto [end, ec] = std::from_chars(p.data(), p.data() + p.size(), prefix);
    if (p.empty() || ec != std::errc{} || end != p.data() + p.size() || prefix < 0 || prefix > max_prefix)
      return std::nullopt;
    n.prefix = prefix;
  }
  return n;
}

namespace {
std::size_t edit_distance(const std::string& a, const std::string& b) {
  std::vector<std::size_t> prev(b.size() + 1), cur(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) prev[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    cur[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j)
      cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1)});
    std::swap(prev, cur);
  }
  return prev[b.size()];
}
}  // namespace

std::string suggest_key(const std::string& unknown, const std::vector<std::string>& known) {
  std::string best;
  std::size_t best_d = std::max<std::size_t>(2, unknown.size() / 3) + 1;
  for (const auto& k : known) {
    const std::size_t d = edit_distance(unknown, k);
    if (d < best_d) {
      best_d = d;
      best = k;
    }
  }
  return best;
}

std::optional<YAML::Node> parse_top_map(std::string_view yaml_text, ReadContext& ctx, const char* example) {
  YAML::Node root;
  try {
    root = YAML::Load(std::string(yaml_text));
  } catch (const YAML::Exception& e) {
    ctx.error(e.mark, "", "not valid YAML: " + e.msg);
    return std::nullopt;
  }
  if (!root.IsMap()) {
    ctx.error(root.Mark(), "", std::string("expected a map of keys at the top level (see ") + example + ")");
    return std::nullopt;
  }
  return root;
}

YamlReader::YamlReader(YAML::Node map, std::string path, ReadContext& ctx)
    : map_(std::move(map)), path_(std::move(path)), ctx_(ctx) {}

YAML::Node YamlReader::take(const char* key) {
  known_.emplace_back(key);
  for (auto it = map_.begin(); it != map_.end(); ++it) {
    if (it->first.IsScalar() && it->first.Scalar() == key) {
      ctx_.marks[child(key)] = it->second.IsNull() ? it->first.Mark() : it->second.Mark();
      return it->second;
    }
  }
  return YAML::Node(YAML::NodeType::Undefined);
}

void YamlReader::check_unknown_keys() {
  std::map<std::string, int> seen;
  for (auto it = map_.begin(); it != map_.end(); ++it) {
    const YAML::Node k = it->first;
    if (!k.IsScalar()) {
      ctx_.error(k.Mark(), path_, "keys must be plain words");
      continue;
    }
    const std::string name = k.Scalar();
    if (++seen[name] == 2) {
      ctx_.error(k.Mark(), child(name.c_str()), "duplicate key (each key may appear once)");
      continue;
    }
    if (std::find(known_.begin(), known_.end(), name) != known_.end()) continue;
    std::string message = "unknown key '" + name + "'";
    if (const std::string s = suggest_key(name, known_); !s.empty()) message += " (did you mean '" + s + "'?)";
    ctx_.error(k.Mark(), child(name.c_str()), std::move(message));
  }
}

std::optional<double> YamlReader::scalar_number(const YAML::Node& n, const std::string& path, schema::Range range,
                                                bool integer) {
  const std::string expected = describe_range(range, integer);
  if (!n.IsScalar() || n.Scalar().empty()) {
    error(n, path, "expected " + expected + (n.IsNull() ? ", got nothing" : ""));
    return std::nullopt;
  }
  const std::string& s = n.Scalar();
  std::optional<double> v;
  if (integer) {
    long long i = 0;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), i);
    if (ec == std::errc{} && end == s.data() + s.size()) v = static_cast<double>(i);
  } else {
    v = table::parse_finite_number(s);
  }
  if (!v || !in_range(range, *v)) {
    error(n, path, "expected " + expected + ", got '" + s + "'");
    return std::nullopt;
  }
  return v;
}

void YamlReader::text(const char* key, std::string& out, const char*, schema::Need need) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) {
    if (need == schema::Need::required) ctx_.error(map_.Mark(), child(key), "required key is missing");
    return;
  }
  if (!n.IsScalar()) {
    error(n, child(key), "expected text");
    return;
  }
  out = n.Scalar();
  if (need == schema::Need::required && out.empty()) error(n, child(key), "must not be empty");
}

void YamlReader::flag(const char* key, bool& out, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  if (n.IsScalar() && (n.Scalar() == "true" || n.Scalar() == "false")) {
    out = n.Scalar() == "true";
    return;
  }
  error(n, child(key), "expected true or false" + (n.IsScalar() ? ", got '" + n.Scalar() + "'" : std::string()));
}

void YamlReader::number(const char* key, double& out, schema::Range range, const char*, const char*,
                        schema::Need need) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) {
    if (need == schema::Need::required) ctx_.error(map_.Mark(), child(key), "required key is missing");
    return;
  }
  if (auto v = scalar_number(n, child(key), range, false)) out = *v;
}

void YamlReader::optional_number(const char* key, std::optional<double>& out, schema::Range range, const char*,
                                 const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  if (auto v = scalar_number(n, child(key), range, false)) out = *v;
}

void YamlReader::optional_integer(const char* key, std::optional<int>& out, schema::Range range, const char*,
                                  const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  if (auto v = scalar_number(n, child(key), range, true)) out = static_cast<int>(*v);
}

void YamlReader::texts(const char* key, std::vector<std::string>& out, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined() || n.IsNull()) return;
  if (!n.IsSequence()) {
    error(n, child(key), "expected a list of text");
    return;
  }
  out.clear();
  for (std::size_t i = 0; i < n.size(); ++i) {
    if (!n[i].IsScalar()) {
      error(n[i], child(key) + "[" + std::to_string(i) + "]", "expected text");
      continue;
    }
    out.push_back(n[i].Scalar());
  }
}

void YamlReader::networks(const char* key, std::vector<Network>& out, const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined() || n.IsNull()) return;
  if (!n.IsSequence()) {
    error(n, child(key), "expected a list of networks in CIDR form, e.g. [10.20.0.0/16, ::1/128]");
    return;
  }
  out.clear();
  for (std::size_t i = 0; i < n.size(); ++i) {
    const std::string p = child(key) + "[" + std::to_string(i) + "]";
    std::optional<Network> net;
    if (n[i].IsScalar()) net = parse_network(n[i].Scalar());
    if (!net) {
      error(n[i], p, "expected an IPv4 or IPv6 network in CIDR form, e.g. 192.168.10.0/24" +
                         (n[i].IsScalar() ? ", got '" + n[i].Scalar() + "'" : std::string()));
      continue;
    }
    out.push_back(*net);
  }
}

void YamlReader::number_pair(const char* key, std::optional<double>& lo, std::optional<double>& hi, const char*,
                             const char*) {
  YAML::Node n = take(key);
  if (!n.IsDefined()) return;
  if (!n.IsSequence() || n.size() != 2) {
    error(n, child(key), "expected [low, high]");
    return;
  }
  auto a = scalar_number(n[0], child(key) + "[0]", schema::any, false);
  auto b = scalar_number(n[1], child(key) + "[1]", schema::any, false);
  if (!a || !b) return;
  if (!(*a < *b)) {
    error(n, child(key), "low must be less than high");
    return;
  }
  lo = a;
  hi = b;
}

}  // namespace rigcal::config
