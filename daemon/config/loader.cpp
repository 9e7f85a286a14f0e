// load_config: parse YAML, read it through the schema (reader.hpp), then check what no single field
// can check alone (validate below).
#include <arpa/inet.h>

#include <map>
#include <set>

#include "reader.hpp"
#include "rigcal/protocol/record.hpp"

namespace rigcal::config {

std::string ConfigError::to_string() const {
  std::string s = file;
  if (line > 0) s += ":" + std::to_string(line) + ":" + std::to_string(column);
  s += ": ";
  if (!path.empty()) s += path + ": ";
  return s + message;
}

namespace {

bool is_ip_address(const std::string& a) {
  unsigned char buf[16];
  return inet_pton(AF_INET, a.c_str(), buf) == 1 || inet_pton(AF_INET6, a.c_str(), buf) == 1;
}

void validate_inputs(const Config& c, ReadContext& ctx) {
  std::set<std::string> names;
  std::map<std::pair<std::string, int>, std::string> ports;
  auto claim_port = [&](const std::string& address, int port, const std::string& path) {
    auto [it, fresh] = ports.emplace(std::make_pair(address, port), path);
    if (!fresh) ctx.error_at_path(path, "port " + std::to_string(port) + " on " + address + " is already used by " +
                                            it->second);
  };
  auto claim_name = [&](const std::string& name, const std::string& path) {
    if (!protocol::is_valid_channel_name(name))
      ctx.error_at_path(path + ".name", "input names are 1-64 characters from A-Z a-z 0-9 _ . : / -");
    if (!names.insert(name).second) ctx.error_at_path(path + ".name", "another input is already named '" + name + "'");
  };
  for (std::size_t i = 0; i < c.inputs.tcp.size(); ++i) {
    const TcpInput& t = c.inputs.tcp[i];
    const std::string p = "inputs.tcp[" + std::to_string(i) + "]";
    claim_name(t.name, p);
    if (!is_ip_address(t.address))
      ctx.error_at_path(p + ".address", "expected an IPv4 or IPv6 address, got '" + t.address + "'");
    claim_port(t.address, t.port, p);
    if (t.tls.enabled() != !t.tls.private_key_file.empty())
      ctx.error_at_path(p + ".tls", "certificate_file and private_key_file go together");
    if (!t.tls.client_ca_file.empty() && !t.tls.enabled())
      ctx.error_at_path(p + ".tls.client_ca_file", "client certificates need the listener's own certificate_file");
  }
  for (std::size_t i = 0; i < c.inputs.serial.size(); ++i) {
    const SerialInput& s = c.inputs.serial[i];
    const std::string p = "inputs.serial[" + std::to_string(i) + "]";
    claim_name(s.name, p);
    if (s.reopen_initial_ms > s.reopen_max_ms)
      ctx.error_at_path(p + ".reopen_initial_ms", "must not exceed reopen_max_ms");
  }
  if (const auto& h = c.outputs.historian.listen) {
    if (!is_ip_address(h->address))
      ctx.error_at_path("outputs.historian.listen.address", "expected an IPv4 or IPv6 address, got '" + h->address + "'");
    claim_port(h->address, h->port, "outputs.historian.listen");
  }
  if (const auto& hook = c.outputs.alerts.hook) {
    if (hook->program.empty() || hook->program.front() != '/')
      ctx.error_at_path("outputs.alerts.hook.program", "must be an absolute path (the hook is run without a shell)");
  }
}

void validate_channel(const ChannelConfig& ch, const std::string& p, ReadContext& ctx) {
  if (!protocol::is_valid_channel_name(ch.id))
    ctx.error_at_path(p + ".id", "channel ids are 1-64 characters from A-Z a-z 0-9 _ . : / -, got '" + ch.id + "'");
  const bool has_range = ch.range_low.has_value();
  if (ch.tolerance.configured() && !has_range)
    ctx.error_at_path(p + ".tolerance", "a tolerance needs the channel's range: [low, high] to be judged over");
  if (ch.fit.memory == stats::MemoryPolicy::Kind::window && ch.min_pairs > ch.fit.window_pairs)
    ctx.error_at_path(p + ".min_pairs", "min_pairs (" + std::to_string(ch.min_pairs) + ") exceeds fit.window_pairs (" +
                                            std::to_string(ch.fit.window_pairs) + "): no verdict would ever be given");
  if (ch.fit.memory == stats::MemoryPolicy::Kind::forgetting) {
    const double n_eff = (1 + ch.fit.forgetting_factor) / (1 - ch.fit.forgetting_factor);
    if (n_eff < ch.min_pairs)
      ctx.error_at_path(p + ".fit.forgetting_factor",
                        "the effective sample size (1+f)/(1-f) = " + std::to_string(n_eff) +
                            " is below min_pairs: no verdict would ever be given");
  }
  if (ch.fit.errors_in_variables) {
    if (!(ch.reference.noise_sd > 0))
      ctx.error_at_path(p + ".fit.errors_in_variables", "needs reference.noise_sd (the scatter of reference readings)");
    if (!ch.sensor.noise_sd)
      ctx.error_at_path(p + ".fit.errors_in_variables", "needs sensor.noise_sd (the scatter of sensor readings)");
    if (ch.fit.model != stats::Model::line)
      ctx.error_at_path(p + ".fit.errors_in_variables", "is available for the line model only");
  }
  for (const auto& [lin, where] : {std::pair{&ch.sensor.linearisation, ".sensor.linearisation"},
                                   std::pair{&ch.reference.linearisation, ".reference.linearisation"}}) {
    if (lin->kind == metrology::Linearisation::Kind::none) continue;
    if (auto st = metrology::check_linearisation(*lin); !st) ctx.error_at_path(p + where, st.error().message);
  }
  if (ch.screening.max_held > ch.screening.episode_pairs)
    ctx.error_at_path(p + ".screening.max_held", "cannot exceed screening.episode_pairs");
  const bool sequential = ch.detector.kind != DetectorKind::interval;
  if (sequential && !ch.detector.min_offset_change && !ch.tolerance.configured())
    ctx.error_at_path(p + ".detector", "give min_offset_change, or a tolerance to derive it from");
  if (sequential && !(ch.detector.arl0_pairs() > 10))
    ctx.error_at_path(p + ".detector", "the target ARL0 must exceed 10 pairs");
  if (ch.forecast.enabled && ch.tolerance.configured() && ch.forecast.min_snapshots < 3)
    ctx.error_at_path(p + ".forecast.min_snapshots", "needs at least 3 snapshots for a trend with uncertainty");
}

void validate(const Config& c, ReadContext& ctx) {
  if (c.state_directory.empty()) ctx.error_at_path("state_directory", "must not be empty");
  validate_inputs(c, ctx);
  std::set<std::string> ids;
  for (std::size_t i = 0; i < c.channels.size(); ++i) {
    const std::string p = "channels[" + std::to_string(i) + "]";
    validate_channel(c.channels[i], p, ctx);
    if (!ids.insert(c.channels[i].id).second)
      ctx.error_at_path(p + ".id", "another channel already has the id '" + c.channels[i].id + "'");
  }
}

}  // namespace

LoadResult load_config(std::string_view yaml_text, const std::string& file_name) {
  LoadResult result;
  ReadContext ctx;
  ctx.file = file_name;
  const std::optional<YAML::Node> parsed = parse_top_map(yaml_text, ctx, "config/rigcald.yaml");
  if (!parsed) {
    result.errors = std::move(ctx.errors);
    return result;
  }
  const YAML::Node& root = *parsed;
  Config& config = result.config;
  config.file = file_name;
  YamlReader top(root, "", ctx);
  schema::describe_top(top, config);

  ChannelConfig defaults;
  if (YAML::Node d = top.take("channel_defaults"); d.IsDefined()) {
    if (!d.IsMap()) {
      ctx.error(d.Mark(), "channel_defaults", "expected a map of channel keys");
    } else {
      YamlReader r(d, "channel_defaults", ctx);
      schema::describe_channel_common(r, defaults);
      for (const char* own : {"id", "certificate", "description"})
        if (r.take(own).IsDefined())
          ctx.error_at_path(std::string("channel_defaults.") + own, "belongs to each channel, not to channel_defaults");
      r.check_unknown_keys();
    }
  }
  if (YAML::Node list = top.take("channels"); list.IsDefined() && !list.IsNull()) {
    if (!list.IsSequence()) {
      ctx.error(list.Mark(), "channels", "expected a list of channels");
    } else {
      for (std::size_t i = 0; i < list.size(); ++i) {
        const std::string p = "channels[" + std::to_string(i) + "]";
        if (!list[i].IsMap()) {
          ctx.error(list[i].Mark(), p, "expected a map of channel keys");
          continue;
        }
        ctx.marks[p] = list[i].Mark();
        ChannelConfig ch = defaults;
        YamlReader r(list[i], p, ctx);
        schema::describe(r, ch);
        r.check_unknown_keys();
        config.channels.push_back(std::move(ch));
      }
    }
  }
  top.check_unknown_keys();
  if (ctx.errors.empty()) validate(config, ctx);
  std::stable_sort(ctx.errors.begin(), ctx.errors.end(), [](const ConfigError& a, const ConfigError& b) {
    return a.line != b.line ? a.line < b.line : a.column < b.column;
  });
  result.errors = std::move(ctx.errors);
  return result;
}

}  // namespace rigcal::config
