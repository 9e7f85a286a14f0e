#pragma once
// Runs the alert hook program for each alert event: without a shell (posix_spawn), with a clean
// environment (PATH=/usr/bin:/bin and LANG=C.UTF-8 only), no descriptor of rigcald's but its three
// standard streams, working directory /, default signal handling, in a process group of its own;
// the configured arguments followed by the
// event's (channel, event, detector, time), the event's JSON on standard input, standard output
// discarded and the first 4 KiB of standard error kept for the log. A program still running after
// timeout_s is killed (SIGKILL, with its process group). At most 4 run at once; up to 100 more events wait; beyond that
// events are dropped for the hook (counted, logged; the alert file still has them). I/O thread only.
#include <boost/asio/io_context.hpp>
#include <boost/asio/signal_set.hpp>
#include <deque>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include "../service/counters.hpp"
#include "rigcal/config/config.hpp"

namespace rigcal::io {

class HookRunner {
 public:
  HookRunner(boost::asio::io_context& io, config::HookConfig cfg, service::Counters& counters);
  ~HookRunner();

  void run(std::vector<std::string> event_args, std::string stdin_text);
  std::size_t running() const { return running_.size(); }
  // Kills what still runs (shutdown).
  void stop();

 private:
  struct Job {
    std::vector<std::string> args;
    std::string input;
  };
  struct Running;
  void start(Job job);
  void reap();
  void read_stderr(int pid);
  void finished(int pid, int status);

  boost::asio::io_context& io_;
  config::HookConfig cfg_;
  service::Counters& counters_;
  boost::asio::signal_set sigchld_;
  std::deque<Job> waiting_;
  std::map<int, std::unique_ptr<Running>> running_;
  bool stopped_ = false;
};

}  // namespace rigcal::io
