#include "historian_server.hpp"

#include <boost/asio/write.hpp>
#include <spdlog/spdlog.h>

#include "network.hpp"

namespace rigcal::io {

namespace asio = boost::asio;
using asio::ip::tcp;

class HistorianSubscriber : public std::enable_shared_from_this<HistorianSubscriber> {
 public:
  HistorianSubscriber(HistorianServer& owner, tcp::socket socket, std::string peer)
      : owner_(owner), socket_(std::move(socket)), peer_(std::move(peer)) {}

  void start() { do_read(); }

  void push(std::shared_ptr<const std::string> line) {
    if (closed_) return;
    if (queue_.size() >= static_cast<std::size_t>(owner_.cfg_.queue_records)) {
      // Drop the oldest queued line that is not already being written.
      const std::size_t victim = writing_ ? in_flight_ : 0;
      if (queue_.size() > victim) {
        queue_.erase(queue_.begin() + static_cast<std::ptrdiff_t>(victim));
        ++dropped_;
        ++owner_.counters_.historian_dropped;
      }
    }
    queue_.push_back(std::move(line));
    if (!writing_) do_write();
  }

  void close() {
    if (closed_) return;
    closed_ = true;
    boost::system::error_code ignored;
    socket_.shutdown(tcp::socket::shutdown_both, ignored);
    socket_.close(ignored);
  }

 private:
  // Subscribers send nothing; reading only notices when they go away.
  void do_read() {
    auto self = shared_from_this();
    socket_.async_read_some(asio::buffer(sink_), [this, self](boost::system::error_code ec, std::size_t) {
      if (closed_) return;
      if (ec) return finish();
      do_read();
    });
  }

  void do_write() {
    if (closed_) return;
    if (dropped_ > 0 && !writing_gap_) {
      gap_ = "{\"type\":\"gap\",\"dropped\":" + std::to_string(dropped_) + "}\n";
      dropped_ = 0;
      writing_gap_ = true;
      writing_ = true;
      auto self = shared_from_this();
      asio::async_write(socket_, asio::buffer(gap_), [this, self](boost::system::error_code ec, std::size_t) {
        writing_gap_ = false;
        writing_ = false;
        if (ec) return finish();
        if (!queue_.empty()) do_write();
      });
      return;
    }
    if (queue_.empty()) {
      writing_ = false;
      return;
    }
    writing_ = true;
    // Everything queued goes in one write. One record per write drained one record per turn of
    // the event loop, while each turn's read of input can make a dozen: under sustained load the
    // queue (and the latency of every record in it) grew until queue_records.
    current_.clear();
    in_flight_ = 0;
    while (in_flight_ < queue_.size() && current_.size() < max_write_bytes) {
      current_ += *queue_[in_flight_++];
      current_ += '\n';
    }
    auto self = shared_from_this();
    asio::async_write(socket_, asio::buffer(current_), [this, self](boost::system::error_code ec, std::size_t) {
      if (ec) return finish();
      queue_.erase(queue_.begin(), queue_.begin() + static_cast<std::ptrdiff_t>(std::min(in_flight_, queue_.size())));
      in_flight_ = 0;
      writing_ = false;
      if (!queue_.empty() || dropped_ > 0) do_write();
    });
  }

  void finish() {
    if (closed_) return;
    close();
    spdlog::info("historian subscriber {} disconnected", peer_);
    owner_.subscribers_.erase(shared_from_this());
  }

  HistorianServer& owner_;
  tcp::socket socket_;
  std::string peer_;
  std::deque<std::shared_ptr<const std::string>> queue_;
  std::string current_, gap_;
  std::array<char, 512> sink_{};
  static constexpr std::size_t max_write_bytes = 256 * 1024;
  std::size_t in_flight_ = 0;  // queued lines (at the front of queue_) inside the write under way
  std::uint64_t dropped_ = 0;
  bool writing_ = false, writing_gap_ = false, closed_ = false;
};

HistorianServer::HistorianServer(asio::io_context& io, const config::HistorianListener& cfg, service::Counters& counters)
    : io_(io), cfg_(cfg), counters_(counters), acceptor_(io), accept_retry_(io) {}

HistorianServer::~HistorianServer() {
  stop();
  *alive_ = false;
}

Status HistorianServer::start() {
  boost::system::error_code ec;
  const auto address = asio::ip::make_address(cfg_.address, ec);
  if (ec) return Error{"historian feed: bad address " + cfg_.address};
  const tcp::endpoint ep(address, static_cast<unsigned short>(cfg_.port));
  acceptor_.open(ep.protocol(), ec);
  if (!ec) acceptor_.set_option(tcp::acceptor::reuse_address(true), ec);
  if (!ec) acceptor_.bind(ep, ec);
  if (!ec) acceptor_.listen(asio::socket_base::max_listen_connections, ec);
  if (ec) return Error{"historian feed (" + endpoint_text(ep) + "): " + ec.message()};
  do_accept();
  return ok_status();
}

void HistorianServer::stop() {
  stopped_ = true;
  accept_retry_.cancel();
  boost::system::error_code ignored;
  acceptor_.close(ignored);
  for (auto& s : subscribers_) s->close();
  subscribers_.clear();
}

void HistorianServer::do_accept() {
  acceptor_.async_accept([this, alive = alive_](boost::system::error_code ec, tcp::socket socket) {
    if (!*alive || stopped_ || ec == asio::error::operation_aborted) return;
    if (ec) {  // out of descriptors: retry later, not at once (that would spin the I/O thread)
      spdlog::warn("historian feed: accept: {}; retrying in 100 ms", ec.message());
      accept_retry_.expires_after(std::chrono::milliseconds(100));
      return accept_retry_.async_wait([this, alive = alive_](boost::system::error_code e) {
        if (!e && *alive && !stopped_) do_accept();
      });
    }
    {
      boost::system::error_code e2;
      const auto peer = socket.remote_endpoint(e2);
      const std::string who = e2 ? std::string("?") : endpoint_text(peer);
      if (e2 || !peer_allowed(peer.address(), cfg_.allow)) {
        spdlog::warn("historian feed: subscriber {} not in the allow list, refused", who);
        socket.close(e2);
      } else if (static_cast<int>(subscribers_.size()) >= cfg_.max_subscribers) {
        ++counters_.historian_subscribers_dropped;
        spdlog::warn("historian feed: subscriber {} refused, {} already connected", who, subscribers_.size());
        asio::write(socket, asio::buffer(std::string("{\"type\":\"error\",\"error\":\"too many subscribers\"}\n")), e2);
        socket.close(e2);
      } else {
        // Records are small writes: without TCP_NODELAY, Nagle holds each one back until the
        // previous is acknowledged, and the subscriber's delayed ACK makes that up to 40 ms.
        socket.set_option(tcp::no_delay(true), e2);
        auto s = std::make_shared<HistorianSubscriber>(*this, std::move(socket), who);
        subscribers_.insert(s);
        spdlog::info("historian subscriber {} connected", who);
        s->start();
      }
    }
    do_accept();
  });
}

void HistorianServer::publish(std::shared_ptr<const std::string> line) {
  for (auto& s : subscribers_) s->push(line);
}

}  // namespace rigcal::io
