#include "daemon.hpp"

#include <malloc.h>
#include <sys/resource.h>
#include <sys/stat.h>

#include <boost/asio/post.hpp>
#include <chrono>
#include <csignal>
#include <fstream>
#include <spdlog/spdlog.h>
#include <sstream>

#include "exit_codes.hpp"
#include "rigcal/config/loader.hpp"
#include "rigcal/protocol/control_request.hpp"
#include "rigcal/state/checkpoint_format.hpp"
#include "rigcal/state/journal_format.hpp"
#include "rigcal/version.hpp"
#include "secrets.hpp"
#include "status_report.hpp"
#include "systemd_notify.hpp"

namespace rigcal::service {

namespace asio = boost::asio;

namespace {

protocol::TimeNs wall_clock_ns() {
  return std::chrono::duration_cast<std::chrono::nanoseconds>(std::chrono::system_clock::now().time_since_epoch())
      .count();
}

spdlog::level::level_enum log_level(config::LogLevel l) {
  switch (l) {
    case config::LogLevel::trace: return spdlog::level::trace;
    case config::LogLevel::debug: return spdlog::level::debug;
    case config::LogLevel::info: return spdlog::level::info;
    case config::LogLevel::warning: return spdlog::level::warn;
    case config::LogLevel::error: return spdlog::level::err;
    case config::LogLevel::critical: return spdlog::level::critical;
  }
  return spdlog::level::info;
}

// Every TCP sender holds a descriptor: a listener with max_connections in the thousands needs more
// than the usual soft limit of 1024. Raising the soft limit up to the hard one needs no privilege.
void raise_open_file_limit() {
  rlimit lim{};
  if (::getrlimit(RLIMIT_NOFILE, &lim) != 0 || lim.rlim_cur >= lim.rlim_max) return;
  const rlim_t before = lim.rlim_cur;
  lim.rlim_cur = lim.rlim_max;
  if (::setrlimit(RLIMIT_NOFILE, &lim) == 0)
    spdlog::info("open-file limit raised from {} to {} (the hard limit)", before, lim.rlim_max);
  else
    spdlog::warn("open-file limit stays at {}: {}", before, std::strerror(errno));
}

// The engine holds each channel's configuration (shared with its ChannelEngine); the daemon's own
// copy of the list is not used after the engine was built, and cost about 1 KiB per channel.
void drop_channel_configs(config::Config& cfg) {
  cfg.channels.clear();
  cfg.channels.shrink_to_fit();
}

// Parsing a large configuration (the YAML tree of 100 000 channels) and the copies dropped above
// leave hundreds of MiB free inside the heap that glibc would otherwise keep: give them back.
void return_free_memory() {
#if defined(__GLIBC__)
  ::malloc_trim(0);
#endif
}

// Startup failures carry their exit status.
struct StartError {
  int code;
  std::string message;
};

}  // namespace

Daemon::Daemon(config::Config cfg)
    : signals_(io_),
      cfg_(std::move(cfg)),
      started_(wall_clock_ns()),
      engine_(cfg_),
      outputs_(io_, cfg_, counters_),
      journal_(cfg_.state_directory, cfg_.journal, [this](std::function<void()> f) { asio::post(io_, std::move(f)); },
               [this](std::uint64_t offset) { ingest_.on_durable(offset); }),
      ingest_(engine_, journal_, *this, counters_, cfg_),
      tick_timer_(io_),
      checkpoint_timer_(io_),
      watchdog_timer_(io_),
      retry_timer_(io_) {
  drop_channel_configs(cfg_);
}

Daemon::~Daemon() {
  if (checkpoint_thread_.joinable()) checkpoint_thread_.join();
}

protocol::TimeNs Daemon::now() { return wall_clock_ns(); }

void Daemon::on_line_rejected(const Source& src, std::uint64_t line, protocol::RejectReason reason,
                              const std::string& detail, std::string_view raw) {
  outputs_.line_rejected(src, line, reason, detail, raw, now());
}

void Daemon::on_journal_blocked(const std::string& error) {
  spdlog::critical("journal cannot be written: {}. Inputs are paused and nothing is acknowledged until it can be "
                   "written again (retrying every 500 ms)",
                   error);
  systemd::status("journal blocked: " + error);
  arm_retry();
}

void Daemon::on_journal_unblocked() {
  spdlog::info("journal writable again; inputs resumed");
  systemd::status(summary());
}

void Daemon::arm_retry() {
  retry_timer_.expires_after(std::chrono::milliseconds(500));
  retry_timer_.async_wait([this](boost::system::error_code ec) {
    if (ec || stopping_) return;
    ingest_.retry_blocked();
    if (ingest_.blocked()) arm_retry();
  });
}

// --- start-up stages ---

int Daemon::run() {
  spdlog::set_level(log_level(cfg_.log_level));
  ::umask(027);  // state, reject and alert files: 0640 at most
  spdlog::info("rigcald {} starting with {} ({} channels); decision support only, not a safety function",
               version_string, cfg_.file, engine_.size());
  // Signals first, so a SIGTERM during a long restore is not lost.
  signals_.add(SIGTERM);
  signals_.add(SIGINT);
  signals_.add(SIGHUP);
  ::signal(SIGPIPE, SIG_IGN);
  raise_open_file_limit();
  try {
    if (auto st = io::prepare_state_directory(cfg_.state_directory); !st) throw StartError{exit_code::state_dir, st.error().message};
    auto lock = io::StateDirectoryLock::acquire(cfg_.state_directory);
    if (!lock) throw StartError{exit_code::state_dir, lock.error().message};
    lock_.emplace(std::move(lock.value()));
    if (auto st = restore(); !st) throw StartError{exit_code::restore, st.error().message};
    if (auto st = outputs_.open(); !st) throw StartError{exit_code::open_io, st.error().message};
    if (auto st = open_control(); !st) throw StartError{exit_code::open_io, st.error().message};
    if (auto st = open_inputs(cfg_); !st) throw StartError{exit_code::open_io, st.error().message};
  } catch (const StartError& e) {
    spdlog::critical("cannot start: {}", e.message);
    return e.code;
  }
  wait_signals();
  start_timers();
  return_free_memory();
  systemd::ready(summary());
  spdlog::info("ready: {}", summary());
  io_.run();
  if (checkpoint_thread_.joinable()) checkpoint_thread_.join();
  spdlog::info("stopped");
  return exit_code::ok;
}

Status Daemon::restore() {
  const auto t0 = std::chrono::steady_clock::now();
  const std::string& dir = cfg_.state_directory;
  std::optional<state::Checkpoint> cp;
  for (std::uint64_t n : io::list_checkpoints(dir)) {
    const std::string path = dir + "/" + io::checkpoint_file_name(n);
    auto bytes = io::read_whole_file(path);
    if (!bytes) {
      spdlog::warn("{}", bytes.error().message);
      continue;
    }
    auto decoded = state::decode_checkpoint(bytes.value());
    if (!decoded) {
      spdlog::warn("{}: {}; falling back to an older checkpoint and a longer journal replay", path,
                   decoded.error().message);
      continue;
    }
    cp = std::move(decoded.value());
    checkpoint_number_ = std::max(checkpoint_number_, n);
    break;
  }
  for (std::uint64_t n : io::list_checkpoints(dir)) checkpoint_number_ = std::max(checkpoint_number_, n);
  const auto segments = io::list_segments(dir);
  std::uint64_t first = segments.empty() ? 1 : segments.front();
  if (cp) {
    ingest_.restore_streams(cp->streams);
    std::size_t restored = 0;
    for (const auto& ch : cp->channels) {
      engine::ChannelEngine* e = engine_.find(ch.id);
      if (!e) {
        spdlog::warn("checkpoint: channel {} is no longer configured; its state is dropped", ch.id);
        continue;
      }
      if (e->fingerprint() != ch.fingerprint) {
        spdlog::warn("checkpoint: the configuration of channel {} changed since the checkpoint; its fit restarts", ch.id);
        continue;
      }
      state::BinaryReader r(ch.blob);
      if (!e->load(r)) {
        spdlog::error("checkpoint: state of channel {} is unreadable; its fit restarts", ch.id);
        e->restart_fresh();
        continue;
      }
      ++restored;
    }
    first = cp->first_segment;
    previous_first_segment_ = first;
    checkpoint_time_ = cp->written;
    spdlog::info("restored checkpoint {} ({} of {} channels), replaying journal from segment {}", cp->number, restored,
                 cp->channels.size(), first);
  } else if (!segments.empty()) {
    previous_first_segment_ = first;
    spdlog::info("no usable checkpoint: rebuilding every channel from the journal ({} segments)", segments.size());
  }
  // Without a usable checkpoint, archived segments (journal.retain: archive) come first: with them
  // the whole history is rebuilt. Their numbers are below the live ones.
  std::vector<std::string> to_replay;
  if (!cp)
    for (std::uint64_t n : io::list_segments(dir + "/archive"))
      if (segments.empty() || n < segments.front()) to_replay.push_back(dir + "/archive/" + io::segment_file_name(n));
  if (!to_replay.empty()) spdlog::info("replaying {} archived segments first", to_replay.size());
  std::uint64_t last_segment = 0;
  for (std::uint64_t n : segments) {
    last_segment = n;
    if (n >= first) to_replay.push_back(dir + "/" + io::segment_file_name(n));
  }
  std::uint64_t entries = 0;
  for (const std::string& path : to_replay) {
    auto bytes = io::read_whole_file(path);
    if (!bytes) return Error{bytes.error().message};
    const auto report = state::read_journal_segment(bytes.value(), [this](const state::JournalEntry& e) { ingest_.replay(e); });
    entries += report.entries;
    for (const auto& p : report.problems) spdlog::warn("{}: {}", path, p);
    if (report.torn_tail) {
      spdlog::warn("{}: torn final record (a write cut short) skipped; truncating the segment to {} bytes", path,
                   report.valid_bytes);
      if (auto st = io::truncate_file(path, report.valid_bytes); !st) return st;
    }
  }
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  if (entries > 0) spdlog::info("replayed {} journal entries in {:.3f} s", entries, seconds);
  const std::uint64_t next = std::max(last_segment + 1, first);
  if (auto st = journal_.open(next); !st) return st;
  ingest_.start_segment();
  return ok_status();
}

Status Daemon::open_control() {
  std::string secret;
  if (!cfg_.control.secret_file.empty()) {
    auto s = read_secret_file(cfg_.control.secret_file);
    if (!s) return Error{"control: " + s.error().message};
    secret = s.value();
  }
  control_ = std::make_unique<io::ControlServer>(io_, resolve_path(cfg_.state_directory, cfg_.control.socket), secret,
                                                 [this](const std::string& r) { return control_request(r); });
  return control_->start();
}

Status Daemon::open_inputs(const config::Config& cfg) {
  for (const auto& t : cfg.inputs.tcp) {
    std::string secret;
    if (!t.secret_file.empty()) {
      auto s = read_secret_file(t.secret_file);
      if (!s) return Error{"input " + t.name + ": " + s.error().message};
      secret = s.value();
    }
    std::optional<asio::ssl::context> tls;
    if (t.tls.enabled()) {
      auto ctx = io::make_tls_context(t.tls);
      if (!ctx) return Error{"input " + t.name + ": TLS: " + ctx.error().message};
      tls.emplace(std::move(ctx.value()));
    }
    auto input = std::make_unique<io::TcpInput>(io_, t, ingest_, secret, std::move(tls));
    if (auto st = input->start(); !st) return st;
    spdlog::info("input {}: listening on {}:{}{}{}", t.name, t.address, t.port, t.tls.enabled() ? " (TLS)" : "",
                 secret.empty() ? "" : " (shared secret)");
    tcp_.push_back(std::move(input));
  }
  for (const auto& s : cfg.inputs.serial) {
    auto input = std::make_unique<io::SerialInput>(io_, s, ingest_);
    if (auto st = input->start(); !st) return st;
    serial_.push_back(std::move(input));
  }
  return ok_status();
}

void Daemon::close_inputs() {
  for (auto& t : tcp_) t->stop();
  for (auto& s : serial_) s->stop();
  tcp_.clear();
  serial_.clear();
}

// --- timers and signals ---

void Daemon::start_timers() {
  // The current minute is under way: its rejects count against log_per_minute already (starting
  // from 0 made the first tick open a "new" minute and log a second allowance).
  last_minute_ = now() / 60'000'000'000;
  arm_tick();
  arm_checkpoint();
  if (const std::uint64_t us = systemd::watchdog_ping_interval_us()) arm_watchdog(us);
}

void Daemon::arm_tick() {
  tick_timer_.expires_after(std::chrono::seconds(1));
  tick_timer_.async_wait([this](boost::system::error_code ec) {
    if (ec || stopping_) return;
    const protocol::TimeNs t = now();
    if (!ingest_.blocked()) ingest_.tick(t);
    outputs_.flush();
    const std::int64_t minute = t / 60'000'000'000;
    if (minute != last_minute_) {
      outputs_.tick_minute(t);
      last_minute_ = minute;
    }
    arm_tick();
  });
}

void Daemon::arm_checkpoint() {
  checkpoint_timer_.expires_after(std::chrono::milliseconds(static_cast<long>(cfg_.checkpoint_interval_s * 1000)));
  checkpoint_timer_.async_wait([this](boost::system::error_code ec) {
    if (ec || stopping_) return;
    checkpoint(false);
    arm_checkpoint();
  });
}

void Daemon::arm_watchdog(std::uint64_t interval_us) {
  systemd::watchdog();
  watchdog_timer_.expires_after(std::chrono::microseconds(interval_us));
  watchdog_timer_.async_wait([this, interval_us](boost::system::error_code ec) {
    if (ec || stopping_) return;
    arm_watchdog(interval_us);
  });
}

void Daemon::wait_signals() {
  signals_.async_wait([this](boost::system::error_code ec, int sig) {
    if (ec) return;
    if (sig == SIGHUP) {
      reload();
      wait_signals();
      return;
    }
    spdlog::info("{} received: stopping", sig == SIGTERM ? "SIGTERM" : "SIGINT");
    stop();
  });
}

// --- checkpoints ---

void Daemon::checkpoint(bool final) {
  if (checkpoint_in_progress_ && !final) return;
  if (checkpoint_thread_.joinable()) checkpoint_thread_.join();
  if (ingest_.blocked()) {
    spdlog::warn("checkpoint skipped: the journal cannot be written");
    return;
  }
  if (auto st = journal_.rotate(); !st) {
    ++counters_.checkpoint_errors;
    spdlog::error("checkpoint: {}", st.error().message);
    return;
  }
  ingest_.start_segment();
  state::Checkpoint cp;
  cp.number = ++checkpoint_number_;
  cp.first_segment = journal_.segment();
  cp.written = now();
  cp.streams = ingest_.checkpoint_streams();
  cp.channels.reserve(engine_.size());
  for (std::size_t i = 0; i < engine_.size(); ++i) {
    const auto& ch = engine_.channel(i);
    state::BinaryWriter w;
    ch.save(w);
    cp.channels.push_back({ch.config().id, ch.fingerprint(), std::move(w.buffer())});
  }
  auto bytes = std::make_shared<std::string>(state::encode_checkpoint(cp));
  const std::uint64_t number = cp.number, first = cp.first_segment, keep = previous_first_segment_;
  const protocol::TimeNs written = cp.written;
  auto finished = [this, number, first, keep, written](Status st) {
    checkpoint_in_progress_ = false;
    if (!st) {
      ++counters_.checkpoint_errors;
      spdlog::error("checkpoint {}: {}", number, st.error().message);
      return;
    }
    ++counters_.checkpoints;
    checkpoint_time_ = written;
    spdlog::debug("checkpoint {} written; journal replay would start at segment {}", number, first);
    // Keep this checkpoint and the previous one (a fallback if this one is ever unreadable), and
    // the segments the previous one needs.
    retire_old_state(keep, number - 1);
    previous_first_segment_ = first;
  };
  if (final) {
    finished(io::write_checkpoint_file(cfg_.state_directory, number, *bytes));
    return;
  }
  checkpoint_in_progress_ = true;
  checkpoint_thread_ = std::thread([this, bytes, number, finished] {
    Status st = io::write_checkpoint_file(cfg_.state_directory, number, *bytes);
    asio::post(io_, [finished, st] { finished(st); });
  });
}

void Daemon::retire_old_state(std::uint64_t keep_from_segment, std::uint64_t keep_from_checkpoint) {
  const bool archive = cfg_.journal.retain == config::SegmentRetention::archive;
  for (std::uint64_t n : io::list_segments(cfg_.state_directory))
    if (n < keep_from_segment)
      if (auto st = io::retire_file(cfg_.state_directory, io::segment_file_name(n), archive); !st)
        spdlog::warn("journal compaction: {}", st.error().message);
  for (std::uint64_t n : io::list_checkpoints(cfg_.state_directory))
    if (n < keep_from_checkpoint) io::retire_file(cfg_.state_directory, io::checkpoint_file_name(n), false);
}

// --- reload and stop ---

void Daemon::reload() {
  ++counters_.reloads;
  systemd::reloading();
  spdlog::info("SIGHUP: reloading {}", cfg_.file);
  std::ifstream in(cfg_.file);
  std::ostringstream text;
  text << in.rdbuf();
  auto fail = [this](const std::string& why) {
    ++counters_.reload_failures;
    spdlog::error("reload refused, still running with the previous configuration: {}", why);
    systemd::ready(summary() + " (last reload refused)");
  };
  if (!in) return fail(cfg_.file + ": cannot read the configuration file");
  auto loaded = config::load_config(text.str(), cfg_.file);
  if (!loaded.ok()) {
    for (const auto& e : loaded.errors) spdlog::error("{}", e.to_string());
    return fail(std::to_string(loaded.errors.size()) + " problem(s) in " + cfg_.file);
  }
  config::Config next = std::move(loaded.config);
  next.state_directory = cfg_.state_directory;  // the state directory is fixed for the process's life
  if (ingest_.blocked()) return fail("the journal cannot be written; reload again once it can");
  const auto summary_changes = engine_.reconfigure(next);
  ingest_.set_config(next);
  spdlog::set_level(log_level(next.log_level));
  close_inputs();
  if (auto st = outputs_.reconfigure(next); !st) spdlog::error("reload: outputs: {}", st.error().message);
  if (auto st = open_inputs(next); !st) spdlog::error("reload: inputs: {}", st.error().message);
  drop_channel_configs(next);
  cfg_ = std::move(next);
  return_free_memory();
  spdlog::info("reloaded: {} channels kept, {} changed (their fits restart), {} added, {} removed",
               summary_changes.kept.size(), summary_changes.changed.size(), summary_changes.added.size(),
               summary_changes.removed.size());
  for (const auto& id : summary_changes.changed) spdlog::info("channel {}: configuration changed, fit restarted", id);
  systemd::ready(summary());
}

void Daemon::stop() {
  if (stopping_) return;
  stopping_ = true;
  systemd::stopping();
  boost::system::error_code ignored;
  signals_.cancel(ignored);
  tick_timer_.cancel();
  checkpoint_timer_.cancel();
  watchdog_timer_.cancel();
  retry_timer_.cancel();
  close_inputs();
  if (ingest_.blocked()) ingest_.retry_blocked();
  if (auto st = journal_.sync_now(); !st) spdlog::error("final journal sync: {}", st.error().message);
  checkpoint(true);
  journal_.close();
  outputs_.tick_minute(now());  // the count of rejects not logged since the last minute's summary
  outputs_.close();
  if (control_) control_->stop();
}

// --- control socket ---

std::string Daemon::summary() const {
  std::size_t alerts = 0;
  for (std::size_t i = 0; i < engine_.size(); ++i) alerts += engine_.channel(i).alert_raised() ? 1 : 0;
  return std::to_string(engine_.size()) + " channels, " + std::to_string(alerts) + " in drift alert, " +
         std::to_string(tcp_.size()) + " TCP and " + std::to_string(serial_.size()) + " serial inputs";
}

std::string Daemon::control_request(const std::string& request) {
  DaemonFacts facts;
  facts.version = version_string;
  facts.started = started_;
  facts.now = now();
  facts.state_directory = cfg_.state_directory;
  facts.journal_segment = journal_.segment();
  facts.journal_appended = journal_.appended_offset();
  facts.journal_durable = journal_.durable_offset();
  facts.journal_blocked = ingest_.blocked();
  facts.journal_error = ingest_.blocked_error();
  facts.checkpoint_number = checkpoint_number_;
  facts.checkpoint_time = checkpoint_time_;
  facts.historian_subscribers = outputs_.historian_subscribers();
  facts.streams = ingest_.streams();
  const protocol::ControlRequest req = protocol::parse_control_request(request);
  if (!req.ok) return req.error + "\n";
  auto dump = [](const nlohmann::ordered_json& j) {
    return j.dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace) + "\n";
  };
  switch (req.verb) {
    case protocol::ControlVerb::status: {
      if (req.channel.empty()) return dump(status_json(facts, counters_, engine_));
      const engine::ChannelEngine* ch = engine_.find(req.channel);
      if (!ch) return "ERR unknown_channel no channel '" + req.channel + "' is configured\n";
      return dump(channel_status_json(*ch));
    }
    case protocol::ControlVerb::metrics: return openmetrics_text(facts, counters_, engine_);
    case protocol::ControlVerb::reset:
      if (auto st = ingest_.reset_channel(req.channel, now()); !st) return "ERR reset " + st.error().message + "\n";
      spdlog::warn("channel {} reset through the control socket (as-left): fit, detectors and alert restart",
                   req.channel);
      return "OK reset " + req.channel + "\n";
    case protocol::ControlVerb::checkpoint:
      checkpoint(false);
      return "OK checkpoint requested\n";
  }
  return "ERR internal unhandled request\n";
}

int run(config::Config config) {
  try {
    Daemon daemon(std::move(config));
    return daemon.run();
  } catch (const std::exception& e) {
    spdlog::critical("internal error: {}", e.what());
    return exit_code::internal;
  }
}

}  // namespace rigcal::service
