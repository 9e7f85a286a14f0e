#pragma once
// The sending side of a TCP session of the line protocol, as a state machine without sockets: the
// transport (rigcal send's TcpDelivery) hands it connection events and the server's lines, and
// writes what it gives back. So every rule of the session is testable with strings:
//
//   - each connection opens with AUTH (when a secret is set) and HELLO STREAM; no record is written
//     before the server's OK HELLO STREAM LAST;
//   - records the server already holds (seq <= LAST) are dropped, not written: those written before
//     count as acknowledged (the server has them), those never written as already held (a resumed
//     run); everything else outstanding is (re)written in order, so nothing is lost;
//   - ACK N settles every outstanding record with seq <= N: acknowledged, or rejected if a REJ named
//     it; REJ N marks one outstanding record rejected (counted once, however often it is repeated);
//   - a lost connection makes every outstanding record unsent again; it is written on the next
//     connection unless that HELLO reply says the server already has it. The server drops
//     duplicates by sequence number, so resending can never duplicate a record.
//
// Thread affinity: none; one thread uses it at a time (rigcal's delivery runs one io_context).
#include <cstddef>
#include <cstdint>
#include <deque>
#include <optional>
#include <string>
#include <string_view>

#include "rigcal/protocol/server_reply.hpp"

namespace rigcal::protocol {

struct SenderCounts {
  std::uint64_t sent = 0;          // distinct records written at least once
  std::uint64_t resent = 0;        // writes of a record written before (after a reconnect)
  std::uint64_t acknowledged = 0;  // settled: durably held by the server
  std::uint64_t rejected = 0;      // settled or named by a REJ: refused by the server
  std::uint64_t already_held = 0;  // dropped unwritten because the server held them (LAST)
  std::uint64_t abandoned = 0;     // given up on, outstanding at the end (see abandon())
};

// What a server line meant for the transport.
struct SessionEvent {
  enum class Kind {
    ready,           // OK HELLO: records may be written now
    progress,        // ACK: `settled` records were settled
    rejected,        // REJ for an outstanding record (first time): seq, origin, reason, detail
    fatal,           // ERR: the server closes the connection; reason, detail
    protocol_error,  // not a valid reply, or one that makes no sense now; detail says why
    ignored,         // valid but nothing to do (a repeated REJ, an ACK below an earlier one)
    regressed,       // OK HELLO with LAST below what was acknowledged before: the server lost
                     // records it had acknowledged, which can no longer be resent (seq: LAST)
  };
  Kind kind = Kind::ignored;
  std::uint64_t seq = 0;
  std::uint64_t origin = 0;  // rejected: the origin given to add() (a line number, for messages)
  std::uint64_t settled = 0;
  std::string reason, detail;
};

class SenderSession {
 public:
  // REQUIRES: stream is a valid stream name; secret, when set, is one word without blanks.
  SenderSession(std::string stream, std::optional<std::string> secret);

  // --- connection ---
  // A new connection: returns its opening lines (each ending in '\n'). Not ready until OK HELLO.
  std::string open();
  // The connection is gone: records written on it and not settled become unsent.
  void lost();
  bool ready() const { return ready_; }

  // --- records ---
  // Queues a record. `text` is the record without sequence number or line end; `origin` is carried
  // for messages (rigcal send uses the line number). REQUIRES: seq > every seq added before.
  void add(std::uint64_t seq, std::string text, std::uint64_t origin);
  // Records added and not yet settled (acknowledged, rejected, already held).
  std::size_t outstanding() const { return pending_.size(); }
  bool has_unsent() const { return ready_ && unsent_ < pending_.size(); }
  // Appends "@SEQ TEXT\n" lines of unsent records to `out`, in order, until `out` reaches
  // max_bytes (at least one line is appended when any is unsent). Returns the number appended.
  // REQUIRES: ready().
  std::size_t take_unsent(std::string& out, std::size_t max_bytes);
  // Records with seq <= held_through() are held by the server (LAST of the latest HELLO reply), so a
  // source can skip them instead of adding them. Returns true, and counts the record as already
  // held, when seq is one of them.
  std::uint64_t held_through() const { return held_through_; }
  bool skip_if_held(std::uint64_t seq);
  // Highest seq settled by an ACK or a HELLO reply.
  std::uint64_t settled_through() const { return settled_through_; }

  // --- server -> client ---
  SessionEvent on_server_line(std::string_view line);

  // Counts every outstanding record as abandoned and forgets it (the run ends without them).
  void abandon();
  const SenderCounts& counts() const { return counts_; }
  const std::string& stream() const { return stream_; }

 private:
  struct Entry {
    std::uint64_t seq;
    std::uint64_t origin;
    std::string text;
    bool written = false;   // on any connection of this run
    bool rejected = false;  // a REJ named it
  };

  SessionEvent on_hello(const ServerReply& r);
  SessionEvent on_ack(std::uint64_t n);
  SessionEvent on_reject(const ServerReply& r);
  // Settles the front records with seq <= n; returns how many.
  std::uint64_t settle_through(std::uint64_t n);

  std::string stream_;
  std::optional<std::string> secret_;
  std::deque<Entry> pending_;  // seq increasing
  std::size_t unsent_ = 0;     // index of the first entry not written on this connection
  bool ready_ = false;
  bool connected_ = false;
  std::uint64_t held_through_ = 0, settled_through_ = 0;
  SenderCounts counts_;
};

}  // namespace rigcal::protocol
