#include "rigcal/protocol/server_reply.hpp"

#include <charconv>
#include <vector>

namespace rigcal::protocol {

namespace {

bool blank(char c) { return c == ' ' || c == '\t'; }

// Up to `n` leading words of the line, and what follows them (without surrounding blanks): the free
// text DETAIL of REJ and ERR.
struct Head {
  std::vector<std::string_view> words;
  std::string_view rest;
};

Head split_head(std::string_view line, std::size_t n) {
  Head h;
  std::size_t pos = 0;
  while (h.words.size() < n) {
    while (pos < line.size() && blank(line[pos])) ++pos;
    if (pos >= line.size()) break;
    const std::size_t start = pos;
    while (pos < line.size() && !blank(line[pos])) ++pos;
    h.words.push_back(line.substr(start, pos - start));
  }
  while (pos < line.size() && blank(line[pos])) ++pos;
  h.rest = line.substr(pos);
  while (!h.rest.empty() && blank(h.rest.back())) h.rest.remove_suffix(1);
  return h;
}

bool parse_seq(std::string_view s, std::uint64_t& out) {
  const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), out);
  return !s.empty() && ec == std::errc{} && end == s.data() + s.size();
}

std::string quoted(std::string_view s) {
  std::string out = "\"";
  out.append(s.substr(0, 60));
  out.append(s.size() > 60 ? "...\"" : "\"");
  return out;
}

}  // namespace

Result<ServerReply> parse_server_reply(std::string_view line) {
  const Head first = split_head(line, 1);
  const std::string_view word = first.words.empty() ? std::string_view() : first.words[0];
  ServerReply r;
  if (word == "OK") {
    const Head h = split_head(line, 4);
    if (h.words.size() != 4 || h.words[1] != "HELLO" || !h.rest.empty())
      return Error{"expected 'OK HELLO STREAM LAST', got " + quoted(line)};
    r.kind = ServerReply::Kind::hello_ok;
    r.stream = std::string(h.words[2]);
    if (!parse_seq(h.words[3], r.seq)) return Error{"OK HELLO: LAST " + quoted(h.words[3]) + " is not a number"};
    return r;
  }
  if (word == "ACK") {
    const Head h = split_head(line, 2);
    if (h.words.size() != 2 || !h.rest.empty()) return Error{"expected 'ACK N', got " + quoted(line)};
    r.kind = ServerReply::Kind::ack;
    if (!parse_seq(h.words[1], r.seq)) return Error{"ACK: " + quoted(h.words[1]) + " is not a sequence number"};
    return r;
  }
  if (word == "REJ") {
    const Head h = split_head(line, 3);
    if (h.words.size() != 3) return Error{"expected 'REJ N REASON DETAIL...', got " + quoted(line)};
    r.kind = ServerReply::Kind::reject;
    if (!parse_seq(h.words[1], r.seq)) return Error{"REJ: " + quoted(h.words[1]) + " is not a sequence number"};
    r.reason = std::string(h.words[2]);
    r.detail = std::string(h.rest);
    return r;
  }
  if (word == "ERR") {
    const Head h = split_head(line, 2);
    if (h.words.size() != 2) return Error{"expected 'ERR REASON DETAIL...', got " + quoted(line)};
    r.kind = ServerReply::Kind::error;
    r.reason = std::string(h.words[1]);
    r.detail = std::string(h.rest);
    return r;
  }
  if (word.empty()) return Error{"empty reply line"};
  return Error{"unknown reply " + quoted(line) + " (expected OK HELLO, ACK, REJ or ERR)"};
}

}  // namespace rigcal::protocol
