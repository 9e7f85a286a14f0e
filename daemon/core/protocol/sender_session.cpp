#include "rigcal/protocol/sender_session.hpp"

#include <algorithm>

namespace rigcal::protocol {

SenderSession::SenderSession(std::string stream, std::optional<std::string> secret)
    : stream_(std::move(stream)), secret_(std::move(secret)) {}

std::string SenderSession::open() {
  connected_ = true;
  ready_ = false;
  unsent_ = 0;
  std::string lines;
  if (secret_) lines += "AUTH " + *secret_ + "\n";
  lines += "HELLO " + stream_ + "\n";
  return lines;
}

void SenderSession::lost() {
  connected_ = false;
  ready_ = false;
  unsent_ = 0;
}

void SenderSession::add(std::uint64_t seq, std::string text, std::uint64_t origin) {
  pending_.push_back(Entry{seq, origin, std::move(text)});
}

bool SenderSession::skip_if_held(std::uint64_t seq) {
  if (seq > held_through_) return false;
  ++counts_.already_held;
  return true;
}

std::size_t SenderSession::take_unsent(std::string& out, std::size_t max_bytes) {
  std::size_t n = 0;
  while (ready_ && unsent_ < pending_.size() && (n == 0 || out.size() < max_bytes)) {
    Entry& e = pending_[unsent_++];
    out += '@';
    out += std::to_string(e.seq);
    out += ' ';
    out += e.text;
    out += '\n';
    ++(e.written ? counts_.resent : counts_.sent);
    e.written = true;
    ++n;
  }
  return n;
}

std::uint64_t SenderSession::settle_through(std::uint64_t n) {
  std::uint64_t settled = 0;
  while (!pending_.empty() && pending_.front().seq <= n) {
    const Entry& e = pending_.front();
    // A rejected record was counted when its REJ came; the ACK only closes it.
    if (!e.rejected) ++(e.written ? counts_.acknowledged : counts_.already_held);
    pending_.pop_front();
    if (unsent_ > 0) --unsent_;
    ++settled;
  }
  settled_through_ = std::max(settled_through_, n);
  return settled;
}

SessionEvent SenderSession::on_hello(const ServerReply& r) {
  SessionEvent ev;
  if (!connected_ || ready_) {
    ev.kind = SessionEvent::Kind::protocol_error;
    ev.detail = "OK HELLO without a HELLO waiting for it";
    return ev;
  }
  if (r.stream != stream_) {
    ev.kind = SessionEvent::Kind::protocol_error;
    ev.detail = "OK HELLO names stream '" + r.stream + "', not '" + stream_ + "'";
    return ev;
  }
  const bool regressed = r.seq < settled_through_;
  held_through_ = r.seq;
  ev.settled = settle_through(r.seq);
  ready_ = true;
  unsent_ = 0;  // everything still outstanding goes again, in order
  ev.seq = r.seq;
  ev.kind = regressed ? SessionEvent::Kind::regressed : SessionEvent::Kind::ready;
  if (regressed)
    ev.detail = "the server holds stream '" + stream_ + "' only through " + std::to_string(r.seq) +
                " but had acknowledged it through " + std::to_string(settled_through_);
  return ev;
}

SessionEvent SenderSession::on_ack(std::uint64_t n) {
  SessionEvent ev;
  ev.seq = n;
  if (n <= settled_through_) return ev;  // coalesced ACKs may repeat; nothing new
  ev.kind = SessionEvent::Kind::progress;
  ev.settled = settle_through(n);
  return ev;
}

SessionEvent SenderSession::on_reject(const ServerReply& r) {
  SessionEvent ev;
  ev.seq = r.seq;
  const auto it = std::lower_bound(pending_.begin(), pending_.end(), r.seq,
                                   [](const Entry& e, std::uint64_t s) { return e.seq < s; });
  if (it == pending_.end() || it->seq != r.seq || it->rejected) {
    ev.detail = "REJ for record " + std::to_string(r.seq) + ", which is not outstanding";
    return ev;
  }
  it->rejected = true;
  ++counts_.rejected;
  ev.kind = SessionEvent::Kind::rejected;
  ev.origin = it->origin;
  ev.reason = r.reason;
  ev.detail = r.detail;
  return ev;
}

SessionEvent SenderSession::on_server_line(std::string_view line) {
  auto reply = parse_server_reply(line);
  if (!reply) {
    SessionEvent ev;
    ev.kind = SessionEvent::Kind::protocol_error;
    ev.detail = reply.error().message;
    return ev;
  }
  switch (reply->kind) {
    case ServerReply::Kind::hello_ok:
      return on_hello(*reply);
    case ServerReply::Kind::ack:
      return on_ack(reply->seq);
    case ServerReply::Kind::reject:
      return on_reject(*reply);
    case ServerReply::Kind::error:
      break;
  }
  SessionEvent ev;
  ev.kind = SessionEvent::Kind::fatal;
  ev.reason = reply->reason;
  ev.detail = reply->detail;
  return ev;
}

void SenderSession::abandon() {
  for (const Entry& e : pending_)
    if (!e.rejected) ++counts_.abandoned;
  pending_.clear();
  unsent_ = 0;
}

}  // namespace rigcal::protocol
