#include "journal_writer.hpp"

#include <dirent.h>
#include <fcntl.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cinttypes>
#include <cstdio>

#include "os_error.hpp"

namespace rigcal::io {

std::string segment_file_name(std::uint64_t number) {
  char name[48];
  std::snprintf(name, sizeof name, "journal-%016" PRIu64 ".rgj", number);
  return name;
}

std::vector<std::uint64_t> list_segments(const std::string& dir) {
  std::vector<std::uint64_t> out;
  DIR* d = ::opendir(dir.c_str());
  if (!d) return out;
  while (dirent* e = ::readdir(d)) {
    std::uint64_t n = 0;
    char tail[8] = {};
    if (std::sscanf(e->d_name, "journal-%16" SCNu64 ".rg%1s", &n, tail) == 2 && std::string(tail) == "j" &&
        std::string(e->d_name) == segment_file_name(n))
      out.push_back(n);
  }
  ::closedir(d);
  std::sort(out.begin(), out.end());
  return out;
}

JournalWriter::JournalWriter(std::string dir, const config::JournalConfig& cfg, Post post, DurableCallback on_durable)
    : dir_(std::move(dir)), cfg_(cfg), post_(std::move(post)), on_durable_(std::move(on_durable)) {}

JournalWriter::~JournalWriter() { close(); }

Status JournalWriter::open(std::uint64_t number) {
  const std::string path = dir_ + "/" + segment_file_name(number);
  const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_APPEND | O_CLOEXEC, 0640);
  if (fd < 0) return Error{os_error(path + ": open")};
  segment_ = number;
  segment_size_ = 0;
  const int dup = ::fcntl(fd, F_DUPFD_CLOEXEC, 0);
  {
    std::unique_lock lock(mu_);
    cv_.wait(lock, [this] { return !syncing_; });
    if (sync_fd_ >= 0) ::close(sync_fd_);
    sync_fd_ = dup;
  }
  fd_ = fd;
  // Make the new file's directory entry durable too.
  if (const int dfd = ::open(dir_.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC); dfd >= 0) {
    ::fsync(dfd);
    ::close(dfd);
  }
  if (!thread_.joinable()) thread_ = std::thread([this] { sync_loop(); });
  return ok_status();
}

Status JournalWriter::append(const std::string& frames) {
  if (fd_ < 0) return Error{"journal is not open"};
  std::size_t done = 0;
  while (done < frames.size()) {
    const ssize_t n = ::write(fd_, frames.data() + done, frames.size() - done);
    if (n > 0) {
      done += static_cast<std::size_t>(n);
      continue;
    }
    if (n < 0 && errno == EINTR) continue;
    const int err = n < 0 ? errno : ENOSPC;
    // Undo the partial write so the segment ends on a frame boundary.
    if (done > 0 && ::ftruncate(fd_, static_cast<off_t>(segment_size_)) != 0) {
      last_error_ = os_error(segment_file_name(segment_) + ": truncate after a failed write");
    } else {
      last_error_ = os_error(segment_file_name(segment_) + ": write", err);
    }
    ++write_errors_;
    return Error{last_error_};
  }
  segment_size_ += frames.size();
  appended_ += frames.size();
  {
    std::lock_guard lock(mu_);
    sync_target_ = appended_;
  }
  last_error_.clear();
  if (cfg_.fsync == config::FsyncPolicy::every_batch) request_sync();
  return ok_status();
}

void JournalWriter::request_sync() {
  {
    std::lock_guard lock(mu_);
    sync_requested_ = true;
  }
  cv_.notify_all();
}

Status JournalWriter::sync_fd(int fd) {
  if (::fdatasync(fd) != 0) return Error{os_error(segment_file_name(segment_) + ": fdatasync")};
  return ok_status();
}

void JournalWriter::sync_loop() {
  const auto interval = std::chrono::milliseconds(cfg_.fsync_interval_ms);
  std::unique_lock lock(mu_);
  std::uint64_t synced = 0;
  while (!stopping_) {
    cv_.wait_for(lock, interval, [this] { return stopping_ || sync_requested_; });
    if (stopping_) break;
    sync_requested_ = false;
    const std::uint64_t target = sync_target_;
    const int fd = sync_fd_;
    if (target == synced || fd < 0) continue;
    syncing_ = true;
    lock.unlock();
    const bool ok = ::fdatasync(fd) == 0;
    lock.lock();
    syncing_ = false;
    cv_.notify_all();
    if (!ok) continue;  // nothing becomes durable; the next append or sync_now reports the error
    synced = target;
    if (advance_durable(target) && post_) post_([this, target] { on_durable_(target); });
  }
}

Status JournalWriter::sync_now() {
  if (fd_ < 0) return ok_status();
  if (auto st = sync_fd(fd_); !st) return st;
  std::uint64_t target;
  {
    std::lock_guard lock(mu_);
    target = appended_;
  }
  if (advance_durable(target)) on_durable_(target);
  return ok_status();
}

bool JournalWriter::advance_durable(std::uint64_t target) {
  std::uint64_t cur = durable_.load();
  while (target > cur) {
    if (durable_.compare_exchange_weak(cur, target)) {
      syncs_.fetch_add(1);
      return true;
    }
  }
  return false;
}

Status JournalWriter::rotate() {
  if (auto st = sync_now(); !st) return st;
  ::close(fd_);
  fd_ = -1;
  return open(segment_ + 1);
}

void JournalWriter::close() {
  {
    std::lock_guard lock(mu_);
    stopping_ = true;
  }
  cv_.notify_all();
  if (thread_.joinable()) thread_.join();
  if (fd_ >= 0) {
    ::fdatasync(fd_);
    ::close(fd_);
    fd_ = -1;
  }
  if (sync_fd_ >= 0) {
    ::close(sync_fd_);
    sync_fd_ = -1;
  }
}

}  // namespace rigcal::io
