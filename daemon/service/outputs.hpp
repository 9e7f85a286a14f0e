#pragma once
// Where the engine's events and the ingest's rejects go (the EventSink of live operation):
//   alert events    -> log (warning), alert file (JSON lines), hook program
//   historian       -> historian feed subscribers (JSON lines), daily CSV file
//   rejects         -> reject file (JSON lines, every one), log (at most log_per_minute per source,
//                      then one summary line a minute), counters
//   notices         -> log
// Relative paths are inside the state directory. I/O thread only.
#include <boost/asio/io_context.hpp>
#include <map>
#include <memory>
#include <string>

#include "../io/append_file.hpp"
#include "../io/historian_server.hpp"
#include "../io/hook_runner.hpp"
#include "counters.hpp"
#include "ingest.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/engine/events.hpp"

namespace rigcal::service {

std::string resolve_path(const std::string& state_directory, const std::string& path);

class Outputs final : public engine::EventSink {
 public:
  Outputs(boost::asio::io_context& io, const config::Config& cfg, Counters& counters);
  ~Outputs() override;

  Status open();
  // Switch to a new configuration's outputs (files reopened, feed restarted if its address changed).
  Status reconfigure(const config::Config& cfg);
  void flush();
  void close();

  void line_rejected(const Source& src, std::uint64_t line, protocol::RejectReason reason, const std::string& detail,
                     std::string_view raw, protocol::TimeNs arrival);

  void on_alert(const engine::AlertEvent& e) override;
  void on_historian(const engine::HistorianRecord& r) override;
  void on_reject(const engine::EngineReject& r) override;
  void on_notice(const engine::Notice& n) override;

  std::size_t historian_subscribers() const { return historian_ ? historian_->subscribers() : 0; }
  void tick_minute(protocol::TimeNs now);  // emits the log summaries of suppressed rejects

 private:
  Status open_csv_for(protocol::TimeNs t);
  void log_reject(const std::string& source, const std::string& text);

  // What the outputs need of the configuration. Not the whole Config: its copy of every channel's
  // configuration cost about 1 KiB per channel here.
  struct Settings {
    std::string state_directory;
    config::Outputs outputs;
  };

  boost::asio::io_context& io_;
  Settings cfg_;
  Counters& counters_;
  io::AppendFile alerts_, rejects_, csv_;
  std::int64_t csv_day_ = -1;
  std::unique_ptr<io::HistorianServer> historian_;
  std::unique_ptr<io::HookRunner> hook_;
  std::map<std::string, std::pair<int, std::uint64_t>> reject_log_;  // source -> (logged, suppressed) this minute
};

}  // namespace rigcal::service
