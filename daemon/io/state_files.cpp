#include "state_files.hpp"

#include <dirent.h>
#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cinttypes>
#include <cstdio>

#include "os_error.hpp"

namespace rigcal::io {

namespace {
Status fsync_directory(const std::string& dir) {
  const int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return Error{os_error(dir + ": open directory")};
  const bool ok = ::fsync(fd) == 0;
  const int err = errno;
  ::close(fd);
  if (!ok) return Error{os_error(dir + ": fsync directory", err)};
  return ok_status();
}
}  // namespace

Status prepare_state_directory(const std::string& dir) {
  struct stat st{};
  if (::stat(dir.c_str(), &st) != 0) {
    if (errno != ENOENT) return Error{os_error(dir)};
    if (::mkdir(dir.c_str(), 0750) != 0 && errno != EEXIST) return Error{os_error(dir + ": mkdir")};
  } else if (!S_ISDIR(st.st_mode)) {
    return Error{dir + ": not a directory"};
  }
  if (::access(dir.c_str(), W_OK | X_OK) != 0) return Error{os_error(dir + ": not writable")};
  return ok_status();
}

Result<StateDirectoryLock> StateDirectoryLock::acquire(const std::string& dir) {
  const std::string path = dir + "/rigcald.lock";
  const int fd = ::open(path.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0640);
  if (fd < 0) return Error{os_error(path + ": open")};
  if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
    const int err = errno;
    ::close(fd);
    if (err == EWOULDBLOCK) return Error{path + ": another rigcald is using this state directory"};
    return Error{os_error(path + ": lock", err)};
  }
  return StateDirectoryLock(fd);
}

StateDirectoryLock::~StateDirectoryLock() {
  if (fd_ >= 0) ::close(fd_);
}

std::string checkpoint_file_name(std::uint64_t number) {
  char name[48];
  std::snprintf(name, sizeof name, "checkpoint-%016" PRIu64 ".rgc", number);
  return name;
}

std::vector<std::uint64_t> list_checkpoints(const std::string& dir) {
  std::vector<std::uint64_t> out;
  DIR* d = ::opendir(dir.c_str());
  if (!d) return out;
  while (dirent* e = ::readdir(d)) {
    std::uint64_t n = 0;
    if (std::sscanf(e->d_name, "checkpoint-%16" SCNu64, &n) == 1 && std::string(e->d_name) == checkpoint_file_name(n))
      out.push_back(n);
  }
  ::closedir(d);
  std::sort(out.rbegin(), out.rend());
  return out;
}

Status write_checkpoint_file(const std::string& dir, std::uint64_t number, const std::string& bytes) {
  const std::string tmp = dir + "/checkpoint.tmp";
  const std::string final_path = dir + "/" + checkpoint_file_name(number);
  const int fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0640);
  if (fd < 0) return Error{os_error(tmp + ": open")};
  std::size_t done = 0;
  while (done < bytes.size()) {
    const ssize_t n = ::write(fd, bytes.data() + done, bytes.size() - done);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) {
      const int err = n < 0 ? errno : ENOSPC;
      ::close(fd);
      ::unlink(tmp.c_str());
      return Error{os_error(tmp + ": write", err)};
    }
    done += static_cast<std::size_t>(n);
  }
  if (::fsync(fd) != 0) {
    const int err = errno;
    ::close(fd);
    ::unlink(tmp.c_str());
    return Error{os_error(tmp + ": fsync", err)};
  }
  ::close(fd);
  if (::rename(tmp.c_str(), final_path.c_str()) != 0) return Error{os_error(final_path + ": rename")};
  return fsync_directory(dir);
}

Result<std::string> read_whole_file(const std::string& path) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0) return Error{os_error(path)};
  std::string out;
  char buf[1 << 16];
  for (;;) {
    const ssize_t n = ::read(fd, buf, sizeof buf);
    if (n < 0 && errno == EINTR) continue;
    if (n < 0) {
      const int err = errno;
      ::close(fd);
      return Error{os_error(path + ": read", err)};
    }
    if (n == 0) break;
    out.append(buf, static_cast<std::size_t>(n));
  }
  ::close(fd);
  return out;
}

Status truncate_file(const std::string& path, std::uint64_t size) {
  const int fd = ::open(path.c_str(), O_WRONLY | O_CLOEXEC);
  if (fd < 0) return Error{os_error(path)};
  const bool ok = ::ftruncate(fd, static_cast<off_t>(size)) == 0 && ::fsync(fd) == 0;
  const int err = errno;
  ::close(fd);
  if (!ok) return Error{os_error(path + ": truncate", err)};
  return ok_status();
}

Status retire_file(const std::string& dir, const std::string& name, bool archive) {
  const std::string path = dir + "/" + name;
  if (!archive) {
    if (::unlink(path.c_str()) != 0 && errno != ENOENT) return Error{os_error(path + ": remove")};
    return ok_status();
  }
  const std::string adir = dir + "/archive";
  if (::mkdir(adir.c_str(), 0750) != 0 && errno != EEXIST) return Error{os_error(adir + ": mkdir")};
  if (::rename(path.c_str(), (adir + "/" + name).c_str()) != 0) return Error{os_error(path + ": archive")};
  return ok_status();
}

}  // namespace rigcal::io
