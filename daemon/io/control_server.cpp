#include "control_server.hpp"

#include <sys/stat.h>
#include <unistd.h>

#include <boost/asio/read_until.hpp>
#include <boost/asio/steady_timer.hpp>
#include <boost/asio/streambuf.hpp>
#include <boost/asio/write.hpp>
#include <memory>
#include <spdlog/spdlog.h>

#include "../service/secrets.hpp"
#include "rigcal/protocol/control_request.hpp"

namespace rigcal::io {

namespace asio = boost::asio;
using local = asio::local::stream_protocol;

namespace {

constexpr std::size_t max_request_bytes = protocol::max_control_request_bytes;

class ControlConnection : public std::enable_shared_from_this<ControlConnection> {
 public:
  ControlConnection(local::socket socket, std::string secret, ControlServer::Handler handler)
      : socket_(std::move(socket)), timer_(socket_.get_executor()), buffer_(max_request_bytes), secret_(std::move(secret)),
        handler_(std::move(handler)), authenticated_(secret_.empty()) {}

  void start() {
    auto self = shared_from_this();
    timer_.expires_after(std::chrono::seconds(10));
    timer_.async_wait([this, self](boost::system::error_code ec) {
      if (!ec) close();
    });
    read_line();
  }

 private:
  void read_line() {
    auto self = shared_from_this();
    asio::async_read_until(socket_, buffer_, '\n', [this, self](boost::system::error_code ec, std::size_t n) {
      if (ec) return close();
      std::string line(asio::buffers_begin(buffer_.data()), asio::buffers_begin(buffer_.data()) + static_cast<long>(n));
      buffer_.consume(n);
      while (!line.empty() && (line.back() == '\n' || line.back() == '\r')) line.pop_back();
      if (!authenticated_) {
        const auto auth = protocol::parse_control_auth(line);
        if (auth.ok && service::secrets_equal(auth.secret, secret_)) {
          authenticated_ = true;
          return read_line();
        }
        return answer("ERR not_authenticated send AUTH with the control secret first\n");
      }
      answer(handler_(line));
    });
  }

  void answer(std::string text) {
    reply_ = std::move(text);
    auto self = shared_from_this();
    asio::async_write(socket_, asio::buffer(reply_), [this, self](boost::system::error_code, std::size_t) { close(); });
  }

  void close() {
    timer_.cancel();
    boost::system::error_code ignored;
    socket_.shutdown(local::socket::shutdown_both, ignored);
    socket_.close(ignored);
  }

  local::socket socket_;
  asio::steady_timer timer_;
  asio::streambuf buffer_;
  std::string secret_;
  ControlServer::Handler handler_;
  std::string reply_;
  bool authenticated_;
};

}  // namespace

ControlServer::ControlServer(asio::io_context& io, std::string path, std::string secret, Handler handler)
    : io_(io), path_(std::move(path)), secret_(std::move(secret)), handler_(std::move(handler)), acceptor_(io),
      accept_retry_(io) {}

ControlServer::~ControlServer() { stop(); }

Status ControlServer::start() {
  ::unlink(path_.c_str());  // a socket left by a previous run; the state directory lock keeps us alone
  boost::system::error_code ec;
  const local::endpoint ep(path_);
  acceptor_.open(ep.protocol(), ec);
  if (!ec) acceptor_.bind(ep, ec);
  if (!ec) acceptor_.listen(asio::socket_base::max_listen_connections, ec);
  if (ec) return Error{"control socket " + path_ + ": " + ec.message()};
  ::chmod(path_.c_str(), 0660);
  do_accept();
  return ok_status();
}

void ControlServer::stop() {
  if (stopped_) return;
  stopped_ = true;
  accept_retry_.cancel();
  boost::system::error_code ignored;
  acceptor_.close(ignored);
  ::unlink(path_.c_str());
}

void ControlServer::do_accept() {
  acceptor_.async_accept([this](boost::system::error_code ec, local::socket socket) {
    if (ec == asio::error::operation_aborted || stopped_) return;
    if (ec) {  // out of descriptors: retry later, not at once (that would spin the I/O thread)
      spdlog::warn("control socket: accept: {}; retrying in 100 ms", ec.message());
      accept_retry_.expires_after(std::chrono::milliseconds(100));
      return accept_retry_.async_wait([this](boost::system::error_code e) {
        if (!e && !stopped_) do_accept();
      });
    }
    std::make_shared<ControlConnection>(std::move(socket), secret_, handler_)->start();
    do_accept();
  });
}

}  // namespace rigcal::io
