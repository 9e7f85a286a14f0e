#pragma once
// An append-only text file (reject file, alert file, historian CSV) with a write buffer, created
// with mode 0640. Writes are buffered and flushed when the buffer passes 64 KiB, on flush() (every
// tick) and at close. A write error is counted and reported once until writing works again; the
// lines of a failed write are dropped (these files hold derived or diagnostic data; the journal
// holds the raw records).
#include <cstdint>
#include <string>
#include <string_view>

#include "rigcal/result.hpp"

namespace rigcal::io {

class AppendFile {
 public:
  AppendFile() = default;
  explicit AppendFile(std::string path) : path_(std::move(path)) {}
  ~AppendFile();
  AppendFile(AppendFile&& o) noexcept;
  AppendFile& operator=(AppendFile&& o) noexcept;

  Status open();
  bool is_open() const { return fd_ >= 0; }
  // Appends `text` (the caller includes the newline). Returns false if a flush failed.
  bool append(std::string_view text);
  bool flush();
  void close();
  // True if the file did not exist or was empty when opened (write a CSV header).
  bool was_empty() const { return was_empty_; }

  const std::string& path() const { return path_; }
  std::uint64_t errors() const { return errors_; }
  const std::string& last_error() const { return last_error_; }

 private:
  std::string path_;
  int fd_ = -1;
  std::string buffer_;
  bool was_empty_ = false;
  std::uint64_t errors_ = 0;
  std::string last_error_;
};

}  // namespace rigcal::io
