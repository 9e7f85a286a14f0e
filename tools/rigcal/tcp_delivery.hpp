#pragma once
// Reliable delivery of a feed of records to a rigcald TCP listener: the SenderSession's rules
// (rigcal/protocol/sender_session.hpp) over a real socket, with reconnection and deadlines.
//
// One io_context on one thread; every handler checks the connection generation it was started for,
// so that a handler of a closed connection does nothing. Deadlines:
//   - a connection attempt gets min(5 s, what is left of --give-up-after);
//   - without a working connection (HELLO answered) for --give-up-after seconds, the run gives up;
//   - a HELLO not answered within --ack-timeout seconds drops the connection (and it is retried);
//   - with records outstanding and no acknowledgement for --ack-timeout seconds, the connection is
//     taken for dead and re-established, or, once the source is exhausted, the run gives up.
// SIGINT or SIGTERM stops taking new records and waits up to --ack-timeout for the outstanding
// ones; a second signal gives up at once. Either way the caller gets a DeliveryResult.
#include <utility>  // before Asio: Boost 1.74's awaitable.hpp uses std::exchange without including it

#include <boost/asio.hpp>
#include <chrono>
#include <cstdint>
#include <optional>
#include <string>

#include "delivery.hpp"
#include "pacer.hpp"
#include "progress_line.hpp"
#include "record_feed.hpp"
#include "rigcal/protocol/sender_session.hpp"

namespace rigcal::tool {

namespace asio = boost::asio;

struct TcpDeliverySettings {
  TcpTarget target;
  std::string stream;
  std::optional<std::string> secret;
  double ack_timeout_s = 10;
  double give_up_after_s = 60;
  std::size_t max_unacknowledged = 10000;
  bool show_rejects = false;
  std::string command;  // "send" or "simulate", for messages
};

class TcpDelivery {
 public:
  TcpDelivery(asio::io_context& io, TcpDeliverySettings settings, RecordFeed& feed, Pacer pacer,
              ProgressLine& progress);

  // Starts; io.run() returns when the delivery has ended.
  void start();
  DeliveryResult result() const;

 private:
  using Clock = std::chrono::steady_clock;

  void do_resolve();
  void do_connect();
  void on_connected(std::uint64_t generation, const boost::system::error_code& ec);
  void do_read(std::uint64_t generation);
  void on_line(std::string_view line);
  void pump();
  bool fill();
  void do_write();
  void drop_connection(const std::string& why, bool quietly = false);
  void schedule_reconnect();
  void tick();
  void on_signal();
  void give_up(const std::string& why, int status);
  void finish();
  void warn(const std::string& message);
  void count_unsent_remainder();

  asio::io_context& io_;
  TcpDeliverySettings settings_;
  RecordFeed& feed_;
  Pacer pacer_;
  ProgressLine& progress_;
  protocol::SenderSession session_;

  asio::ip::tcp::resolver resolver_;
  asio::ip::tcp::resolver::results_type endpoints_;
  asio::ip::tcp::socket socket_;
  asio::streambuf read_buf_;
  std::string write_buf_;
  asio::steady_timer retry_timer_, pace_timer_, tick_timer_;
  asio::signal_set signals_;

  std::uint64_t generation_ = 0;  // of the current connection; bumped when one ends
  bool connecting_ = false, connected_ = false, writing_ = false, pace_armed_ = false;
  bool feed_done_ = false, stopping_ = false, finished_ = false;
  std::optional<FeedItem> next_item_;  // taken from the feed, waiting for its time
  std::optional<Clock::time_point> next_due_;
  Clock::time_point connect_deadline_, connected_at_, unconnected_since_, last_progress_, stop_deadline_;
  std::chrono::milliseconds backoff_{100};
  std::string last_connect_error_;

  DeliveryResult result_;
};

}  // namespace rigcal::tool
