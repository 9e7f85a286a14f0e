#pragma once
// The local control socket (a Unix-domain stream socket, mode 0660) that `rigcal status` talks to.
// A client sends one request line (and first "AUTH secret" when control.secret_file is set); the
// server writes the handler's answer and closes. Requests and answers are documented in README
// "Control socket". A client that sends no complete line within 10 s is dropped. I/O thread only.
#include <boost/asio/io_context.hpp>
#include <boost/asio/steady_timer.hpp>
#include <boost/asio/local/stream_protocol.hpp>
#include <functional>
#include <string>

#include "rigcal/result.hpp"

namespace rigcal::io {

class ControlServer {
 public:
  // Returns the full answer for one request line (without its newline).
  using Handler = std::function<std::string(const std::string& request)>;

  ControlServer(boost::asio::io_context& io, std::string path, std::string secret, Handler handler);
  ~ControlServer();

  Status start();  // replaces a stale socket file left by a previous run
  void stop();
  const std::string& path() const { return path_; }

 private:
  void do_accept();

  boost::asio::io_context& io_;
  std::string path_;
  std::string secret_;
  Handler handler_;
  boost::asio::local::stream_protocol::acceptor acceptor_;
  boost::asio::steady_timer accept_retry_;
  bool stopped_ = false;
};

}  // namespace rigcal::io
