#include "outputs.hpp"

#include <sys/stat.h>

#include <spdlog/spdlog.h>

#include "records_json.hpp"

namespace rigcal::service {

namespace {
std::string dump(const nlohmann::ordered_json& j) {
  return j.dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
}
constexpr std::int64_t ns_per_day = 86'400'000'000'000;
}  // namespace

std::string resolve_path(const std::string& state_directory, const std::string& path) {
  if (path.empty() || path.front() == '/') return path;
  return state_directory + "/" + path;
}

Outputs::Outputs(boost::asio::io_context& io, const config::Config& cfg, Counters& counters)
    : io_(io), cfg_{cfg.state_directory, cfg.outputs}, counters_(counters) {}

Outputs::~Outputs() { close(); }

Status Outputs::open() {
  const auto& out = cfg_.outputs;
  if (!out.alerts.file.empty()) {
    alerts_ = io::AppendFile(resolve_path(cfg_.state_directory, out.alerts.file));
    if (auto st = alerts_.open(); !st) return st;
  }
  if (!out.rejects.file.empty()) {
    rejects_ = io::AppendFile(resolve_path(cfg_.state_directory, out.rejects.file));
    if (auto st = rejects_.open(); !st) return st;
  }
  if (!out.historian.csv_directory.empty()) {
    const std::string dir = resolve_path(cfg_.state_directory, out.historian.csv_directory);
    if (::mkdir(dir.c_str(), 0750) != 0 && errno != EEXIST) return Error{dir + ": " + std::strerror(errno)};
  }
  if (out.historian.listen) {
    historian_ = std::make_unique<io::HistorianServer>(io_, *out.historian.listen, counters_);
    if (auto st = historian_->start(); !st) return st;
  }
  if (out.alerts.hook) hook_ = std::make_unique<io::HookRunner>(io_, *out.alerts.hook, counters_);
  return ok_status();
}

Status Outputs::reconfigure(const config::Config& cfg) {
  close();
  cfg_ = {cfg.state_directory, cfg.outputs};
  csv_day_ = -1;
  return open();
}

void Outputs::flush() {
  alerts_.flush();
  if (!rejects_.flush()) ++counters_.reject_file_errors;
  csv_.flush();
}

void Outputs::close() {
  alerts_.close();
  rejects_.close();
  csv_.close();
  if (historian_) historian_->stop();
  historian_.reset();
  if (hook_) hook_->stop();
  hook_.reset();
}

void Outputs::log_reject(const std::string& source, const std::string& text) {
  auto& [logged, suppressed] = reject_log_[source];
  if (logged < cfg_.outputs.rejects.log_per_minute) {
    ++logged;
    spdlog::warn("{}", text);
  } else {
    ++suppressed;
    ++counters_.reject_log_suppressed;
  }
}

void Outputs::tick_minute(protocol::TimeNs) {
  for (auto& [source, entry] : reject_log_)
    if (entry.second > 0)
      spdlog::warn("{}: {} more rejected lines in the last minute (not logged; all are in the reject file)", source,
                   entry.second);
  reject_log_.clear();
}

void Outputs::line_rejected(const Source& src, std::uint64_t line, protocol::RejectReason reason,
                            const std::string& detail, std::string_view raw, protocol::TimeNs arrival) {
  const std::string label = src.label();
  if (rejects_.is_open())
    if (!rejects_.append(dump(reject_json(arrival, label, line, reason, detail, raw)) + "\n"))
      ++counters_.reject_file_errors;
  log_reject(label, label + " line " + std::to_string(line) + ": rejected (" +
                        std::string(protocol::reject_reason_name(reason)) + "): " + detail);
}

void Outputs::on_reject(const engine::EngineReject& r) {
  auto& c = counters_.inputs["engine"];
  ++c.rejects[static_cast<std::size_t>(r.reason)];
  const std::string source = "engine:" + std::string(r.channel);
  char raw[96];
  if (r.is_pair)
    std::snprintf(raw, sizeof raw, "P %.*s %s %.17g %.17g", static_cast<int>(r.channel.size()), r.channel.data(),
                  protocol::format_rfc3339(r.time, 9).c_str(), r.reference_raw, r.sensor_raw);
  else
    std::snprintf(raw, sizeof raw, "R %.*s %s %.17g", static_cast<int>(r.channel.size()), r.channel.data(),
                  protocol::format_rfc3339(r.time, 9).c_str(), r.sensor_raw);
  if (rejects_.is_open())
    if (!rejects_.append(dump(reject_json(r.time, source, 0, r.reason, r.detail, raw)) + "\n"))
      ++counters_.reject_file_errors;
  log_reject(source, source + ": rejected (" + std::string(protocol::reject_reason_name(r.reason)) + "): " + r.detail);
}

void Outputs::on_alert(const engine::AlertEvent& e) {
  ++counters_.alerts;
  const std::string json = dump(alert_json(e));
  if (e.transition == engine::Transition::raised)
    spdlog::warn("ALERT {} {}: {}", e.channel, engine::alert_kind_name(e.kind), e.message);
  else
    spdlog::info("alert cleared {} {}: {}", e.channel, engine::alert_kind_name(e.kind), e.message);
  if (alerts_.is_open()) {
    alerts_.append(json + "\n");
    alerts_.flush();
  }
  if (hook_)
    hook_->run({std::string(e.channel), std::string(engine::alert_kind_name(e.kind)) +
                                            (e.transition == engine::Transition::raised ? "_raised" : "_cleared"),
                std::string(e.detector), protocol::format_rfc3339(e.time)},
               json + "\n");
}

Status Outputs::open_csv_for(protocol::TimeNs t) {
  const std::int64_t day = t >= 0 ? t / ns_per_day : (t - ns_per_day + 1) / ns_per_day;
  if (day == csv_day_ && csv_.is_open()) return ok_status();
  csv_.close();
  const std::string date = protocol::format_rfc3339(day * ns_per_day, 0).substr(0, 10);
  const std::string dir = resolve_path(cfg_.state_directory, cfg_.outputs.historian.csv_directory);
  csv_ = io::AppendFile(dir + "/historian-" + date + ".csv");
  csv_day_ = day;
  if (auto st = csv_.open(); !st) return st;
  if (csv_.was_empty()) csv_.append(historian_csv_header());
  return ok_status();
}

void Outputs::on_historian(const engine::HistorianRecord& r) {
  ++counters_.historian_records;
  const bool want_csv = !cfg_.outputs.historian.csv_directory.empty();
  if (!historian_ && !want_csv) return;
  // Formatted only when someone reads the feed.
  if (historian_ && historian_->subscribers() > 0)
    historian_->publish(std::make_shared<const std::string>(historian_json_line(r)));
  if (want_csv) {
    if (auto st = open_csv_for(r.window_end); !st) {
      spdlog::error("historian CSV: {}", st.error().message);
      return;
    }
    csv_.append(historian_csv_row(r));
  }
}

void Outputs::on_notice(const engine::Notice& n) {
  if (n.level == engine::NoticeLevel::warning)
    spdlog::warn("{}: {}", n.channel, n.message);
  else
    spdlog::info("{}: {}", n.channel, n.message);
}

}  // namespace rigcal::service
