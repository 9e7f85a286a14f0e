#include "record_file_feed.hpp"

#include <cerrno>
#include <cstring>
#include <string_view>

namespace rigcal::tool {

namespace {

enum class LineClass { skip, record };

// Blank lines and comments are skipped; anything else is a record or a refusal (in `problem`).
LineClass classify(std::string_view line, std::string& problem) {
  const auto start = line.find_first_not_of(" \t");
  if (start == std::string_view::npos || line[start] == '#') return LineClass::skip;
  const std::string_view rest = line.substr(start);
  const std::string_view word = rest.substr(0, rest.find_first_of(" \t"));
  if (word.front() == '@')
    problem = "the record already carries a sequence number (" + std::string(word) +
              "); rigcal send numbers the records of a file itself";
  else if (word == "HELLO" || word == "AUTH")
    problem = std::string(word) + " is a session line, which rigcal send writes itself; it does not belong in a "
              "record file";
  return LineClass::record;
}

void strip_cr(std::string& line) {
  if (!line.empty() && line.back() == '\r') line.pop_back();
}

}  // namespace

RecordFileFeed::RecordFileFeed(std::string path, std::uint64_t total) : path_(std::move(path)), total_(total) {}

std::unique_ptr<RecordFileFeed> RecordFileFeed::open(const std::string& path, OpenError& error) {
  std::ifstream check(path, std::ios::binary);
  if (!check) {
    error = {path + ": " + std::strerror(errno), true};
    return nullptr;
  }
  std::string line, problem;
  std::uint64_t number = 0, records = 0;
  while (std::getline(check, line)) {
    ++number;
    strip_cr(line);
    if (classify(line, problem) == LineClass::skip) continue;
    if (!problem.empty()) {
      error = {path + ":" + std::to_string(number) + ": " + problem, false};
      return nullptr;
    }
    ++records;
  }
  if (check.bad()) {
    error = {path + ": read error", true};
    return nullptr;
  }
  std::unique_ptr<RecordFileFeed> feed(new RecordFileFeed(path, records));
  feed->in_.open(path, std::ios::binary);
  if (!feed->in_) {
    error = {path + ": " + std::strerror(errno), true};
    return nullptr;
  }
  return feed;
}

Result<std::optional<FeedItem>> RecordFileFeed::next() {
  std::string line, problem;
  while (std::getline(in_, line)) {
    ++line_number_;
    strip_cr(line);
    if (classify(line, problem) == LineClass::skip) continue;
    if (!problem.empty()) return Error{where(line_number_) + ": " + problem};  // the file changed meanwhile
    FeedItem item;
    item.seq = ++seq_;
    item.text = std::move(line);
    item.origin = line_number_;
    return std::optional<FeedItem>(std::move(item));
  }
  if (in_.bad()) return Error{path_ + ": read error"};
  return std::optional<FeedItem>();
}

}  // namespace rigcal::tool
