#include "serial_input.hpp"

#include <spdlog/spdlog.h>

namespace rigcal::io {

namespace asio = boost::asio;

SerialInput::SerialInput(asio::io_context& io, const config::SerialInput& cfg, service::Ingest& ingest)
    : io_(io), cfg_(cfg), ingest_(ingest), port_(io), timer_(io), backoff_ms_(cfg.reopen_initial_ms) {}

SerialInput::~SerialInput() {
  *alive_ = false;
  stop();
}

Status SerialInput::start() {
  if (auto st = open_port(); !st) {
    spdlog::warn("input {} ({}): {}; retrying every {} ms up to {} ms", cfg_.name, cfg_.device, st.error().message,
                 backoff_ms_, cfg_.reopen_max_ms);
    schedule_reopen();
  }
  return ok_status();
}

Status SerialInput::open_port() {
  boost::system::error_code ec;
  port_.open(cfg_.device, ec);
  if (ec) return Error{"open: " + ec.message()};
  using sp = asio::serial_port_base;
  const sp::parity::type parity = cfg_.parity == config::Parity::none  ? sp::parity::none
                                  : cfg_.parity == config::Parity::odd ? sp::parity::odd
                                                                       : sp::parity::even;
  const sp::stop_bits::type stop = cfg_.stop_bits == config::StopBits::one ? sp::stop_bits::one
                                   : cfg_.stop_bits == config::StopBits::two ? sp::stop_bits::two
                                                                             : sp::stop_bits::onepointfive;
  const sp::flow_control::type flow = cfg_.flow_control == config::FlowControl::none       ? sp::flow_control::none
                                      : cfg_.flow_control == config::FlowControl::software ? sp::flow_control::software
                                                                                           : sp::flow_control::hardware;
  port_.set_option(sp::baud_rate(cfg_.baud), ec);
  if (!ec) port_.set_option(sp::character_size(cfg_.data_bits), ec);
  if (!ec) port_.set_option(sp::parity(parity), ec);
  if (!ec) port_.set_option(sp::stop_bits(stop), ec);
  if (!ec) port_.set_option(sp::flow_control(flow), ec);
  if (ec) {
    boost::system::error_code ignored;
    port_.close(ignored);
    return Error{"line settings: " + ec.message()};
  }
  ++opens_;
  backoff_ms_ = cfg_.reopen_initial_ms;
  session_ = std::make_unique<service::IngestSession>(
      ingest_, service::Source{cfg_.name, "serial", cfg_.device}, static_cast<std::size_t>(cfg_.max_line_bytes), "",
      false,
      service::IngestSession::Transport{nullptr, nullptr, [this, alive = alive_] {
                                          if (!*alive) return;
                                          paused_ = false;
                                          if (!reading_) do_read();
                                        }});
  spdlog::info("input {}: opened {} at {} baud", cfg_.name, cfg_.device, cfg_.baud);
  do_read();
  return ok_status();
}

void SerialInput::schedule_reopen() {
  if (stopped_) return;
  timer_.expires_after(std::chrono::milliseconds(backoff_ms_));
  timer_.async_wait([this, alive = alive_](boost::system::error_code ec) {
    if (ec || !*alive || stopped_) return;
    if (auto st = open_port(); !st) {
      backoff_ms_ = std::min(backoff_ms_ * 2, cfg_.reopen_max_ms);
      spdlog::debug("input {} ({}): {}", cfg_.name, cfg_.device, st.error().message);
      schedule_reopen();
    }
  });
}

void SerialInput::on_failure(const std::string& what) {
  spdlog::warn("input {} ({}): {}; reopening", cfg_.name, cfg_.device, what);
  if (session_) session_.reset();  // a partial line is dropped with the session
  boost::system::error_code ignored;
  port_.close(ignored);
  schedule_reopen();
}

void SerialInput::do_read() {
  if (stopped_ || paused_ || !port_.is_open()) return;
  reading_ = true;
  port_.async_read_some(asio::buffer(buffer_), [this, alive = alive_](boost::system::error_code ec, std::size_t n) {
    if (!*alive) return;
    reading_ = false;
    if (stopped_) return;
    if (ec) {
      if (ec == asio::error::operation_aborted) return;
      return on_failure("read: " + ec.message());
    }
    if (session_->feed(std::string_view(buffer_.data(), n)) == service::IngestSession::FeedResult::paused) {
      paused_ = true;
      return;
    }
    do_read();
  });
}

void SerialInput::stop() {
  stopped_ = true;
  timer_.cancel();
  boost::system::error_code ignored;
  if (port_.is_open()) port_.close(ignored);
  session_.reset();
}

}  // namespace rigcal::io
