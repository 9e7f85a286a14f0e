#include "tcp_delivery.hpp"

#include <algorithm>
#include <fmt/format.h>
#include <iostream>

namespace rigcal::tool {

namespace {
constexpr std::size_t write_batch_bytes = 64 * 1024;
constexpr std::size_t max_reply_bytes = 64 * 1024;
constexpr auto tick_interval = std::chrono::milliseconds(100);
constexpr auto max_backoff = std::chrono::milliseconds(5000);
constexpr auto max_connect_time = std::chrono::seconds(5);

std::chrono::steady_clock::duration seconds(double s) {
  return std::chrono::duration_cast<std::chrono::steady_clock::duration>(std::chrono::duration<double>(s));
}
}  // namespace

TcpDelivery::TcpDelivery(asio::io_context& io, TcpDeliverySettings settings, RecordFeed& feed, Pacer pacer,
                         ProgressLine& progress)
    : io_(io),
      settings_(std::move(settings)),
      feed_(feed),
      pacer_(pacer),
      progress_(progress),
      session_(settings_.stream, settings_.secret),
      resolver_(io),
      socket_(io),
      read_buf_(max_reply_bytes),
      retry_timer_(io),
      pace_timer_(io),
      tick_timer_(io),
      signals_(io, SIGINT, SIGTERM) {}

void TcpDelivery::start() {
  // Signals first, so that an interrupt during the first connection attempt is an event too.
  signals_.async_wait([this](const boost::system::error_code& ec, int) {
    if (!ec) on_signal();
  });
  unconnected_since_ = last_progress_ = Clock::now();
  tick();
  do_resolve();
}

void TcpDelivery::warn(const std::string& message) {
  progress_.clear();
  std::cerr << "rigcal " << settings_.command << ": " << message << "\n";
}

void TcpDelivery::do_resolve() {
  connecting_ = true;
  connect_deadline_ = Clock::now() + max_connect_time;
  const std::uint64_t generation = ++generation_;
  resolver_.async_resolve(settings_.target.host, std::to_string(settings_.target.port),
                          [this, generation](const boost::system::error_code& ec,
                                             asio::ip::tcp::resolver::results_type results) {
                            if (generation != generation_ || finished_) return;
                            connecting_ = false;
                            if (ec) {
                              last_connect_error_ = "cannot resolve " + settings_.target.host + ": " + ec.message();
                              schedule_reconnect();
                              return;
                            }
                            endpoints_ = std::move(results);
                            do_connect();
                          });
}

void TcpDelivery::do_connect() {
  boost::system::error_code ignored;
  socket_.close(ignored);
  connecting_ = true;
  const auto left = seconds(settings_.give_up_after_s) - (Clock::now() - unconnected_since_);
  connect_deadline_ = Clock::now() + std::clamp<Clock::duration>(left, std::chrono::milliseconds(100), max_connect_time);
  const std::uint64_t generation = ++generation_;
  asio::async_connect(socket_, endpoints_,
                      [this, generation](const boost::system::error_code& ec, const asio::ip::tcp::endpoint&) {
                        on_connected(generation, ec);
                      });
}

void TcpDelivery::on_connected(std::uint64_t generation, const boost::system::error_code& ec) {
  if (generation != generation_ || finished_) return;
  connecting_ = false;
  if (ec) {
    last_connect_error_ = "cannot connect to " + settings_.target.text + ": " + ec.message();
    schedule_reconnect();
    return;
  }
  connected_ = true;
  connected_at_ = Clock::now();
  boost::system::error_code ignored;
  socket_.set_option(asio::ip::tcp::no_delay(true), ignored);
  write_buf_ = session_.open();
  do_write();
  do_read(generation);
}

void TcpDelivery::do_read(std::uint64_t generation) {
  asio::async_read_until(socket_, read_buf_, '\n',
                         [this, generation](const boost::system::error_code& ec, std::size_t n) {
                           if (generation != generation_ || finished_) return;
                           if (ec) {
                             drop_connection(ec == asio::error::eof ? "the server closed the connection"
                                             : ec == asio::error::not_found ? "a reply line is too long"
                                                                             : ec.message());
                             return;
                           }
                           const auto data = read_buf_.data();
                           std::string line(asio::buffers_begin(data), asio::buffers_begin(data) + n - 1);
                           read_buf_.consume(n);
                           if (!line.empty() && line.back() == '\r') line.pop_back();
                           on_line(line);
                           if (generation == generation_ && connected_ && !finished_) do_read(generation);
                         });
}

void TcpDelivery::on_line(std::string_view line) {
  using Kind = protocol::SessionEvent::Kind;
  const protocol::SessionEvent ev = session_.on_server_line(line);
  switch (ev.kind) {
    case Kind::ready:
    case Kind::regressed:
      if (ev.kind == Kind::regressed) {
        result_.regressed = true;
        warn(ev.detail);
      }
      backoff_ = std::chrono::milliseconds(100);
      last_progress_ = Clock::now();
      break;
    case Kind::progress:
      last_progress_ = Clock::now();
      break;
    case Kind::rejected:
      last_progress_ = Clock::now();
      if (settings_.show_rejects) {
        progress_.clear();
        std::cout << feed_.where(ev.origin) << ": rejected (" << ev.reason << ")"
                  << (ev.detail.empty() ? "" : ": " + ev.detail) << "\n";
      }
      break;
    case Kind::fatal:
      if (ev.reason == "not_authenticated") {
        give_up("the server refused the connection: " + ev.reason + (ev.detail.empty() ? "" : ": " + ev.detail) +
                    (settings_.secret ? " (check --secret-file)" : " (it needs --secret-file)"),
                exit_unavailable);
        return;
      }
      warn("the server closed the connection: " + ev.reason + (ev.detail.empty() ? "" : ": " + ev.detail));
      drop_connection(ev.reason, true);
      return;
    case Kind::protocol_error:
      drop_connection("unexpected reply from the server: " + ev.detail);
      return;
    case Kind::ignored:
      return;
  }
  pump();
}

bool TcpDelivery::fill() {
  bool added = false;
  const auto now = Clock::now();
  while (!feed_done_ && !stopping_ && session_.outstanding() < settings_.max_unacknowledged) {
    if (!next_item_) {
      auto r = feed_.next();
      if (!r) {
        give_up(r.error().message, exit_data);
        return added;
      }
      if (!r.value()) {
        feed_done_ = true;
        break;
      }
      if (session_.skip_if_held(r.value()->seq)) continue;
      next_item_ = std::move(*r.value());
      next_due_ = pacer_.due(*next_item_, now);
    }
    if (*next_due_ > now) {
      if (!pace_armed_) {
        pace_armed_ = true;
        pace_timer_.expires_at(*next_due_);
        pace_timer_.async_wait([this](const boost::system::error_code& ec) {
          pace_armed_ = false;
          if (!ec && !finished_) pump();
        });
      }
      break;
    }
    if (session_.outstanding() == 0) last_progress_ = now;  // the acknowledgement clock starts now
    session_.add(next_item_->seq, std::move(next_item_->text), next_item_->origin);
    next_item_.reset();
    added = true;
  }
  return added;
}

void TcpDelivery::pump() {
  if (finished_ || !connected_ || !session_.ready()) return;
  fill();
  if (finished_) return;
  if (!writing_ && session_.has_unsent()) {
    session_.take_unsent(write_buf_, write_batch_bytes);
    do_write();
  }
  if ((feed_done_ || stopping_) && session_.outstanding() == 0 && !writing_) finish();
}

void TcpDelivery::do_write() {
  writing_ = true;
  const std::uint64_t generation = generation_;
  asio::async_write(socket_, asio::buffer(write_buf_),
                    [this, generation](const boost::system::error_code& ec, std::size_t) {
                      if (generation != generation_ || finished_) return;
                      writing_ = false;
                      if (ec) {
                        drop_connection(ec.message());
                        return;
                      }
                      write_buf_.clear();
                      pump();
                    });
}

void TcpDelivery::drop_connection(const std::string& why, bool quietly) {
  ++generation_;  // every handler of this connection now does nothing
  boost::system::error_code ignored;
  socket_.shutdown(asio::ip::tcp::socket::shutdown_both, ignored);
  socket_.close(ignored);
  const bool was_ready = session_.ready();
  connected_ = connecting_ = writing_ = false;
  write_buf_.clear();
  read_buf_.consume(read_buf_.size());
  session_.lost();
  last_connect_error_ = "connection to " + settings_.target.text + " lost: " + why;
  if (was_ready) {
    unconnected_since_ = Clock::now();
    if (!quietly) warn(last_connect_error_ + "; reconnecting");
  }
  schedule_reconnect();
}

void TcpDelivery::schedule_reconnect() {
  if (finished_) return;
  if (Clock::now() - unconnected_since_ >= seconds(settings_.give_up_after_s)) {
    give_up(fmt::format("{} (gave up after {:g} s without a connection)", last_connect_error_,
                        settings_.give_up_after_s),
            exit_unavailable);
    return;
  }
  retry_timer_.expires_after(backoff_);
  backoff_ = std::min(backoff_ * 2, max_backoff);
  retry_timer_.async_wait([this](const boost::system::error_code& ec) {
    if (ec || finished_) return;
    if (endpoints_.empty())
      do_resolve();
    else
      do_connect();
  });
}

void TcpDelivery::tick() {
  if (finished_) return;
  const auto now = Clock::now();
  if (connecting_ && now > connect_deadline_) {
    ++generation_;
    boost::system::error_code ignored;
    socket_.close(ignored);
    resolver_.cancel();
    connecting_ = false;
    last_connect_error_ = "cannot connect to " + settings_.target.text + ": no answer within the connection deadline";
    schedule_reconnect();
  }
  if (connected_ && !session_.ready() && now - connected_at_ > seconds(settings_.ack_timeout_s)) {
    drop_connection(fmt::format("no reply to HELLO within {:g} s (--ack-timeout)", settings_.ack_timeout_s));
  }
  if (finished_) return;
  const bool ending = feed_done_ || stopping_;
  if (connected_ && session_.ready() && session_.outstanding() > 0 && now - last_progress_ > seconds(settings_.ack_timeout_s)) {
    const std::string why = fmt::format("no acknowledgement for {:g} s (--ack-timeout)", settings_.ack_timeout_s);
    if (ending) {
      give_up(why, exit_unavailable);
      return;
    }
    drop_connection(why);
  }
  if (stopping_ && now > stop_deadline_) {
    give_up("interrupted before every record was acknowledged", exit_unavailable);
    return;
  }
  const auto& c = session_.counts();
  progress_.update(ProgressFigures{c.sent, c.acknowledged, c.rejected, c.acknowledged + c.rejected + c.already_held,
                                   feed_.expected_total(), true},
                   now);
  tick_timer_.expires_after(tick_interval);
  tick_timer_.async_wait([this](const boost::system::error_code& ec) {
    if (!ec) tick();
  });
}

void TcpDelivery::on_signal() {
  if (stopping_) {
    give_up("interrupted", exit_unavailable);
    return;
  }
  stopping_ = true;
  result_.interrupted = true;
  stop_deadline_ = Clock::now() + seconds(settings_.ack_timeout_s);
  warn(fmt::format("interrupted: waiting up to {:g} s for acknowledgements (interrupt again to stop at once)",
                   settings_.ack_timeout_s));
  signals_.async_wait([this](const boost::system::error_code& ec, int) {
    if (!ec) on_signal();
  });
  if (session_.outstanding() == 0) {
    count_unsent_remainder();
    finish();
  }
}

void TcpDelivery::count_unsent_remainder() {
  if (next_item_) {
    ++result_.not_sent;
    next_item_.reset();
  }
  while (!feed_done_) {
    auto r = feed_.next();
    if (!r || !r.value()) break;
    if (!session_.skip_if_held(r.value()->seq)) ++result_.not_sent;
  }
  feed_done_ = true;
}

void TcpDelivery::give_up(const std::string& why, int status) {
  if (finished_) return;
  result_.failure = why;
  result_.failure_status = status;
  session_.abandon();
  count_unsent_remainder();
  finish();
}

void TcpDelivery::finish() {
  if (finished_) return;
  if (stopping_) count_unsent_remainder();
  finished_ = true;
  ++generation_;
  boost::system::error_code ignored;
  retry_timer_.cancel();
  pace_timer_.cancel();
  tick_timer_.cancel();
  signals_.cancel(ignored);
  resolver_.cancel();
  if (connected_) socket_.shutdown(asio::ip::tcp::socket::shutdown_send, ignored);
  socket_.close(ignored);
  progress_.clear();
  result_.counts = session_.counts();
}

DeliveryResult TcpDelivery::result() const {
  DeliveryResult r = result_;
  r.counts = session_.counts();
  return r;
}

}  // namespace rigcal::tool
