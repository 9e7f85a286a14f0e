#include "hook_runner.hpp"

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <boost/asio/posix/stream_descriptor.hpp>
#include <boost/asio/steady_timer.hpp>
#include <csignal>
#include <spdlog/spdlog.h>

namespace rigcal::io {

namespace asio = boost::asio;

namespace {
constexpr std::size_t max_running = 4;
constexpr std::size_t max_waiting = 100;
constexpr std::size_t max_stderr = 4096;
}  // namespace

struct HookRunner::Running {
  Running(asio::io_context& io, int fd) : timer(io), err(io, fd) {}
  asio::steady_timer timer;
  asio::posix::stream_descriptor err;
  std::array<char, 512> chunk{};
  std::string stderr_text;
  bool timed_out = false;
  std::string what;
};

HookRunner::HookRunner(asio::io_context& io, config::HookConfig cfg, service::Counters& counters)
    : io_(io), cfg_(std::move(cfg)), counters_(counters), sigchld_(io, SIGCHLD) {
  sigchld_.async_wait([this](boost::system::error_code ec, int) {
    if (!ec) reap();
  });
}

HookRunner::~HookRunner() { stop(); }

void HookRunner::stop() {
  stopped_ = true;
  boost::system::error_code ignored;
  sigchld_.cancel(ignored);
  for (auto& [pid, r] : running_) {
    ::kill(-pid, SIGKILL);
    ::waitpid(pid, nullptr, 0);
  }
  running_.clear();
  waiting_.clear();
}

void HookRunner::run(std::vector<std::string> event_args, std::string stdin_text) {
  if (stopped_) return;
  Job job{std::move(event_args), std::move(stdin_text)};
  if (running_.size() < max_running) return start(std::move(job));
  if (waiting_.size() >= max_waiting) {
    ++counters_.hook_failures;
    spdlog::error("alert hook: {} events already waiting; this event is not passed to the hook", waiting_.size());
    return;
  }
  waiting_.push_back(std::move(job));
}

void HookRunner::start(Job job) {
  int in_pipe[2], err_pipe[2];
  if (::pipe2(in_pipe, O_CLOEXEC) != 0) return spdlog::error("alert hook: pipe: {}", std::strerror(errno));
  if (::pipe2(err_pipe, O_CLOEXEC) != 0) {
    ::close(in_pipe[0]);
    ::close(in_pipe[1]);
    return spdlog::error("alert hook: pipe: {}", std::strerror(errno));
  }
  // The hook gets its standard streams and nothing else of rigcald: no inherited descriptor (Asio's
  // sockets are not close-on-exec: listeners and senders' connections would leak into it), the
  // working directory /, default signal dispositions (rigcald ignores SIGPIPE) and an empty signal
  // mask, and a process group of its own so that a timeout kills whatever it started too.
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_adddup2(&actions, in_pipe[0], 0);
  posix_spawn_file_actions_addopen(&actions, 1, "/dev/null", O_WRONLY, 0);
  posix_spawn_file_actions_adddup2(&actions, err_pipe[1], 2);
  posix_spawn_file_actions_addclosefrom_np(&actions, 3);
  posix_spawn_file_actions_addchdir_np(&actions, "/");
  posix_spawnattr_t attr;
  posix_spawnattr_init(&attr);
  sigset_t none, defaults;
  sigemptyset(&none);
  sigfillset(&defaults);
  posix_spawnattr_setsigmask(&attr, &none);
  posix_spawnattr_setsigdefault(&attr, &defaults);
  posix_spawnattr_setpgroup(&attr, 0);
  posix_spawnattr_setflags(&attr, POSIX_SPAWN_SETSIGMASK | POSIX_SPAWN_SETSIGDEF | POSIX_SPAWN_SETPGROUP);
  std::vector<std::string> argv_text;
  argv_text.push_back(cfg_.program);
  for (const auto& a : cfg_.args) argv_text.push_back(a);
  for (auto& a : job.args) argv_text.push_back(std::move(a));
  std::vector<char*> argv;
  for (auto& a : argv_text) argv.push_back(a.data());
  argv.push_back(nullptr);
  char path_env[] = "PATH=/usr/bin:/bin";
  char lang_env[] = "LANG=C.UTF-8";
  char* envp[] = {path_env, lang_env, nullptr};
  pid_t pid = 0;
  const int rc = posix_spawn(&pid, cfg_.program.c_str(), &actions, &attr, argv.data(), envp);
  posix_spawn_file_actions_destroy(&actions);
  posix_spawnattr_destroy(&attr);
  ::close(in_pipe[0]);
  ::close(err_pipe[1]);
  ++counters_.hook_runs;
  if (rc != 0) {
    ::close(in_pipe[1]);
    ::close(err_pipe[0]);
    ++counters_.hook_failures;
    return spdlog::error("alert hook {}: cannot start: {}", cfg_.program, std::strerror(rc));
  }
  // The event is a few KiB, well under a pipe's buffer: one non-blocking write, then EOF.
  ::fcntl(in_pipe[1], F_SETFL, O_NONBLOCK);
  if (::write(in_pipe[1], job.input.data(), job.input.size()) != static_cast<ssize_t>(job.input.size()))
    spdlog::warn("alert hook {} (pid {}): the event did not fit on its standard input", cfg_.program, pid);
  ::close(in_pipe[1]);

  auto r = std::make_unique<Running>(io_, err_pipe[0]);
  r->what = cfg_.program + " (pid " + std::to_string(pid) + ")";
  r->timer.expires_after(std::chrono::milliseconds(static_cast<long>(cfg_.timeout_s * 1000)));
  r->timer.async_wait([this, pid](boost::system::error_code ec) {
    if (ec) return;
    auto it = running_.find(pid);
    if (it == running_.end()) return;
    it->second->timed_out = true;
    ::kill(-pid, SIGKILL);  // its process group: the hook and anything it started
  });
  running_.emplace(pid, std::move(r));
  read_stderr(pid);
}

void HookRunner::read_stderr(int pid) {
  auto it = running_.find(pid);
  if (it == running_.end()) return;
  Running& r = *it->second;
  r.err.async_read_some(asio::buffer(r.chunk), [this, pid](boost::system::error_code ec, std::size_t n) {
    if (ec) return;
    auto found = running_.find(pid);
    if (found == running_.end()) return;
    std::string& text = found->second->stderr_text;
    if (text.size() < max_stderr) text.append(found->second->chunk.data(), std::min(n, max_stderr - text.size()));
    read_stderr(pid);
  });
}

void HookRunner::reap() {
  for (;;) {
    int status = 0;
    const pid_t pid = ::waitpid(-1, &status, WNOHANG);
    if (pid <= 0) break;
    finished(pid, status);
  }
  if (stopped_) return;
  sigchld_.async_wait([this](boost::system::error_code ec, int) {
    if (!ec) reap();
  });
}

void HookRunner::finished(int pid, int status) {
  auto it = running_.find(pid);
  if (it == running_.end()) return;
  Running& r = *it->second;
  // Drain what is left of its standard error without blocking.
  ::fcntl(r.err.native_handle(), F_SETFL, O_NONBLOCK);
  char buf[512];
  for (ssize_t n; r.stderr_text.size() < max_stderr && (n = ::read(r.err.native_handle(), buf, sizeof buf)) > 0;)
    r.stderr_text.append(buf, static_cast<std::size_t>(n));
  while (!r.stderr_text.empty() && (r.stderr_text.back() == '\n' || r.stderr_text.back() == '\r')) r.stderr_text.pop_back();
  const std::string err = r.stderr_text.empty() ? "" : "; stderr: " + r.stderr_text;
  if (r.timed_out) {
    ++counters_.hook_failures;
    spdlog::error("alert hook {}: killed after {} s{}", r.what, cfg_.timeout_s, err);
  } else if (WIFEXITED(status) && WEXITSTATUS(status) != 0) {
    ++counters_.hook_failures;
    spdlog::error("alert hook {}: exit status {}{}", r.what, WEXITSTATUS(status), err);
  } else if (WIFSIGNALED(status)) {
    ++counters_.hook_failures;
    spdlog::error("alert hook {}: killed by signal {}{}", r.what, WTERMSIG(status), err);
  } else {
    spdlog::debug("alert hook {}: done{}", r.what, err);
  }
  r.timer.cancel();
  boost::system::error_code ignored;
  r.err.close(ignored);
  running_.erase(it);
  while (!waiting_.empty() && running_.size() < max_running) {
    Job j = std::move(waiting_.front());
    waiting_.pop_front();
    start(std::move(j));
  }
}

}  // namespace rigcal::io
