// load_scenario: the simulator's scenario files, read with the configuration's strict YamlReader so
// that both kinds of file behave alike (messages, "did you mean", range checks). The scenario has no
// schema visitor of its own: it is read here directly, section by section, and check_scenario then
// judges what no single key can.
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <charconv>

#include "reader.hpp"
#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/sim/scenario_loader.hpp"
#include "rigcal/table/pair_table.hpp"

namespace rigcal::sim {

namespace {

using config::ReadContext;
using config::YamlReader;
namespace schema = config::schema;
using schema::Need;

constexpr const char* channel_units = "channel units";

std::string child_path(const YamlReader& r, const char* key) {
  return r.path().empty() ? key : r.path() + "." + key;
}

// Reads the map under `key` with `body`, then refuses its unknown keys. Returns false when absent.
template <class Body>
bool read_section(YamlReader& parent, const char* key, Body&& body) {
  YAML::Node n = parent.take(key);
  const std::string path = child_path(parent, key);
  if (!n.IsDefined() || n.IsNull()) return false;
  if (!n.IsMap()) {
    parent.context().error(n.Mark(), path, "expected a map of keys");
    return false;
  }
  YamlReader sub(n, path, parent.context());
  body(sub);
  sub.check_unknown_keys();
  return true;
}

void read_schedule(YamlReader& r, Schedule& s) {
  r.number("interval_s", s.interval_s, schema::positive, "s", "", Need::required);
}

void read_set_point_list(YamlReader& r, std::vector<double>& out) {
  YAML::Node n = r.take("set_points");
  if (!n.IsDefined()) return;
  const std::string path = child_path(r, "set_points");
  if (!n.IsSequence()) {
    r.context().error(n.Mark(), path, "expected a list of numbers, e.g. [20, 60, 100]");
    return;
  }
  for (std::size_t i = 0; i < n.size(); ++i) {
    std::optional<double> v;
    if (n[i].IsScalar()) v = table::parse_finite_number(n[i].Scalar());
    if (!v) {
      r.context().error(n[i].Mark(), path + "[" + std::to_string(i) + "]", "expected a number");
      continue;
    }
    out.push_back(*v);
  }
}

void read_spread(YamlReader& r, std::vector<double>& out) {
  double low = 0, high = 0;
  int count = 0;
  r.number("low", low, schema::any, channel_units, "", Need::required);
  r.number("high", high, schema::any, channel_units, "", Need::required);
  r.integer("count", count, schema::Range{2, 10000}, "", "", Need::required);
  if (count < 2) return;  // already reported
  if (!(low < high)) {
    r.context().error_at_path(r.path() + ".high", "must be greater than low");
    return;
  }
  for (int i = 0; i < count; ++i) out.push_back(low + (high - low) * i / (count - 1));
}

void read_profile(YamlReader& r, ReferenceProfile& p) {
  read_set_point_list(r, p.set_points);
  const bool listed = !p.set_points.empty();
  const bool spread = read_section(r, "spread", [&](YamlReader& s) { read_spread(s, p.set_points); });
  if (listed && spread) r.context().error_at_path(r.path() + ".spread", "give set_points or spread, not both");
  r.choice("order", p.order,
           schema::Options<SetPointOrder>{{"listed", SetPointOrder::listed, ""},
                                          {"up", SetPointOrder::up, ""},
                                          {"down", SetPointOrder::down, ""},
                                          {"up_down", SetPointOrder::up_down, ""},
                                          {"random", SetPointOrder::random, ""}},
           "");
  r.number("dwell_s", p.dwell_s, schema::positive, "s", "", Need::optional);
  r.number("ramp_per_s", p.ramp_per_s, schema::non_negative, "channel units/s", "", Need::optional);
  r.number("jitter", p.jitter, schema::non_negative, channel_units, "", Need::optional);
}

void read_raw(YamlReader& r, std::optional<RawOutput>& out) {
  using Kind = metrology::Linearisation::Kind;
  RawOutput raw;
  metrology::Linearisation& lin = raw.linearisation;
  lin.kind = Kind::none;
  if (!r.take("kind").IsDefined()) r.context().error_at_path(r.path(), "kind: is missing (rtd, thermocouple or current_loop)");
  r.choice("kind", lin.kind,
           schema::Options<Kind>{{"rtd", Kind::rtd, ""},
                                 {"thermocouple", Kind::thermocouple, ""},
                                 {"current_loop", Kind::current_loop, ""}},
           "");
  r.number("resolution", raw.raw_resolution, schema::non_negative, "raw units", "", Need::optional);
  switch (lin.kind) {
    case Kind::rtd:
      r.number("r0_ohm", lin.r0_ohm, schema::positive, "ohm", "", Need::optional);
      break;
    case Kind::thermocouple:
      r.choice("type", lin.thermocouple_type,
               schema::Options<metrology::ThermocoupleType>{{"K", metrology::ThermocoupleType::K, ""},
                                                            {"J", metrology::ThermocoupleType::J, ""},
                                                            {"T", metrology::ThermocoupleType::T, ""}},
               "");
      if (!r.take("type").IsDefined()) r.context().error_at_path(r.path(), "type: is missing (K, J or T)");
      r.number("cold_junction_c", lin.cold_junction_c, schema::any, "degC", "", Need::optional);
      break;
    case Kind::current_loop:
      r.number("value_at_4ma", lin.loop_range.value_at_4ma, schema::any, channel_units, "", Need::required);
      r.number("value_at_20ma", lin.loop_range.value_at_20ma, schema::any, channel_units, "", Need::required);
      break;
    case Kind::none:
      return;  // kind missing or wrong: reported above
  }
  out = raw;
}

void read_reference(YamlReader& r, ReferenceReading& ref) {
  r.number("noise_sd", ref.noise_sd, schema::non_negative, channel_units, "", Need::optional);
  r.number("resolution", ref.resolution, schema::non_negative, channel_units, "", Need::optional);
  read_section(r, "raw", [&](YamlReader& s) { read_raw(s, ref.raw); });
}

void read_sensor(YamlReader& r, SensorReading& s) {
  r.number("slope", s.slope, schema::any, "", "", Need::optional);
  r.number("offset", s.offset, schema::any, channel_units, "", Need::optional);
  r.number("noise_sd", s.noise_sd, schema::non_negative, channel_units, "", Need::optional);
  r.number("resolution", s.resolution, schema::non_negative, channel_units, "", Need::optional);
  read_section(r, "spikes", [&](YamlReader& k) {
    k.number("probability", s.spikes.probability, schema::Range{0, 1}, "", "", Need::required);
    k.number("size", s.spikes.size, schema::positive, channel_units, "", Need::required);
  });
  r.number("dropout_probability", s.dropout_probability, schema::Range{0, 1}, "", "", Need::optional);
  read_section(r, "raw", [&](YamlReader& k) { read_raw(k, s.raw); });
}

// Only the keys of the fault's own kind are read, so the others are refused as unknown.
void read_fault(YamlReader& r, Fault& f) {
  using Kind = Fault::Kind;
  if (!r.take("kind").IsDefined()) {
    r.context().error_at_path(r.path(), "kind: is missing (gain_step, offset_step, ageing or stuck)");
    for (const char* key : {"after_s", "change", "offset_per_day", "gain_per_day", "duration_s"}) r.take(key);
    return;
  }
  r.choice("kind", f.kind,
           schema::Options<Kind>{{"gain_step", Kind::gain_step, ""},
                                 {"offset_step", Kind::offset_step, ""},
                                 {"ageing", Kind::ageing, ""},
                                 {"stuck", Kind::stuck, ""}},
           "");
  r.number("after_s", f.after_s, schema::non_negative, "s", "", Need::required);
  switch (f.kind) {
    case Kind::gain_step:
    case Kind::offset_step:
      r.number("change", f.change, schema::any, f.kind == Kind::gain_step ? "" : channel_units, "", Need::required);
      break;
    case Kind::ageing:
      r.number("offset_per_day", f.offset_per_day, schema::any, "channel units/day", "", Need::optional);
      r.number("gain_per_day", f.gain_per_day, schema::any, "1/day", "", Need::optional);
      break;
    case Kind::stuck:
      r.optional_number("duration_s", f.duration_s, schema::positive, "s", "");
      break;
  }
}

void read_faults(YamlReader& r, std::vector<Fault>& out) {
  YAML::Node n = r.take("faults");
  if (!n.IsDefined() || n.IsNull()) return;
  const std::string path = child_path(r, "faults");
  if (!n.IsSequence()) {
    r.context().error(n.Mark(), path, "expected a list of faults");
    return;
  }
  for (std::size_t i = 0; i < n.size(); ++i) {
    const std::string p = path + "[" + std::to_string(i) + "]";
    if (!n[i].IsMap()) {
      r.context().error(n[i].Mark(), p, "expected a map of keys");
      continue;
    }
    r.context().marks[p] = n[i].Mark();
    Fault f;
    YamlReader sub(n[i], p, r.context());
    read_fault(sub, f);
    sub.check_unknown_keys();
    out.push_back(f);
  }
}

void read_channel(YamlReader& r, ChannelModel& c) {
  r.text("id", c.id, "", Need::required);
  r.text("units", c.units, "", Need::optional);
  read_section(r, "pairs", [&](YamlReader& s) { read_schedule(s, c.pairs.emplace()); });
  read_section(r, "readings", [&](YamlReader& s) { read_schedule(s, c.readings.emplace()); });
  if (!read_section(r, "profile", [&](YamlReader& s) { read_profile(s, c.profile); }))
    r.context().error_at_path(r.path(), "profile: is missing (the set points the reference visits)");
  read_section(r, "reference", [&](YamlReader& s) { read_reference(s, c.reference); });
  read_section(r, "sensor", [&](YamlReader& s) { read_sensor(s, c.sensor); });
  read_faults(r, c.faults);
}

void read_seed(YamlReader& r, std::uint64_t& seed) {
  YAML::Node n = r.take("seed");
  if (!n.IsDefined()) return;
  const std::string s = n.IsScalar() ? n.Scalar() : std::string();
  const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), seed);
  if (s.empty() || ec != std::errc{} || end != s.data() + s.size())
    r.context().error(n.Mark(), "seed", "expected an integer from 0 to 18446744073709551615, got '" + s + "'");
}

void read_start(YamlReader& r, std::optional<std::int64_t>& start) {
  std::string text;
  r.text("start", text, "", Need::optional);
  if (text.empty()) return;
  const protocol::ParsedTime t = protocol::parse_timestamp(text);
  if (!t.time) {
    r.context().error_at_path("start", std::string("expected a UTC time such as 2026-12-01T06:00:00Z: ") +
                                           t.error.reason);
    return;
  }
  start = *t.time;
}

void read_channels(YamlReader& top, std::vector<ChannelModel>& out) {
  YAML::Node list = top.take("channels");
  if (!list.IsDefined() || list.IsNull()) return;  // check_scenario reports "needs at least one channel"
  if (!list.IsSequence()) {
    top.context().error(list.Mark(), "channels", "expected a list of channels");
    return;
  }
  for (std::size_t i = 0; i < list.size(); ++i) {
    const std::string p = "channels[" + std::to_string(i) + "]";
    if (!list[i].IsMap()) {
      top.context().error(list[i].Mark(), p, "expected a map of channel keys");
      continue;
    }
    top.context().marks[p] = list[i].Mark();
    ChannelModel c;
    YamlReader r(list[i], p, top.context());
    read_channel(r, c);
    r.check_unknown_keys();
    out.push_back(std::move(c));
  }
}

}  // namespace

ScenarioLoadResult load_scenario(std::string_view yaml_text, const std::string& file_name) {
  ScenarioLoadResult result;
  ReadContext ctx;
  ctx.file = file_name;
  const std::optional<YAML::Node> parsed = parse_top_map(yaml_text, ctx, "config/demo-scenario.yaml");
  if (!parsed) {
    result.errors = std::move(ctx.errors);
    return result;
  }
  const YAML::Node& root = *parsed;
  Scenario& s = result.scenario;
  YamlReader top(root, "", ctx);
  top.text("name", s.name, "", Need::required);
  read_start(top, s.start_ns);
  top.optional_number("duration_s", s.duration_s, schema::positive, "s", "");
  read_seed(top, s.seed);
  read_channels(top, s.channels);
  top.check_unknown_keys();
  if (ctx.errors.empty()) {
    for (const ScenarioProblem& p : check_scenario(s)) ctx.error_at_path(p.path, p.message);
  }
  std::stable_sort(ctx.errors.begin(), ctx.errors.end(), [](const config::ConfigError& a, const config::ConfigError& b) {
    return a.line != b.line ? a.line < b.line : a.column < b.column;
  });
  result.errors = std::move(ctx.errors);
  return result;
}

}  // namespace rigcal::sim
