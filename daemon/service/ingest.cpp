#include "ingest.hpp"

#include <algorithm>

#include "secrets.hpp"

namespace rigcal::service {

using protocol::RejectReason;

IngestSession::IngestSession(Ingest& ingest, Source source, std::size_t max_line_bytes, std::string secret,
                             bool commands, Transport transport)
    : ingest_(ingest),
      source_(std::move(source)),
      splitter_(max_line_bytes),
      secret_(std::move(secret)),
      commands_(commands),
      transport_(std::move(transport)),
      counters_(ingest.counters().inputs[source_.input]),
      authenticated_(secret_.empty()) {
  ingest_.register_session(this);
}

IngestSession::~IngestSession() {
  if (stream_ && stream_->owner == this) stream_->owner = nullptr;
  ingest_.unregister_session(this);
}

IngestSession::FeedResult IngestSession::feed(std::string_view bytes) {
  if (closing_) return FeedResult::closed;
  arrival_ = ingest_.host().now();
  counters_.bytes += bytes.size();
  splitter_.feed(bytes, [this](const protocol::Line& l) {
    if (!closing_) handle_line(l);
  });
  if (!batch_.empty() && !ingest_.commit(*this)) paused_ = true;
  if (closing_) return FeedResult::closed;
  return paused_ ? FeedResult::paused : FeedResult::ok;
}

void IngestSession::finish() {
  if (closing_) return;
  arrival_ = ingest_.host().now();
  splitter_.finish([this](const protocol::Line& l) {
    if (!closing_) handle_line(l);
  });
  if (!batch_.empty() && !ingest_.commit(*this)) paused_ = true;
}

void IngestSession::fatal(const std::string& reason, const std::string& detail) {
  if (transport_.send) transport_.send("ERR " + reason + " " + detail);
  closing_ = true;
  if (transport_.close) transport_.close();
}

void IngestSession::reject(const protocol::Line& line, RejectReason reason, const std::string& detail,
                           std::optional<std::uint64_t> seq) {
  ++counters_.rejects[static_cast<std::size_t>(reason)];
  ingest_.host().on_line_rejected(source_, line.number, reason, detail, line.text);
  if (seq && transport_.send) {
    transport_.send("REJ " + std::to_string(*seq) + " " + std::string(protocol::reject_reason_name(reason)) + " " +
                    detail);
    note_seq(*seq);
  }
}

// A rejected or duplicate seq still needs an ACK once everything before it is on disk.
void IngestSession::note_seq(std::uint64_t seq) {
  if (!stream_) {
    private_stream_ = std::make_unique<Stream>();
    private_stream_->owner = this;
    stream_ = private_stream_.get();
  }
  if (seq > stream_->high_water) stream_->high_water = seq;
  stream_->pending.emplace_back(ingest_.journal_.appended_offset(), seq);
  if (ingest_.journal_.durable_offset() >= ingest_.journal_.appended_offset() && !ingest_.blocked())
    ingest_.on_durable(ingest_.journal_.durable_offset());
}

void IngestSession::handle_line(const protocol::Line& line) {
  ++counters_.lines;
  if (line.too_long) {
    return reject(line, RejectReason::line_too_long,
                  "line longer than " + std::to_string(splitter_.max_line_bytes()) + " bytes; the rest was dropped",
                  protocol::peek_sequence(line.text));
  }
  const protocol::DecodeResult d = protocol::decode_record(line.text);
  if (!d.ok) return reject(line, d.reason, d.detail, protocol::peek_sequence(line.text));
  const protocol::Record& r = d.record;
  if (r.kind == protocol::RecordKind::ignorable) return;
  if (r.kind == protocol::RecordKind::auth) {
    if (!commands_ || secret_.empty() || authenticated_)
      return reject(line, RejectReason::unexpected_command, "AUTH is not expected here", std::nullopt);
    if (!secrets_equal(r.argument, secret_)) return fatal("not_authenticated", "wrong secret");
    authenticated_ = true;
    return;
  }
  if (!authenticated_) return fatal("not_authenticated", "send AUTH with the listener's secret first");
  if (r.kind == protocol::RecordKind::hello) {
    if (!commands_) return reject(line, RejectReason::unexpected_command, "HELLO is for TCP senders", std::nullopt);
    if (stream_ || records_seen_)
      return reject(line, RejectReason::unexpected_command, "HELLO must come once, before any record", std::nullopt);
    std::string error;
    Stream* s = ingest_.claim_stream(std::string(r.argument), this, error);
    if (!s) return fatal("stream_busy", error);
    stream_ = s;
    if (transport_.send) transport_.send("OK HELLO " + s->name + " " + std::to_string(s->durable));
    acked_ = s->durable;
    return;
  }
  handle_record(r, line);
}

void IngestSession::handle_record(const protocol::Record& r, const protocol::Line& line) {
  records_seen_ = true;
  engine::ChannelEngine* ch = ingest_.engine().find(r.channel);
  if (!ch) return reject(line, RejectReason::unknown_channel, "no channel '" + std::string(r.channel) + "' is configured", r.seq);
  if (stream_ && !stream_->name.empty() && !r.seq)
    return reject(line, RejectReason::missing_sequence, "records on stream '" + stream_->name + "' need @SEQ", std::nullopt);
  if (r.seq) {
    if (!stream_) {
      private_stream_ = std::make_unique<Stream>();
      private_stream_->owner = this;
      stream_ = private_stream_.get();
    }
    if (*r.seq <= stream_->high_water) {
      ++counters_.duplicates;
      return;
    }
  }
  const protocol::TimeNs t = r.time.value_or(arrival_);
  if (t - arrival_ > ingest_.max_future_ns_)
    return reject(line, RejectReason::clock_future,
                  "timestamp " + protocol::format_rfc3339(t) + " is ahead of rigcald's clock (" +
                      protocol::format_rfc3339(arrival_) + ") by more than time.max_future_s",
                  r.seq);
  const bool pair = r.kind == protocol::RecordKind::pair;
  batch_.push_back(Pending{ch, pair, r.seq.value_or(0), t, r.reference, r.sensor});
  if (r.seq) {
    stream_->high_water = *r.seq;
    batch_max_seq_ = std::max(batch_max_seq_, *r.seq);
  }
  ++(pair ? counters_.pairs : counters_.readings);
}

void IngestSession::send_ack() {
  if (!stream_ || stream_->durable <= acked_ || closing_) return;
  acked_ = stream_->durable;
  if (transport_.send) transport_.send("ACK " + std::to_string(acked_));
}

// ---- Ingest ----

Ingest::Ingest(engine::Engine& engine, io::JournalWriter& journal, IngestHost& host, Counters& counters,
               const config::Config& cfg)
    : engine_(engine), journal_(journal), host_(host), counters_(counters) {
  set_config(cfg);
}

void Ingest::unregister_session(IngestSession* s) {
  sessions_.erase(std::remove(sessions_.begin(), sessions_.end(), s), sessions_.end());
  for (Blocked& b : blocked_)
    if (b.session == s) b.session = nullptr;
}

Stream* Ingest::claim_stream(const std::string& name, IngestSession* owner, std::string& error) {
  auto& slot = streams_[name];
  if (!slot) {
    slot = std::make_unique<Stream>();
    slot->name = name;
  }
  if (slot->owner && slot->owner != owner) {
    error = "stream '" + name + "' is in use by another connection (" + slot->owner->source().peer + ")";
    return nullptr;
  }
  slot->owner = owner;
  return slot.get();
}

bool Ingest::commit(IngestSession& s) {
  const std::string_view stream_name = s.stream_ ? std::string_view(s.stream_->name) : std::string_view();
  for (const auto& p : s.batch_) {
    const std::string& id = p.channel->config().id;
    if (p.pair)
      encoder_.pair(id, stream_name, p.seq, p.time, p.reference, p.sensor);
    else
      encoder_.reading(id, stream_name, p.seq, p.time, p.sensor);
  }
  std::string frame;
  encoder_.finish_frame(frame);
  Stream* stream = s.batch_max_seq_ ? s.stream_ : nullptr;
  const std::uint64_t max_seq = s.batch_max_seq_;
  auto apply = [this, batch = std::move(s.batch_), stream, max_seq]() {
    engine::EventSink& sink = host_.live_sink();
    for (const auto& p : batch) {
      if (p.pair)
        p.channel->on_pair(p.time, p.reference, p.sensor, sink);
      else
        p.channel->on_reading(p.time, p.sensor, sink);
    }
    if (stream) stream->pending.emplace_back(journal_.appended_offset(), max_seq);
  };
  s.batch_.clear();
  s.batch_max_seq_ = 0;
  return write_frame(std::move(frame), std::move(apply), &s);
}

bool Ingest::write_frame(std::string frame, std::function<void()> apply, IngestSession* waiting) {
  if (!blocked_.empty()) {
    blocked_.push_back(Blocked{std::move(frame), std::move(apply), waiting});
    return false;
  }
  if (auto st = journal_.append(frame); !st) {
    ++counters_.journal_write_errors;
    ++counters_.journal_blocked_episodes;
    blocked_error_ = st.error().message;
    blocked_.push_back(Blocked{std::move(frame), std::move(apply), waiting});
    host_.on_journal_blocked(blocked_error_);
    return false;
  }
  ++counters_.journal_frames;
  counters_.journal_bytes += frame.size();
  apply();
  return true;
}

void Ingest::retry_blocked() {
  while (!blocked_.empty()) {
    Blocked& b = blocked_.front();
    if (auto st = journal_.append(b.frame); !st) {
      ++counters_.journal_write_errors;
      blocked_error_ = st.error().message;
      return;
    }
    ++counters_.journal_frames;
    counters_.journal_bytes += b.frame.size();
    b.apply();
    IngestSession* s = b.session;
    blocked_.pop_front();
    if (s && std::find(sessions_.begin(), sessions_.end(), s) != sessions_.end() &&
        std::none_of(blocked_.begin(), blocked_.end(), [s](const Blocked& o) { return o.session == s; })) {
      s->paused_ = false;
      if (s->transport_.resume) s->transport_.resume();
    }
  }
  blocked_error_.clear();
  host_.on_journal_unblocked();
}

void Ingest::on_durable(std::uint64_t offset) {
  auto settle = [offset](Stream& st) {
    while (!st.pending.empty() && st.pending.front().first <= offset) {
      st.durable = std::max(st.durable, st.pending.front().second);
      st.pending.pop_front();
    }
  };
  for (auto& [name, st] : streams_) settle(*st);
  for (IngestSession* s : sessions_) {
    if (s->private_stream_) settle(*s->private_stream_);
    s->send_ack();
  }
}

void Ingest::tick(protocol::TimeNs now) {
  encoder_.tick(now);
  std::string frame;
  encoder_.finish_frame(frame);
  write_frame(std::move(frame), [this, now] { engine_.tick(now, host_.live_sink()); }, nullptr);
}

Status Ingest::reset_channel(const std::string& id, protocol::TimeNs now) {
  engine::ChannelEngine* ch = engine_.find(id);
  if (!ch) return Error{"no channel '" + id + "' is configured"};
  if (blocked()) return Error{"the journal cannot be written (" + blocked_error_ + "); try again later"};
  encoder_.reset(id, now);
  std::string frame;
  encoder_.finish_frame(frame);
  write_frame(std::move(frame), [this, ch, now] { ch->reset(now, host_.live_sink()); }, nullptr);
  return ok_status();
}

void Ingest::restore_streams(const std::vector<state::CheckpointStream>& streams) {
  for (const auto& cs : streams) {
    auto& slot = streams_[cs.name];
    if (!slot) {
      slot = std::make_unique<Stream>();
      slot->name = cs.name;
    }
    slot->high_water = slot->durable = std::max(slot->high_water, cs.high_water);
  }
}

std::vector<state::CheckpointStream> Ingest::checkpoint_streams() const {
  std::vector<state::CheckpointStream> out;
  for (const auto& [name, st] : streams_) out.push_back({name, st->high_water});
  return out;
}

void Ingest::replay(const state::JournalEntry& e) {
  using T = state::JournalEntryType;
  if (!e.stream.empty() && e.seq > 0) {
    auto& slot = streams_[std::string(e.stream)];
    if (!slot) {
      slot = std::make_unique<Stream>();
      slot->name = std::string(e.stream);
    }
    slot->high_water = slot->durable = std::max(slot->high_water, e.seq);
  }
  switch (e.type) {
    case T::pair:
      if (auto* ch = engine_.find(e.channel)) ch->on_pair(e.time, e.reference_raw, e.sensor_raw, replay_sink_);
      break;
    case T::reading:
      if (auto* ch = engine_.find(e.channel)) ch->on_reading(e.time, e.sensor_raw, replay_sink_);
      break;
    case T::tick:
      engine_.tick(e.time, replay_sink_);
      break;
    case T::reset:
      if (auto* ch = engine_.find(e.channel)) ch->reset(e.time, replay_sink_);
      break;
    case T::channel:
    case T::stream:
      break;
  }
}

}  // namespace rigcal::service
