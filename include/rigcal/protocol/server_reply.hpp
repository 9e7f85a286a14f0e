#pragma once
// The lines a rigcald TCP listener sends back to a sender (server -> client):
//   OK HELLO STREAM LAST     reply to HELLO: records of STREAM up to sequence LAST are durably held
//   ACK N                    every record of this connection's stream with seq <= N is journaled or
//                            was rejected (coalesced: not one per record)
//   REJ N REASON DETAIL...   the record with seq N was rejected; REASON is a stable snake_case name
//   ERR REASON DETAIL...     fatal for the connection; the server closes it
// Decoding only: no sockets here.
#include <cstdint>
#include <string>
#include <string_view>

#include "rigcal/result.hpp"

namespace rigcal::protocol {

struct ServerReply {
  enum class Kind { hello_ok, ack, reject, error };
  Kind kind = Kind::ack;
  std::string stream;      // hello_ok
  std::uint64_t seq = 0;   // hello_ok: LAST (0: nothing held); ack: N; reject: N
  std::string reason;      // reject, error
  std::string detail;      // reject, error: the rest of the line, may be empty
};

// Error (with what was wrong) for anything else: unknown words, missing or malformed numbers.
Result<ServerReply> parse_server_reply(std::string_view line);

}  // namespace rigcal::protocol
