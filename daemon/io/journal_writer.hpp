#pragma once
// Appends journal frames to segment files in the state directory and forces them to disk.
//
// Threads: append(), rotate() and the accessors run on the daemon's I/O thread. A dedicated sync
// thread runs fdatasync() (every fsync_interval_ms, or on request) so that the I/O thread never
// waits for the disk; after each sync it calls on_durable(offset) through the executor the caller
// gave (the I/O thread), where offset counts every byte ever appended (across segments).
//
// Failure: a write that fails (ENOSPC, EIO, ...) or is cut short is undone by truncating the
// segment back to the end of the last whole frame; append() then returns the error and the caller
// keeps the frame to try again later (the daemon stops reading its inputs meanwhile, so TCP flow
// control holds the senders back and nothing is lost). Nothing is acknowledged that is not durable.
#include <atomic>
#include <condition_variable>
#include <cstdint>
#include <functional>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "rigcal/config/config.hpp"
#include "rigcal/result.hpp"

namespace rigcal::io {

std::string segment_file_name(std::uint64_t number);
// Segment numbers present in `dir` (journal-*.rgj), ascending.
std::vector<std::uint64_t> list_segments(const std::string& dir);

class JournalWriter {
 public:
  using DurableCallback = std::function<void(std::uint64_t durable_offset)>;
  using Post = std::function<void(std::function<void()>)>;  // runs a function on the I/O thread

  JournalWriter(std::string dir, const config::JournalConfig& cfg, Post post, DurableCallback on_durable);
  ~JournalWriter();
  JournalWriter(const JournalWriter&) = delete;
  JournalWriter& operator=(const JournalWriter&) = delete;

  // Opens a new segment `number` for appending (it must not exist yet) and starts the sync thread.
  Status open(std::uint64_t number);
  // Appends whole frames. On error nothing of `frames` remains in the file.
  Status append(const std::string& frames);
  // Closes the current segment (synced to disk first) and opens segment current + 1.
  Status rotate();
  // Syncs now and waits for it (shutdown).
  Status sync_now();
  // Asks the sync thread for a sync soon (fsync: every_batch).
  void request_sync();
  void close();

  std::uint64_t segment() const { return segment_; }
  std::uint64_t segment_bytes() const { return segment_size_; }
  std::uint64_t appended_offset() const { return appended_; }
  std::uint64_t durable_offset() const { return durable_.load(); }
  const std::string& last_error() const { return last_error_; }
  std::uint64_t write_errors() const { return write_errors_; }
  std::uint64_t syncs() const { return syncs_.load(); }

 private:
  void sync_loop();
  Status sync_fd(int fd);
  bool advance_durable(std::uint64_t target);  // true if the durable offset moved forward

  std::string dir_;
  config::JournalConfig cfg_;
  Post post_;
  DurableCallback on_durable_;
  int fd_ = -1;
  std::uint64_t segment_ = 0;
  std::uint64_t segment_size_ = 0;
  std::uint64_t appended_ = 0;  // logical offset: bytes appended since the writer started
  std::atomic<std::uint64_t> durable_{0};
  std::atomic<std::uint64_t> syncs_{0};
  std::string last_error_;
  std::uint64_t write_errors_ = 0;

  std::mutex mu_;  // guards the fields below, shared with the sync thread
  std::condition_variable cv_;
  int sync_fd_ = -1;             // fd the sync thread syncs (dup of fd_)
  std::uint64_t sync_target_ = 0;  // logical offset covered once sync_fd_ is synced
  bool sync_requested_ = false;
  bool syncing_ = false;  // the sync thread is inside fdatasync(sync_fd_): don't close it
  bool stopping_ = false;
  std::thread thread_;
};

}  // namespace rigcal::io
