#include "tcp_input.hpp"

#include <boost/asio/read.hpp>
#include <boost/asio/ssl/stream.hpp>
#include <boost/asio/steady_timer.hpp>
#include <boost/asio/write.hpp>
#include <deque>
#include <spdlog/spdlog.h>

#include "network.hpp"

namespace rigcal::io {

namespace asio = boost::asio;
using asio::ip::tcp;

// Base of the plain and TLS connections: what the listener needs to track and stop them.
class TcpConnection {
 public:
  virtual ~TcpConnection() = default;
  virtual void start() = 0;
  virtual void stop() = 0;
};

namespace {

constexpr std::size_t read_chunk_bytes = 64 * 1024;
constexpr std::size_t max_queued_reply_bytes = 1 << 20;

tcp::socket& lowest(tcp::socket& s) { return s; }
tcp::socket& lowest(asio::ssl::stream<tcp::socket>& s) { return s.next_layer(); }

template <class Stream>
class Connection final : public TcpConnection, public std::enable_shared_from_this<Connection<Stream>> {
 public:
  Connection(TcpInput& owner, Stream stream, service::Source source)
      : owner_(owner), stream_(std::move(stream)), timer_(owner.io()), source_(std::move(source)) {}

  void start() override {
    auto self = this->shared_from_this();
    session_ = std::make_unique<service::IngestSession>(
        owner_.ingest(), source_, static_cast<std::size_t>(owner_.config().max_line_bytes), owner_.secret(), true,
        service::IngestSession::Transport{[this](std::string line) { send(std::move(line)); },
                                          [this] { close_after_writes(); },
                                          [this, self] {
                                            paused_ = false;
                                            if (!reading_) do_read();
                                          }});
    arm_idle_timer();
    if constexpr (std::is_same_v<Stream, asio::ssl::stream<tcp::socket>>) {
      stream_.async_handshake(asio::ssl::stream_base::server, [this, self](boost::system::error_code ec) {
        if (ec) {
          spdlog::warn("{}: TLS handshake failed: {}", source_.label(), ec.message());
          return stop();
        }
        do_read();
      });
    } else {
      do_read();
    }
  }

  void stop() override {
    if (stopped_) return;
    stopped_ = true;
    timer_.cancel();
    boost::system::error_code ignored;
    lowest(stream_).shutdown(tcp::socket::shutdown_both, ignored);
    lowest(stream_).close(ignored);
    owner_.forget(this);
    if (session_) session_.reset();  // releases the stream for another connection
  }

  Stream& stream() { return stream_; }

  // A new connection over the cap: say why, then close.
  void refuse(std::string line) {
    refusing_ = true;
    send(std::move(line));
    close_after_writes();
  }

 private:
  void arm_idle_timer() {
    timer_.expires_after(std::chrono::milliseconds(static_cast<long>(owner_.config().idle_timeout_s * 1000)));
    auto self = this->shared_from_this();
    const std::uint64_t lines_at_arm = lines_;
    timer_.async_wait([this, self, lines_at_arm](boost::system::error_code ec) {
      if (ec || stopped_) return;
      if (lines_ == lines_at_arm) {
        spdlog::info("{}: no complete line for {} s, closing", source_.label(), owner_.config().idle_timeout_s);
        send("ERR idle_timeout no complete line for " + std::to_string(owner_.config().idle_timeout_s) + " s");
        return close_after_writes();
      }
      arm_idle_timer();
    });
  }

  void do_read() {
    if (stopped_ || closing_ || paused_) return;
    reading_ = true;
    auto self = this->shared_from_this();
    stream_.async_read_some(asio::buffer(buffer_), [this, self](boost::system::error_code ec, std::size_t n) {
      reading_ = false;
      if (stopped_) return;
      if (ec) {
        if (session_) session_->finish();
        if (ec != asio::error::eof && ec != asio::error::operation_aborted && ec != asio::ssl::error::stream_truncated)
          spdlog::debug("{}: read: {}", source_.label(), ec.message());
        return close_after_writes();
      }
      const std::uint64_t before = owner_.ingest().counters().inputs[source_.input].lines;
      const auto result = session_->feed(std::string_view(buffer_.data(), n));
      lines_ += owner_.ingest().counters().inputs[source_.input].lines - before;
      if (result == service::IngestSession::FeedResult::closed) return;
      if (result == service::IngestSession::FeedResult::paused) {
        paused_ = true;
        return;
      }
      do_read();
    });
  }

  void send(std::string line) {
    if (stopped_) return;
    if (queued_bytes_ > max_queued_reply_bytes && line.rfind("REJ ", 0) == 0) return;
    line.push_back('\n');
    queued_bytes_ += line.size();
    writes_.push_back(std::move(line));
    if (!writing_) do_write();
  }

  void do_write() {
    if (writes_.empty()) {
      writing_ = false;
      if (closing_) stop();
      return;
    }
    writing_ = true;
    auto self = this->shared_from_this();
    asio::async_write(stream_, asio::buffer(writes_.front()), [this, self](boost::system::error_code ec, std::size_t) {
      if (stopped_) return;
      if (ec) return stop();
      queued_bytes_ -= writes_.front().size();
      writes_.pop_front();
      do_write();
    });
  }

  void close_after_writes() {
    closing_ = true;
    if (!writing_) stop();
  }

  TcpInput& owner_;
  Stream stream_;
  asio::steady_timer timer_;
  service::Source source_;
  std::unique_ptr<service::IngestSession> session_;
  std::array<char, read_chunk_bytes> buffer_{};
  std::deque<std::string> writes_;
  std::size_t queued_bytes_ = 0;
  std::uint64_t lines_ = 0;
  bool writing_ = false, reading_ = false, closing_ = false, stopped_ = false, paused_ = false, refusing_ = false;
};

}  // namespace

Result<asio::ssl::context> make_tls_context(const config::TlsConfig& tls) {
  asio::ssl::context ctx(asio::ssl::context::tls_server);
  ctx.set_options(asio::ssl::context::default_workarounds | asio::ssl::context::no_sslv2 |
                  asio::ssl::context::no_sslv3 | asio::ssl::context::no_tlsv1 | asio::ssl::context::no_tlsv1_1 |
                  asio::ssl::context::single_dh_use);
  boost::system::error_code ec;
  ctx.use_certificate_chain_file(tls.certificate_file, ec);
  if (ec) return Error{tls.certificate_file + ": " + ec.message()};
  ctx.use_private_key_file(tls.private_key_file, asio::ssl::context::pem, ec);
  if (ec) return Error{tls.private_key_file + ": " + ec.message()};
  if (!tls.client_ca_file.empty()) {
    ctx.load_verify_file(tls.client_ca_file, ec);
    if (ec) return Error{tls.client_ca_file + ": " + ec.message()};
    ctx.set_verify_mode(asio::ssl::verify_peer | asio::ssl::verify_fail_if_no_peer_cert);
  }
  return ctx;
}

TcpInput::TcpInput(asio::io_context& io, const config::TcpInput& cfg, service::Ingest& ingest, std::string secret,
                   std::optional<asio::ssl::context> tls)
    : io_(io),
      cfg_(cfg),
      ingest_(ingest),
      secret_(std::move(secret)),
      tls_(std::move(tls)),
      acceptor_(io),
      accept_retry_(io) {}

TcpInput::~TcpInput() {
  stop();
  *alive_ = false;
}

Status TcpInput::start() {
  boost::system::error_code ec;
  const auto address = asio::ip::make_address(cfg_.address, ec);
  if (ec) return Error{"input " + cfg_.name + ": bad address " + cfg_.address};
  const tcp::endpoint ep(address, static_cast<unsigned short>(cfg_.port));
  const std::string where = "input " + cfg_.name + " (" + endpoint_text(ep) + ")";
  acceptor_.open(ep.protocol(), ec);
  if (!ec) acceptor_.set_option(tcp::acceptor::reuse_address(true), ec);
  if (!ec) acceptor_.bind(ep, ec);
  if (!ec) acceptor_.listen(asio::socket_base::max_listen_connections, ec);
  if (ec) return Error{where + ": " + ec.message()};
  do_accept();
  return ok_status();
}

void TcpInput::stop() {
  stopped_ = true;
  accept_retry_.cancel();
  boost::system::error_code ignored;
  acceptor_.close(ignored);
  while (!connections_.empty()) (*connections_.begin())->stop();
}

void TcpInput::do_accept() {
  acceptor_.async_accept([this, alive = alive_](boost::system::error_code ec, tcp::socket socket) {
    if (!*alive || stopped_ || ec == asio::error::operation_aborted) return;
    if (ec) return on_accept_error(ec);
    if (accept_errors_ > 0)
      spdlog::info("input {}: accepting again after {} failed attempts", cfg_.name, accept_errors_);
    accept_errors_ = 0;
    on_accepted(std::move(socket));
    do_accept();
  });
}

void TcpInput::on_accept_error(const boost::system::error_code& ec) {
  if (accept_errors_++ == 0)
    spdlog::error("input {}: accept: {} ({} connections open); retrying every 100 ms", cfg_.name, ec.message(),
                  connections_.size());
  accept_retry_.expires_after(std::chrono::milliseconds(100));
  accept_retry_.async_wait([this, alive = alive_](boost::system::error_code e) {
    if (!e && *alive && !stopped_) do_accept();
  });
}

void TcpInput::on_accepted(tcp::socket socket) {
  auto& counters = ingest_.counters().inputs[cfg_.name];
  boost::system::error_code ec;
  const tcp::endpoint peer = socket.remote_endpoint(ec);
  if (ec) return;
  socket.set_option(tcp::no_delay(true), ec);
  service::Source source{cfg_.name, tls_ ? "tls" : "tcp", endpoint_text(peer)};
  if (!peer_allowed(peer.address(), cfg_.allow)) {
    ++counters.refused_connections;
    spdlog::warn("{}: peer not in the input's allow list, refused", source.label());
    socket.close(ec);
    return;
  }
  const bool over_cap = static_cast<int>(connections_.size()) >= cfg_.max_connections;
  auto make = [&](auto stream) {
    using S = decltype(stream);
    auto c = std::make_shared<Connection<S>>(*this, std::move(stream), source);
    if (over_cap && tls_) {  // nothing can be said in clear on a TLS port: just close
      ++counters.refused_connections;
      spdlog::warn("{}: refused, {} connections already open (max_connections)", source.label(), connections_.size());
      boost::system::error_code ignored;
      lowest(c->stream()).close(ignored);
      return;
    }
    if (over_cap) {
      ++counters.refused_connections;
      spdlog::warn("{}: refused, {} connections already open (max_connections)", source.label(), connections_.size());
      connections_.insert(c.get());
      c->refuse("ERR connection_limit this input already has its maximum of " + std::to_string(cfg_.max_connections) +
                " connections");
      return;
    }
    ++counters.connections;
    connections_.insert(c.get());
    c->start();
  };
  if (tls_) {
    make(asio::ssl::stream<tcp::socket>(std::move(socket), *tls_));
  } else {
    make(std::move(socket));
  }
}

}  // namespace rigcal::io
