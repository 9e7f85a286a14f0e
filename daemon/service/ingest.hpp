#pragma once
// The daemon's one data path from bytes to the engine:
//
//   bytes (TCP segment, serial read) -> IngestSession::feed -> LineSplitter -> decode_record
//     -> session commands (AUTH, HELLO) | reject (counted, reject file, REJ reply)
//     -> channel lookup, sequence/duplicate check, clock rule -> the session's batch
//   end of the chunk -> Ingest::commit: journal frame written (write(2)) -> then applied to the engine
//   journal durable (fsync thread) -> Ingest::on_durable -> ACK to the senders
//
// If the journal cannot be written (disk full), the batch is kept, the session is paused (its
// transport stops reading, so TCP flow control holds the sender back) and the write is retried;
// nothing is applied or acknowledged before it is on disk.
//
// Streams: a sender names its stream with HELLO; each stream has a high-water mark (highest seq
// taken, for dropping resent duplicates) and a durable mark (highest seq on disk, which OK HELLO
// and ACK report). A connection that numbers records without HELLO gets a private stream that
// ends with the connection.
//
// Runs on the I/O thread only.
#include <deque>
#include <functional>
#include <memory>
#include <string>
#include <unordered_map>
#include <vector>

#include "../io/journal_writer.hpp"
#include "counters.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/engine/engine.hpp"
#include "rigcal/protocol/line_splitter.hpp"
#include "rigcal/protocol/record.hpp"
#include "rigcal/state/checkpoint_format.hpp"
#include "rigcal/state/journal_format.hpp"

namespace rigcal::service {

struct Source {
  std::string input;  // configured input name (counters)
  std::string kind;   // tcp, tls or serial
  std::string peer;   // 127.0.0.1:53422 or /dev/ttyUSB0
  std::string label() const { return kind + ":" + input + " " + peer; }
};

// What the ingest needs from the rest of the daemon.
class IngestHost {
 public:
  virtual ~IngestHost() = default;
  // A line refused before it reached the engine (counted by the ingest already).
  virtual void on_line_rejected(const Source& src, std::uint64_t line, protocol::RejectReason reason,
                                const std::string& detail, std::string_view raw) = 0;
  // Where the engine's events go while records are applied live.
  virtual engine::EventSink& live_sink() = 0;
  virtual protocol::TimeNs now() = 0;
  // The journal could not be written / can be written again.
  virtual void on_journal_blocked(const std::string& error) = 0;
  virtual void on_journal_unblocked() = 0;
};

struct Stream {
  std::string name;  // empty for a connection's private stream
  std::uint64_t high_water = 0;
  std::uint64_t durable = 0;
  std::deque<std::pair<std::uint64_t, std::uint64_t>> pending;  // (journal offset, seq) not yet durable
  class IngestSession* owner = nullptr;
};

class Ingest;

class IngestSession {
 public:
  struct Transport {
    std::function<void(std::string line)> send;  // a reply line, without newline
    std::function<void()> close;                 // close after the replies queued so far
    std::function<void()> resume;                // reading may continue (after a pause)
  };
  enum class FeedResult { ok, paused, closed };

  // secret: non-empty requires "AUTH secret" first. commands: HELLO/AUTH accepted (TCP only).
  IngestSession(Ingest& ingest, Source source, std::size_t max_line_bytes, std::string secret, bool commands,
                Transport transport);
  ~IngestSession();
  IngestSession(const IngestSession&) = delete;
  IngestSession& operator=(const IngestSession&) = delete;

  FeedResult feed(std::string_view bytes);
  void finish();  // end of input: a last line without newline is taken
  const Source& source() const { return source_; }
  bool paused() const { return paused_; }

 private:
  friend class Ingest;
  struct Pending {
    engine::ChannelEngine* channel;
    bool pair;
    std::uint64_t seq;
    protocol::TimeNs time;
    double reference, sensor;
  };
  void handle_line(const protocol::Line& line);
  void handle_record(const protocol::Record& r, const protocol::Line& line);
  void reject(const protocol::Line& line, protocol::RejectReason reason, const std::string& detail,
              std::optional<std::uint64_t> seq);
  void fatal(const std::string& reason, const std::string& detail);
  void send_ack();
  void note_seq(std::uint64_t seq);

  Ingest& ingest_;
  Source source_;
  protocol::LineSplitter splitter_;
  std::string secret_;
  bool commands_;
  Transport transport_;
  InputCounters& counters_;
  bool authenticated_;
  bool records_seen_ = false;
  bool closing_ = false;
  bool paused_ = false;
  Stream* stream_ = nullptr;
  std::unique_ptr<Stream> private_stream_;
  std::uint64_t acked_ = 0;
  protocol::TimeNs arrival_ = 0;
  std::vector<Pending> batch_;
  std::uint64_t batch_max_seq_ = 0;
};

class Ingest {
 public:
  Ingest(engine::Engine& engine, io::JournalWriter& journal, IngestHost& host, Counters& counters,
         const config::Config& cfg);

  void set_config(const config::Config& cfg) { max_future_ns_ = static_cast<std::int64_t>(cfg.time.max_future_s * 1e9); }
  // Journal -> engine for a session's batch. False: the journal is blocked; the session waits.
  bool commit(IngestSession& s);
  void on_durable(std::uint64_t offset);
  // Writes a tick (closes due averaging buckets) through the journal.
  void tick(protocol::TimeNs now);
  Status reset_channel(const std::string& id, protocol::TimeNs now);
  // Retries blocked journal writes (timer while blocked()).
  void retry_blocked();
  bool blocked() const { return !blocked_.empty(); }
  const std::string& blocked_error() const { return blocked_error_; }

  // Restart: checkpoint streams, then every journal entry after it.
  void restore_streams(const std::vector<state::CheckpointStream>& streams);
  void replay(const state::JournalEntry& e);
  std::vector<state::CheckpointStream> checkpoint_streams() const;
  // A new journal segment starts: the encoder forgets its names.
  void start_segment() { encoder_.start_segment(); }

  engine::Engine& engine() { return engine_; }
  IngestHost& host() { return host_; }
  Counters& counters() { return counters_; }
  std::size_t streams() const { return streams_.size(); }

 private:
  friend class IngestSession;
  Stream* claim_stream(const std::string& name, IngestSession* owner, std::string& error);
  void register_session(IngestSession* s) { sessions_.push_back(s); }
  void unregister_session(IngestSession* s);
  bool write_frame(std::string frame, std::function<void()> apply, IngestSession* waiting);

  engine::Engine& engine_;
  io::JournalWriter& journal_;
  IngestHost& host_;
  Counters& counters_;
  std::int64_t max_future_ns_;
  state::JournalEncoder encoder_;
  std::unordered_map<std::string, std::unique_ptr<Stream>> streams_;
  std::vector<IngestSession*> sessions_;
  struct Blocked {
    std::string frame;
    std::function<void()> apply;
    IngestSession* session;
  };
  std::deque<Blocked> blocked_;
  std::string blocked_error_;
  engine::NullSink replay_sink_;
};

}  // namespace rigcal::service
