#include "monitoring_history.hpp"

#include <memory>

#include "journal_pairs.hpp"
#include "rigcal/engine/channel_engine.hpp"
#include "rigcal/state/journal_format.hpp"

namespace rigcal::report {

namespace {

// Keeps the alert events and counts the averages; rejects and notices are not part of the history.
class HistorySink final : public engine::EventSink {
 public:
  explicit HistorySink(MonitoringHistory& h) : h_(h) {}
  void on_alert(const engine::AlertEvent& e) override {
    h_.events.push_back({e.time, std::string(engine::alert_kind_name(e.kind)),
                         e.transition == engine::Transition::raised ? "raised" : "cleared", std::string(e.detector),
                         std::string(e.test), e.message, e.due_by});
  }
  void on_historian(const engine::HistorianRecord&) override { ++h_.averages; }
  void on_reject(const engine::EngineReject&) override {}
  void on_notice(const engine::Notice&) override {}

 private:
  MonitoringHistory& h_;
};

std::string due_words(const std::optional<metrology::DueForecast>& f) {
  if (!f) return "no forecast (no tolerance, or forecast disabled)";
  return std::string(metrology::to_string(f->status)) + ": " + f->reason;
}

}  // namespace

Result<MonitoringHistory> replay_monitoring(const std::string& state_directory, const config::Config& cfg,
                                            const config::ChannelConfig& channel,
                                            std::optional<protocol::TimeNs> until) {
  auto list = list_journal_segments(state_directory);
  if (!list) return list.error();
  MonitoringHistory h;
  engine::EngineTables tables;
  engine::ChannelEngine ch(std::make_shared<const config::ChannelConfig>(channel), cfg.time, tables);
  HistorySink sink(h);
  using T = state::JournalEntryType;
  bool first = true;
  for (const auto& name : list->names) {
    auto bytes = read_segment(state_directory, name);
    if (!bytes) return bytes.error();
    state::read_journal_segment(bytes.value(), [&](const state::JournalEntry& e) {
      if (first && e.type != T::channel && e.type != T::stream) {
        // Segment 1 starts the daemon's history; a later first segment means older ones were retired.
        h.oldest_segment_is_not_the_start = name.find("0000000000000001.rgj") == std::string::npos;
        first = false;
      }
      if (until && e.time >= *until && e.type != T::channel && e.type != T::stream) return;
      if (e.type == T::tick) return ch.tick(e.time, sink);
      if (e.channel != channel.id) return;
      switch (e.type) {
        case T::pair:
          if (!h.first_pair) h.first_pair = e.time;
          h.last_pair = e.time;
          ch.on_pair(e.time, e.reference_raw, e.sensor_raw, sink);
          break;
        case T::reading:
          ch.on_reading(e.time, e.sensor_raw, sink);
          break;
        case T::reset:
          ++h.resets;
          ch.reset(e.time, sink);
          break;
        default:
          break;
      }
    });
  }
  const auto& c = ch.counters();
  h.pairs = c.pairs;
  h.readings = c.readings;
  h.outliers = c.outliers;
  const auto& d = ch.drift();
  h.detector = d.design().kind;
  h.phase = d.phase_name();
  h.problem = d.unavailable_reason();
  h.sigma = d.design().sigma;
  h.sigma_learned = d.design().sigma_learned;
  h.arl0_pairs = d.design().arl0_pairs;
  h.arl1_offset_pairs = d.design().arl1_offset_pairs;
  h.arl1_slope_pairs = d.design().arl1_slope_pairs;
  h.drift_alert = ch.alert_raised();
  h.due_low = due_words(ch.due_forecast_low());
  h.due_high = due_words(ch.due_forecast_high());
  h.due_by = ch.due_by();
  h.due_alert = ch.due_alert_raised();
  h.tolerance_alert = ch.tolerance_alert_raised();
  return h;
}

}  // namespace rigcal::report
