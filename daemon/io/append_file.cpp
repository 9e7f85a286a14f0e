#include "append_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <spdlog/spdlog.h>

#include "os_error.hpp"

namespace rigcal::io {

AppendFile::~AppendFile() { close(); }

AppendFile::AppendFile(AppendFile&& o) noexcept
    : path_(std::move(o.path_)), fd_(o.fd_), buffer_(std::move(o.buffer_)), was_empty_(o.was_empty_), errors_(o.errors_) {
  o.fd_ = -1;
}

AppendFile& AppendFile::operator=(AppendFile&& o) noexcept {
  if (this != &o) {
    close();
    path_ = std::move(o.path_);
    fd_ = o.fd_;
    buffer_ = std::move(o.buffer_);
    was_empty_ = o.was_empty_;
    errors_ = o.errors_;
    o.fd_ = -1;
  }
  return *this;
}

Status AppendFile::open() {
  fd_ = ::open(path_.c_str(), O_WRONLY | O_CREAT | O_APPEND | O_CLOEXEC, 0640);
  if (fd_ < 0) return Error{os_error(path_ + ": open")};
  struct stat st{};
  was_empty_ = ::fstat(fd_, &st) == 0 && st.st_size == 0;
  return ok_status();
}

bool AppendFile::append(std::string_view text) {
  buffer_.append(text);
  return buffer_.size() < (64u << 10) || flush();
}

bool AppendFile::flush() {
  if (buffer_.empty()) return true;
  if (fd_ < 0) {
    buffer_.clear();
    return false;
  }
  std::size_t done = 0;
  while (done < buffer_.size()) {
    const ssize_t n = ::write(fd_, buffer_.data() + done, buffer_.size() - done);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) {
      const std::string msg = os_error(path_ + ": write", n < 0 ? errno : ENOSPC);
      if (msg != last_error_) spdlog::error("{} (lines dropped until writing works again)", msg);
      last_error_ = msg;
      ++errors_;
      buffer_.clear();
      return false;
    }
    done += static_cast<std::size_t>(n);
  }
  buffer_.clear();
  if (!last_error_.empty()) spdlog::info("{}: writing works again", path_);
  last_error_.clear();
  return true;
}

void AppendFile::close() {
  if (fd_ < 0) return;
  flush();
  ::close(fd_);
  fd_ = -1;
}

}  // namespace rigcal::io
