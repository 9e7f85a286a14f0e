#pragma once
// Files of the state directory other than journal appends: checkpoints (written atomically: temp
// file, fsync, rename, fsync of the directory), whole-file reads, removal or archiving of old
// segments, and the lock that keeps a second rigcald off the same directory.
#include <cstdint>
#include <string>
#include <vector>

#include "rigcal/result.hpp"

namespace rigcal::io {

// Creates the directory (mode 0750) if missing and checks that it is writable.
Status prepare_state_directory(const std::string& dir);

// Holds an exclusive flock on DIR/rigcald.lock for its lifetime.
class StateDirectoryLock {
 public:
  static Result<StateDirectoryLock> acquire(const std::string& dir);
  StateDirectoryLock(StateDirectoryLock&& o) noexcept : fd_(o.fd_) { o.fd_ = -1; }
  StateDirectoryLock& operator=(StateDirectoryLock&&) = delete;
  ~StateDirectoryLock();

 private:
  explicit StateDirectoryLock(int fd) : fd_(fd) {}
  int fd_;
};

std::string checkpoint_file_name(std::uint64_t number);
// Checkpoint numbers present in `dir`, newest first.
std::vector<std::uint64_t> list_checkpoints(const std::string& dir);
// Writes DIR/checkpoint-NUMBER.rgc atomically (0640).
Status write_checkpoint_file(const std::string& dir, std::uint64_t number, const std::string& bytes);

Result<std::string> read_whole_file(const std::string& path);
// Truncates a file to `size` bytes (a torn journal tail) and syncs it.
Status truncate_file(const std::string& path, std::uint64_t size);
// Removes DIR/name, or moves it into DIR/archive/ when `archive` is set.
Status retire_file(const std::string& dir, const std::string& name, bool archive);

}  // namespace rigcal::io
