// The sending side of the TCP session, driven with strings: HELLO and LAST, coalesced ACKs, REJ,
// lost connections and resends, resuming, and the server lines it must refuse.
#include <catch2/catch.hpp>
#include <string>

#include "rigcal/protocol/sender_session.hpp"

using namespace rigcal::protocol;
using Kind = SessionEvent::Kind;

namespace {

void add_records(SenderSession& s, std::uint64_t from, std::uint64_t to) {
  for (std::uint64_t seq = from; seq <= to; ++seq)
    s.add(seq, "P TT-101 - " + std::to_string(seq) + " " + std::to_string(seq), seq + 10);
}

std::string written(SenderSession& s, std::size_t max_bytes = 1 << 20) {
  std::string out;
  s.take_unsent(out, max_bytes);
  return out;
}

}  // namespace

TEST_CASE("a connection opens with AUTH and HELLO and writes nothing before OK HELLO") {
  SenderSession s("rig-pc:demo.txt", std::string("s3cret"));
  add_records(s, 1, 2);
  CHECK(s.open() == "AUTH s3cret\nHELLO rig-pc:demo.txt\n");
  CHECK_FALSE(s.has_unsent());
  CHECK(written(s).empty());
  const auto ev = s.on_server_line("OK HELLO rig-pc:demo.txt 0");
  CHECK(ev.kind == Kind::ready);
  CHECK(written(s) == "@1 P TT-101 - 1 1\n@2 P TT-101 - 2 2\n");
  CHECK(SenderSession("x", std::nullopt).open() == "HELLO x\n");
}

TEST_CASE("a coalesced ACK settles every record up to it") {
  SenderSession s("st", std::nullopt);
  s.open();
  s.on_server_line("OK HELLO st 0");
  add_records(s, 1, 10);
  written(s);
  auto ev = s.on_server_line("ACK 7");
  CHECK(ev.kind == Kind::progress);
  CHECK(ev.settled == 7);
  CHECK(s.outstanding() == 3);
  CHECK(s.on_server_line("ACK 7").kind == Kind::ignored);
  CHECK(s.on_server_line("ACK 5").kind == Kind::ignored);
  s.on_server_line("ACK 10");
  CHECK(s.outstanding() == 0);
  CHECK(s.counts().sent == 10);
  CHECK(s.counts().acknowledged == 10);
  CHECK(s.counts().resent == 0);
}

TEST_CASE("REJ marks a record rejected once; the ACK covering it does not count it acknowledged") {
  SenderSession s("st", std::nullopt);
  s.open();
  s.on_server_line("OK HELLO st 0");
  add_records(s, 1, 3);
  written(s);
  const auto ev = s.on_server_line("REJ 2 unknown_channel channel \"TT-9\" is not configured");
  CHECK(ev.kind == Kind::rejected);
  CHECK(ev.seq == 2);
  CHECK(ev.origin == 12);
  CHECK(ev.reason == "unknown_channel");
  CHECK(ev.detail == "channel \"TT-9\" is not configured");
  CHECK(s.on_server_line("REJ 2 unknown_channel again").kind == Kind::ignored);
  CHECK(s.on_server_line("REJ 99 outlier not ours").kind == Kind::ignored);
  s.on_server_line("ACK 3");
  CHECK(s.counts().acknowledged == 2);
  CHECK(s.counts().rejected == 1);
}

TEST_CASE("after a lost connection the unacknowledged records go again, minus what the server holds") {
  SenderSession s("st", std::nullopt);
  s.open();
  s.on_server_line("OK HELLO st 0");
  add_records(s, 1, 6);
  CHECK(written(s).size() > 0);
  s.on_server_line("ACK 2");
  s.lost();
  CHECK_FALSE(s.has_unsent());
  s.open();
  // The server had journaled 3 and 4 before the connection broke, without acknowledging them.
  const auto ev = s.on_server_line("OK HELLO st 4");
  CHECK(ev.kind == Kind::ready);
  CHECK(ev.settled == 2);
  CHECK(written(s) == "@5 P TT-101 - 5 5\n@6 P TT-101 - 6 6\n");
  s.on_server_line("ACK 6");
  const auto& c = s.counts();
  CHECK(c.sent == 6);
  CHECK(c.resent == 2);
  CHECK(c.acknowledged == 6);  // 3 and 4 are the server's, written by this run: acknowledged
  CHECK(c.already_held == 0);
}

TEST_CASE("resuming: records the server held before this run are skipped, not sent") {
  SenderSession s("st", std::nullopt);
  s.open();
  CHECK(s.on_server_line("OK HELLO st 40").kind == Kind::ready);
  CHECK(s.held_through() == 40);
  std::uint64_t skipped = 0;
  for (std::uint64_t seq = 1; seq <= 50; ++seq) {
    if (s.skip_if_held(seq)) {
      ++skipped;
      continue;
    }
    s.add(seq, "R PT-204 - 1.0", seq);
  }
  CHECK(skipped == 40);
  CHECK(written(s).rfind("@41 R PT-204 - 1.0\n", 0) == 0);
  s.on_server_line("ACK 50");
  CHECK(s.counts().sent == 10);
  CHECK(s.counts().already_held == 40);
  CHECK(s.counts().acknowledged == 10);
}

TEST_CASE("take_unsent stops at the byte budget but always makes progress") {
  SenderSession s("st", std::nullopt);
  s.open();
  s.on_server_line("OK HELLO st 0");
  add_records(s, 1, 100);
  std::string out;
  CHECK(s.take_unsent(out, 1) == 1);
  out.clear();
  CHECK(s.take_unsent(out, 40) == 3);  // 18-byte lines: the third one crosses 40 bytes
  CHECK(s.has_unsent());
}

TEST_CASE("server lines that make no sense are protocol errors; ERR is fatal") {
  SenderSession s("st", std::nullopt);
  CHECK(s.on_server_line("OK HELLO st 0").kind == Kind::protocol_error);  // no HELLO was sent
  s.open();
  auto ev = s.on_server_line("OK HELLO other 0");
  CHECK(ev.kind == Kind::protocol_error);
  CHECK(ev.detail == "OK HELLO names stream 'other', not 'st'");
  CHECK(s.on_server_line("ACK twelve").kind == Kind::protocol_error);
  CHECK(s.on_server_line("HELLO st").detail ==
        "unknown reply \"HELLO st\" (expected OK HELLO, ACK, REJ or ERR)");
  ev = s.on_server_line("ERR stream_busy another connection is sending stream st");
  CHECK(ev.kind == Kind::fatal);
  CHECK(ev.reason == "stream_busy");
  CHECK(ev.detail == "another connection is sending stream st");
}

TEST_CASE("a HELLO reply below what was acknowledged is reported as a regression") {
  SenderSession s("st", std::nullopt);
  s.open();
  s.on_server_line("OK HELLO st 0");
  add_records(s, 1, 5);
  written(s);
  s.on_server_line("ACK 5");
  s.lost();
  s.open();
  const auto ev = s.on_server_line("OK HELLO st 3");
  CHECK(ev.kind == Kind::regressed);
  CHECK(ev.detail == "the server holds stream 'st' only through 3 but had acknowledged it through 5");
}

TEST_CASE("abandon counts what is still outstanding, except records already rejected") {
  SenderSession s("st", std::nullopt);
  s.open();
  s.on_server_line("OK HELLO st 0");
  add_records(s, 1, 4);
  written(s);
  s.on_server_line("REJ 4 bad_number sensor: \"x\" is not a decimal number");
  s.abandon();
  CHECK(s.counts().abandoned == 3);
  CHECK(s.counts().rejected == 1);
  CHECK(s.outstanding() == 0);
}

TEST_CASE("server replies decode with their free-text detail") {
  auto r = parse_server_reply("REJ 17 clock_future  time is 400 s ahead ");
  REQUIRE(r.ok());
  CHECK(r->seq == 17);
  CHECK(r->reason == "clock_future");
  CHECK(r->detail == "time is 400 s ahead");
  r = parse_server_reply("ERR connection_limit");
  REQUIRE(r.ok());
  CHECK(r->detail.empty());
  CHECK_FALSE(parse_server_reply("OK HELLO st").ok());
  CHECK_FALSE(parse_server_reply("ACK 3 4").ok());
  CHECK_FALSE(parse_server_reply("REJ 3").ok());
  CHECK_FALSE(parse_server_reply("").ok());
}
