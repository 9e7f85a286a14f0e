#include "journal_pairs.hpp"

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <map>
#include <regex>
#include <sstream>

#include "rigcal/state/journal_format.hpp"

namespace rigcal::report {

namespace fs = std::filesystem;

void scan_segment(std::string_view bytes, const std::string& name, const JournalSelection& selection,
                  JournalScan& scan) {
  using T = state::JournalEntryType;
  const auto report = state::read_journal_segment(bytes, [&](const state::JournalEntry& e) {
    if (e.channel != selection.channel) return;
    if (e.type == T::pair) {
      if (selection.contains(e.time))
        scan.pairs.push_back({e.time, e.reference_raw, e.sensor_raw, name});
      else
        ++scan.pairs_outside;
    } else if (e.type == T::reset && selection.contains(e.time)) {
      scan.resets.push_back(e.time);
    }
  });
  for (const auto& p : report.problems) scan.problems.push_back(name + ": " + p);
}

namespace {

// Segment number -> path relative to the state directory, for one folder.
Status list_folder(const fs::path& dir, const std::string& prefix, std::map<std::uint64_t, std::string>& out) {
  static const std::regex segment_name(R"(journal-(\d{16})\.rgj)");
  std::error_code ec;
  fs::directory_iterator it(dir, ec);
  if (ec) return Error{dir.string() + ": " + ec.message()};
  for (const auto& entry : it) {
    const std::string file = entry.path().filename().string();
    std::smatch m;
    if (!std::regex_match(file, m, segment_name)) continue;
    out.emplace(std::stoull(m[1].str()), prefix + file);  // the state directory's copy wins (listed first)
  }
  return ok_status();
}

Result<std::string> read_bytes(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) return Error{path.string() + ": " + std::strerror(errno)};
  std::ostringstream s;
  s << in.rdbuf();
  if (in.bad()) return Error{path.string() + ": read error"};
  return s.str();
}

}  // namespace

Result<SegmentList> list_journal_segments(const std::string& state_directory) {
  const fs::path dir(state_directory);
  std::map<std::uint64_t, std::string> segments;
  if (auto s = list_folder(dir, "", segments); !s) return s.error();
  const std::size_t live = segments.size();
  std::error_code ec;
  if (fs::is_directory(dir / "archive", ec))
    if (auto s = list_folder(dir / "archive", "archive/", segments); !s) return s.error();
  if (segments.empty())
    return Error{state_directory + ": no journal segments (journal-NNNNNNNNNNNNNNNN.rgj) here or in archive/"};
  SegmentList list;
  list.archived = segments.size() - live;
  for (auto& [number, name] : segments) list.names.push_back(std::move(name));
  return list;
}

Result<std::string> read_segment(const std::string& state_directory, const std::string& name) {
  return read_bytes(fs::path(state_directory) / name);
}

Result<JournalScan> scan_journal(const std::string& state_directory, const JournalSelection& selection) {
  auto list = list_journal_segments(state_directory);
  if (!list) return list.error();
  JournalScan scan;
  scan.segments = list->names.size();
  scan.archived_segments = list->archived;
  for (const auto& name : list->names) {
    auto bytes = read_segment(state_directory, name);
    if (!bytes) return bytes.error();
    scan_segment(bytes.value(), name, selection, scan);
  }
  return scan;
}

}  // namespace rigcal::report
