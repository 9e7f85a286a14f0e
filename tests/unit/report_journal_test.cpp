// A report's pairs from rigcald's journal: the channel and period chosen, resets honoured, damage
// reported, and raw values linearised as the daemon does it.
#include <catch2/catch.hpp>

#include "report/journal_pairs.hpp"
#include "report/report_inputs.hpp"
#include "rigcal/metrology/linearisation.hpp"
#include "rigcal/state/journal_format.hpp"

using namespace rigcal::report;
using rigcal::protocol::TimeNs;
using rigcal::state::JournalEncoder;

namespace {

constexpr TimeNs s = 1'000'000'000;
constexpr TimeNs t0 = 1772431200 * s;  // 2026-03-02T06:00:00Z

std::string segment_with(const std::function<void(JournalEncoder&)>& fill) {
  JournalEncoder e;
  e.start_segment();
  fill(e);
  std::string bytes;
  e.finish_frame(bytes);
  return bytes;
}

}  // namespace

TEST_CASE("a journal scan keeps the channel's pairs inside the period, in order") {
  const std::string bytes = segment_with([](JournalEncoder& e) {
    for (int i = 0; i < 10; ++i) {
      e.pair("TT-101", "", 0, t0 + i * 60 * s, 20.0 + i, 20.1 + i);
      e.pair("PT-204", "", 0, t0 + i * 60 * s, 1.0, 1.01);
      e.reading("TT-101", "", 0, t0 + i * 60 * s + 30 * s, 25.0);
    }
  });
  JournalSelection sel;
  sel.channel = "TT-101";
  sel.since = t0 + 2 * 60 * s;  // inclusive
  sel.until = t0 + 7 * 60 * s;  // exclusive
  JournalScan scan;
  scan_segment(bytes, "journal-0000000000000001.rgj", sel, scan);
  REQUIRE(scan.pairs.size() == 5);
  CHECK(scan.pairs.front().time == t0 + 2 * 60 * s);
  CHECK(scan.pairs.back().reference_raw == 26.0);
  CHECK(scan.pairs_outside == 5);
  CHECK(scan.problems.empty());
}

TEST_CASE("a damaged segment is reported and its good frames still read") {
  JournalEncoder e;
  e.start_segment();
  std::string bytes;
  e.pair("TT-101", "", 0, t0, 20.0, 20.1);
  e.finish_frame(bytes);
  bytes += std::string(17, 'Z');  // not a frame
  e.pair("TT-101", "", 0, t0 + s, 21.0, 21.1);
  e.finish_frame(bytes);
  bytes.resize(bytes.size() - 3);  // torn tail
  JournalScan scan;
  scan_segment(bytes, "journal-0000000000000002.rgj", JournalSelection{"TT-101", {}, {}}, scan);
  CHECK(scan.pairs.size() == 1);
  REQUIRE(scan.problems.size() == 2);
  CHECK(scan.problems[0].rfind("journal-0000000000000002.rgj: at byte ", 0) == 0);
  CHECK(scan.problems[1].find("torn") != std::string::npos);
}

TEST_CASE("a period that straddles an operator reset is refused, one on either side is reported") {
  JournalScan scan;
  scan.pairs = {{t0, 20, 20.1, "j"}, {t0 + 60 * s, 21, 21.1, "j"}, {t0 + 120 * s, 22, 22.1, "j"}};
  rigcal::config::ChannelConfig c;
  c.id = "TT-101";
  scan.resets = {t0 + 90 * s};
  const auto mixed = data_from_journal(scan, c);
  REQUIRE_FALSE(mixed.ok());
  CHECK(mixed.error().message.find("--until 2026-03-02T06:01:30.000Z") != std::string::npos);
  scan.resets = {t0 + 300 * s};
  const auto before = data_from_journal(scan, c);
  REQUIRE(before.ok());
  CHECK(before->x.size() == 3);
  const auto notes = journal_notes(scan, c);
  CHECK(std::any_of(notes.begin(), notes.end(),
                    [](const std::string& n) { return n.find("operator reset") != std::string::npos; }));
}

TEST_CASE("raw journal values are linearised as rigcald does, out-of-range signals left out") {
  rigcal::config::ChannelConfig c;
  c.id = "TT-101";
  c.sensor.linearisation = rigcal::metrology::Linearisation::rtd(100.0);
  JournalScan scan;
  scan.pairs = {{t0, 50.0, 119.397, "j"}, {t0 + s, 100.0, 138.506, "j"}, {t0 + 2 * s, 0.0, -5.0, "j"}};
  const auto d = data_from_journal(scan, c);
  REQUIRE(d.ok());
  REQUIRE(d->y.size() == 2);
  CHECK(d->x == std::vector<double>{50.0, 100.0});
  CHECK(d->y[0] == rigcal::metrology::linearise(c.sensor.linearisation, 119.397).value());
  CHECK(d->y[1] == rigcal::metrology::linearise(c.sensor.linearisation, 138.506).value());
  CHECK_THAT(d->y[1], Catch::Matchers::WithinAbs(100.0, 0.01));
  CHECK(d->time_s == std::vector<double>{1772431200.0, 1772431201.0});
  REQUIRE(d->source_notes.size() == 1);
  CHECK(d->source_notes[0].find("1 pair(s) were left out") != std::string::npos);
}
