#pragma once
// A serial port carrying the line protocol (a rig's reference thermometer bridge, a multiplexer).
// Opened with the configured line settings through boost::asio::serial_port; when the device fails
// or disappears (a USB adapter unplugged), the port is closed and reopened with exponential
// backoff, from reopen_initial_ms up to reopen_max_ms, until it is back. Each opening starts a new
// IngestSession: a partial line from before the failure is discarded, never glued to the next one.
// Serial senders get no replies (the protocol's ACK/REJ are TCP only). Runs on the I/O thread.
#include <boost/asio/io_context.hpp>
#include <boost/asio/serial_port.hpp>
#include <boost/asio/steady_timer.hpp>
#include <memory>

#include "../service/ingest.hpp"
#include "rigcal/config/config.hpp"

namespace rigcal::io {

class SerialInput {
 public:
  SerialInput(boost::asio::io_context& io, const config::SerialInput& cfg, service::Ingest& ingest);
  ~SerialInput();

  // Tries to open now; if the device is absent it keeps retrying in the background (a rig may be
  // powered after the daemon) and returns ok. Bad line settings are an error.
  Status start();
  void stop();
  bool is_open() const { return port_.is_open(); }
  std::uint64_t reopens() const { return opens_; }
  const config::SerialInput& config() const { return cfg_; }

 private:
  Status open_port();
  void schedule_reopen();
  void do_read();
  void on_failure(const std::string& what);

  boost::asio::io_context& io_;
  config::SerialInput cfg_;
  service::Ingest& ingest_;
  boost::asio::serial_port port_;
  boost::asio::steady_timer timer_;
  std::unique_ptr<service::IngestSession> session_;
  std::array<char, 4096> buffer_{};
  int backoff_ms_;
  std::uint64_t opens_ = 0;
  bool stopped_ = false;
  bool paused_ = false;
  bool reading_ = false;
  std::shared_ptr<bool> alive_ = std::make_shared<bool>(true);
};

}  // namespace rigcal::io
