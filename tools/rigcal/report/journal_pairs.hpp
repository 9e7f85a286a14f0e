#pragma once
// One channel's calibration pairs from rigcald's journal, for a report: the raw values as the daemon
// received them, in journal order, with the operator resets (as-left) and any damage found.
//
// Segments are STATE_DIR/journal-NNNNNNNNNNNNNNNN.rgj and, when the daemon archives retired segments,
// STATE_DIR/archive/journal-*.rgj. Both are read, in ascending segment number (a number present in
// both places is read once, from the state directory). Reading never modifies the journal: a torn
// tail is reported, not truncated (the daemon does that on its next start).
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/result.hpp"

namespace rigcal::report {

struct JournalSelection {
  std::string channel;
  std::optional<protocol::TimeNs> since;  // inclusive
  std::optional<protocol::TimeNs> until;  // exclusive
  bool contains(protocol::TimeNs t) const { return (!since || t >= *since) && (!until || t < *until); }
};

struct JournalPair {
  protocol::TimeNs time = 0;
  double reference_raw = 0, sensor_raw = 0;
  std::string segment;  // file name, e.g. "archive/journal-0000000000000003.rgj"
};

struct JournalScan {
  std::vector<JournalPair> pairs;         // the channel's pairs inside the selection
  std::vector<protocol::TimeNs> resets;   // the channel's resets inside the selection
  std::uint64_t pairs_outside = 0;        // the channel's pairs outside the selection
  std::size_t segments = 0, archived_segments = 0;
  std::vector<std::string> problems;      // "journal-...rgj: at byte N: ...", one per damage found
};

// Adds what one segment holds for the selection to `scan` (pure: bytes in). `name` prefixes problems.
void scan_segment(std::string_view bytes, const std::string& name, const JournalSelection& selection,
                  JournalScan& scan);

// The segments of a state directory in reading order, as paths relative to it (see above), and how
// many of them are archived. Error: the directory cannot be read, or holds no segment.
struct SegmentList {
  std::vector<std::string> names;
  std::size_t archived = 0;
};
Result<SegmentList> list_journal_segments(const std::string& state_directory);
Result<std::string> read_segment(const std::string& state_directory, const std::string& name);

// Reads every segment of the state directory (see above). Error: the directory cannot be read, or
// holds no journal segment, or a segment cannot be read (each message names the path).
Result<JournalScan> scan_journal(const std::string& state_directory, const JournalSelection& selection);

}  // namespace rigcal::report
