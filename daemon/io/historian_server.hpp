#pragma once
// The historian feed: a TCP server that streams every corrected average as one JSON line to each
// connected subscriber. A subscriber that reads too slowly never slows ingest: it has a queue of at
// most queue_records lines; when it is full the oldest queued lines are dropped (counted), and the
// subscriber is sent {"type":"gap","dropped":N} before the next record so it knows. Each record's
// per-channel "seq" also shows gaps. Subscribers beyond max_subscribers are refused. I/O thread only.
#include <boost/asio/io_context.hpp>
#include <boost/asio/steady_timer.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <deque>
#include <memory>
#include <set>
#include <string>

#include "../service/counters.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/result.hpp"

namespace rigcal::io {

class HistorianSubscriber;

class HistorianServer {
 public:
  HistorianServer(boost::asio::io_context& io, const config::HistorianListener& cfg, service::Counters& counters);
  ~HistorianServer();

  Status start();
  void stop();
  // Queues one JSON line (without newline) for every subscriber.
  void publish(std::shared_ptr<const std::string> line);
  std::size_t subscribers() const { return subscribers_.size(); }

 private:
  friend class HistorianSubscriber;
  void do_accept();

  boost::asio::io_context& io_;
  config::HistorianListener cfg_;
  service::Counters& counters_;
  boost::asio::ip::tcp::acceptor acceptor_;
  boost::asio::steady_timer accept_retry_;
  // False once destroyed: a queued accept handler must not touch a destroyed feed (reload, stop).
  std::shared_ptr<bool> alive_ = std::make_shared<bool>(true);
  std::set<std::shared_ptr<HistorianSubscriber>> subscribers_;
  bool stopped_ = false;
};

}  // namespace rigcal::io
