#pragma once
// A TCP listener for senders of the line protocol, plain or TLS. Each accepted connection becomes a
// session that feeds an IngestSession (service/ingest.hpp) and writes its replies (OK, ACK, REJ, ERR).
//
//  - peers outside `allow` are refused and counted; beyond max_connections a peer gets
//    "ERR connection_limit ..." and is closed;
//  - a connection that completes no line for idle_timeout_s is closed (a sender trickling one byte a
//    second never completes a line, so it is timed out too);
//  - a paused session (journal blocked) stops reading, so TCP flow control holds the sender back;
//  - replies queue up to 1 MiB per connection; beyond that REJ replies are dropped (ACK and ERR never);
//  - a failed accept (out of descriptors: EMFILE) is retried after 100 ms, logged once per episode:
//    the pending connection stays in the backlog, and retrying at once would spin the I/O thread.
// Runs on the I/O thread. stop() closes the acceptor and every connection.
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/ssl/context.hpp>
#include <boost/asio/steady_timer.hpp>
#include <functional>
#include <memory>
#include <optional>
#include <set>

#include "../service/ingest.hpp"
#include "rigcal/config/config.hpp"

namespace rigcal::io {

class TcpConnection;

class TcpInput {
 public:
  TcpInput(boost::asio::io_context& io, const config::TcpInput& cfg, service::Ingest& ingest, std::string secret,
           std::optional<boost::asio::ssl::context> tls);
  ~TcpInput();

  // Binds and starts accepting. Errors name the address and port.
  Status start();
  void stop();
  std::size_t connections() const { return connections_.size(); }
  const config::TcpInput& config() const { return cfg_; }

  // For this input's connections.
  boost::asio::io_context& io() { return io_; }
  service::Ingest& ingest() { return ingest_; }
  const std::string& secret() const { return secret_; }
  void forget(TcpConnection* c) { connections_.erase(c); }

 private:
  void do_accept();
  void on_accept_error(const boost::system::error_code& ec);
  void on_accepted(boost::asio::ip::tcp::socket socket);

  boost::asio::io_context& io_;
  config::TcpInput cfg_;
  service::Ingest& ingest_;
  std::string secret_;
  std::optional<boost::asio::ssl::context> tls_;
  boost::asio::ip::tcp::acceptor acceptor_;
  boost::asio::steady_timer accept_retry_;
  std::uint64_t accept_errors_ = 0;  // consecutive failed accepts (EMFILE, ENFILE, ENOBUFS...)
  // False once destroyed: on reload a listener is stopped and destroyed while a completed accept
  // (or an aborted one) may still be queued; its handler must not touch the listener then.
  std::shared_ptr<bool> alive_ = std::make_shared<bool>(true);
  std::set<TcpConnection*> connections_;
  bool stopped_ = false;
};

// Builds a TLS server context from the listener's configuration; errors name the file.
Result<boost::asio::ssl::context> make_tls_context(const config::TlsConfig& tls);

}  // namespace rigcal::io
