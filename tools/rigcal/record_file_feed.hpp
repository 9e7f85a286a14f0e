#pragma once
// The records of a record file, for rigcal send: every line but blank lines and comments, verbatim,
// numbered 1, 2, 3, ... in file order (that number becomes its @SEQ, so a second run over the same
// file and stream resumes where the daemon's LAST says). The file is checked in full before the
// first record goes out, and then read a line at a time.
#include <fstream>
#include <memory>
#include <string>

#include "record_feed.hpp"

namespace rigcal::tool {

class RecordFileFeed final : public RecordFeed {
 public:
  struct OpenError {
    std::string message;  // names the file (and line)
    bool unreadable;      // true: the file cannot be read; false: a line cannot be sent
  };

  // Opens and checks `path`. A line is refused when it carries its own @SEQ (send numbers records
  // itself) or is a session line (HELLO, AUTH).
  static std::unique_ptr<RecordFileFeed> open(const std::string& path, OpenError& error);

  Result<std::optional<FeedItem>> next() override;
  std::optional<std::uint64_t> expected_total() const override { return total_; }
  std::string where(std::uint64_t origin) const override { return path_ + ":" + std::to_string(origin); }

 private:
  RecordFileFeed(std::string path, std::uint64_t total);

  std::string path_;
  std::uint64_t total_;
  std::ifstream in_;
  std::uint64_t line_number_ = 0, seq_ = 0;
};

}  // namespace rigcal::tool
