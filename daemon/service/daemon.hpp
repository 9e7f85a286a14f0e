#pragma once
// The daemon: owns the I/O context and everything that runs on it, and starts in stages, each with
// its own exit status (exit_codes.hpp):
//
//   state directory + lock -> restore (checkpoint, then journal replay) -> outputs -> inputs -> READY
//
// Then one I/O thread runs: input sessions -> Ingest -> engine -> Outputs, plus timers (1 s tick,
// checkpoint, watchdog, journal retry) and signals (SIGHUP reload; SIGTERM/SIGINT stop). The journal's
// sync thread and a checkpoint writer thread are the only other threads.
//
// Stop: close every input (what was received is committed), sync the journal, write a final
// checkpoint, flush the outputs, cancel the timers; run() then returns by itself.
#include <boost/asio/io_context.hpp>
#include <boost/asio/signal_set.hpp>
#include <boost/asio/steady_timer.hpp>
#include <memory>
#include <optional>
#include <thread>
#include <vector>

#include "../io/control_server.hpp"
#include "../io/journal_writer.hpp"
#include "../io/serial_input.hpp"
#include "../io/state_files.hpp"
#include "../io/tcp_input.hpp"
#include "counters.hpp"
#include "ingest.hpp"
#include "outputs.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/engine/engine.hpp"

namespace rigcal::service {

class Daemon final : public IngestHost {
 public:
  explicit Daemon(config::Config cfg);
  ~Daemon() override;
  int run();

  // IngestHost
  void on_line_rejected(const Source& src, std::uint64_t line, protocol::RejectReason reason,
                        const std::string& detail, std::string_view raw) override;
  engine::EventSink& live_sink() override { return outputs_; }
  protocol::TimeNs now() override;
  void on_journal_blocked(const std::string& error) override;
  void on_journal_unblocked() override;

 private:
  Status restore();
  Status open_inputs(const config::Config& cfg);
  void close_inputs();
  Status open_control();
  void start_timers();
  void arm_tick();
  void arm_checkpoint();
  void arm_watchdog(std::uint64_t interval_us);
  void arm_retry();
  void wait_signals();
  void reload();
  void stop();
  void checkpoint(bool final);
  void retire_old_state(std::uint64_t keep_from_segment, std::uint64_t keep_from_checkpoint);
  std::string control_request(const std::string& request);
  std::string summary() const;

  boost::asio::io_context io_;
  boost::asio::signal_set signals_;
  config::Config cfg_;
  Counters counters_;
  protocol::TimeNs started_;
  std::optional<io::StateDirectoryLock> lock_;
  engine::Engine engine_;
  Outputs outputs_;
  io::JournalWriter journal_;
  Ingest ingest_;
  std::vector<std::unique_ptr<io::TcpInput>> tcp_;
  std::vector<std::unique_ptr<io::SerialInput>> serial_;
  std::unique_ptr<io::ControlServer> control_;
  boost::asio::steady_timer tick_timer_, checkpoint_timer_, watchdog_timer_, retry_timer_;
  std::uint64_t checkpoint_number_ = 0;
  protocol::TimeNs checkpoint_time_ = 0;
  std::uint64_t previous_first_segment_ = 0;  // first segment needed by the previous checkpoint
  bool checkpoint_in_progress_ = false;
  std::thread checkpoint_thread_;
  bool stopping_ = false;
  std::int64_t last_minute_ = 0;
};

}  // namespace rigcal::service
