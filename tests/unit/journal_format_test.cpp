// Journal frames: entries come back in order with their names; torn tails and corrupt frames are
// detected, skipped, and never crash the reader.
#include <catch2/catch.hpp>
#include <random>
#include <string>
#include <vector>

#include "rigcal/state/checkpoint_format.hpp"
#include "rigcal/state/journal_format.hpp"

using namespace rigcal::state;

namespace {
struct Seen {
  JournalEntryType type;
  std::string channel, stream;
  std::uint64_t seq;
  std::int64_t time;
  double x, y;
};
std::vector<Seen> read_all(const std::string& bytes, JournalReadReport* report = nullptr) {
  std::vector<Seen> out;
  auto rep = read_journal_segment(bytes, [&](const JournalEntry& e) {
    out.push_back({e.type, std::string(e.channel), std::string(e.stream), e.seq, e.time, e.reference_raw, e.sensor_raw});
  });
  if (report) *report = rep;
  return out;
}
std::string sample_segment(int frames) {
  JournalEncoder enc;
  enc.start_segment();
  std::string out;
  for (int f = 0; f < frames; ++f) {
    for (int i = 0; i < 10; ++i) {
      const auto n = static_cast<std::uint64_t>(f * 10 + i + 1);
      enc.pair(i % 2 ? "TT-101" : "PT-204", "rig-a", n, static_cast<std::int64_t>(n) * 1000, 20.0 + i, 20.1 + i);
    }
    enc.reading("TT-101", "", 0, 5, 80.25);
    enc.tick(99);
    enc.finish_frame(out);
  }
  return out;
}
}  // namespace

TEST_CASE("journal entries come back in order with channel and stream names") {
  const std::string bytes = sample_segment(3);
  JournalReadReport rep;
  const auto seen = read_all(bytes, &rep);
  CHECK(rep.frames == 3);
  CHECK(rep.corrupt_frames == 0);
  CHECK_FALSE(rep.torn_tail);
  CHECK(rep.valid_bytes == bytes.size());
  REQUIRE(seen.size() == 36);
  CHECK(seen[0].type == JournalEntryType::pair);
  CHECK(seen[0].channel == "PT-204");
  CHECK(seen[1].channel == "TT-101");
  CHECK(seen[1].stream == "rig-a");
  CHECK(seen[1].seq == 2);
  CHECK(seen[1].x == 21.0);
  CHECK(seen[10].type == JournalEntryType::reading);
  CHECK(seen[10].stream.empty());
  CHECK(seen[11].type == JournalEntryType::tick);
  CHECK(seen[35].type == JournalEntryType::tick);
}

TEST_CASE("a torn final frame is reported and the frames before it are kept") {
  const std::string bytes = sample_segment(3);
  for (std::size_t cut : {bytes.size() - 1, bytes.size() - 20, bytes.size() - 200}) {
    JournalReadReport rep;
    const auto seen = read_all(bytes.substr(0, cut), &rep);
    INFO("cut at " << cut);
    CHECK(rep.torn_tail);
    CHECK(seen.size() == 24);
    CHECK(rep.valid_bytes == sample_segment(2).size());  // the first frame also carries the names
  }
}

TEST_CASE("a corrupted frame in the middle is skipped and reading resumes at the next frame") {
  std::string bytes = sample_segment(3);
  bytes[bytes.size() / 2] = static_cast<char>(bytes[bytes.size() / 2] ^ 0x40);  // inside frame 2
  JournalReadReport rep;
  const auto seen = read_all(bytes, &rep);
  CHECK(rep.corrupt_frames >= 1);
  CHECK(seen.size() == 24);  // frames 1 and 3
  CHECK(seen.back().type == JournalEntryType::tick);
  REQUIRE_FALSE(rep.problems.empty());
}

TEST_CASE("names defined in a frame that fails its checksum are not used by later frames") {
  JournalEncoder enc;
  enc.start_segment();
  std::string bytes;
  enc.pair("A", "", 0, 1, 1, 1);
  enc.finish_frame(bytes);
  const std::size_t second = bytes.size();
  enc.pair("B", "", 0, 2, 2, 2);  // defines B
  enc.finish_frame(bytes);
  enc.pair("B", "", 0, 3, 3, 3);  // uses B
  enc.finish_frame(bytes);
  bytes[second + 20] = static_cast<char>(bytes[second + 20] ^ 1);  // corrupt the frame defining B
  JournalReadReport rep;
  const auto seen = read_all(bytes, &rep);
  REQUIRE(seen.size() == 1);  // the third frame names an unknown id and is refused too
  CHECK(seen[0].channel == "A");
  CHECK(rep.corrupt_frames == 2);
}

TEST_CASE("an abandoned frame forgets the names it defined") {
  JournalEncoder enc;
  enc.start_segment();
  enc.pair("A", "s", 1, 1, 1, 1);
  enc.abandon_frame();
  std::string bytes;
  enc.pair("A", "s", 1, 1, 1, 1);
  enc.finish_frame(bytes);
  const auto seen = read_all(bytes);
  REQUIRE(seen.size() == 1);
  CHECK(seen[0].channel == "A");
  CHECK(seen[0].stream == "s");
}

TEST_CASE("random bytes never crash the journal reader") {
  std::mt19937 rng(5);
  const std::string good = sample_segment(4);
  for (int trial = 0; trial < 2000; ++trial) {
    std::string bytes = good;
    const int flips = 1 + trial % 8;
    for (int f = 0; f < flips; ++f) bytes[rng() % bytes.size()] = static_cast<char>(rng());
    if (trial % 3 == 0) bytes.resize(rng() % bytes.size());
    const auto seen = read_all(bytes);
    CHECK(seen.size() <= 48);
  }
}

TEST_CASE("checkpoints round-trip and any corruption is refused") {
  Checkpoint c;
  c.number = 7;
  c.first_segment = 12;
  c.written = 1764576000'000000000;
  c.streams = {{"rig-a", 1042}, {"rig-b", 3}};
  c.channels = {{"TT-101", 0xABCDEF, std::string("\x01\x02\x03", 3)}, {"PT-204", 42, ""}};
  const std::string bytes = encode_checkpoint(c);
  const auto back = decode_checkpoint(bytes);
  REQUIRE(back.ok());
  CHECK(back->number == 7);
  CHECK(back->first_segment == 12);
  CHECK(back->streams.at(0).name == "rig-a");
  CHECK(back->streams.at(0).high_water == 1042);
  CHECK(back->channels.at(0).blob == std::string("\x01\x02\x03", 3));
  for (std::size_t i = 0; i < bytes.size(); ++i) {
    std::string bad = bytes;
    bad[i] = static_cast<char>(bad[i] ^ 0x08);
    CHECK_FALSE(decode_checkpoint(bad).ok());
  }
  CHECK_FALSE(decode_checkpoint(bytes.substr(0, bytes.size() - 1)).ok());
  CHECK_THAT(decode_checkpoint(bytes.substr(0, 10)).error().message, Catch::Contains("too short"));
}
