#include "progress_line.hpp"

#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <fmt/format.h>

namespace rigcal::tool {

namespace {
std::string duration_text(double s) {
  const auto total = static_cast<long long>(s + 0.5);
  if (total >= 3600) return fmt::format("{}h{:02}m", total / 3600, total % 3600 / 60);
  if (total >= 60) return fmt::format("{}m{:02}s", total / 60, total % 60);
  return fmt::format("{}s", total);
}
}  // namespace

ProgressLine::ProgressLine() : enabled_(isatty(STDERR_FILENO) == 1), started_(Clock::now()), last_draw_(started_) {}

void ProgressLine::update(const ProgressFigures& f, Clock::time_point now) {
  if (!enabled_) return;
  const double dt = std::chrono::duration<double>(now - last_draw_).count();
  if (shown_ && dt < 0.25) return;
  if (dt > 0) {
    const double instant = static_cast<double>(f.done - last_done_) / dt;
    // Exponential smoothing with a time constant of a second keeps the ETA from jumping with each
    // coalesced ACK while following a change of pace quickly.
    rate_per_s_ = shown_ ? rate_per_s_ + (1 - std::exp(-dt)) * (instant - rate_per_s_) : instant;
  }
  last_draw_ = now;
  last_done_ = f.done;
  std::string line = f.acknowledgements
                         ? fmt::format("sent {}  acknowledged {}  rejected {}", f.sent, f.acknowledged, f.rejected)
                         : fmt::format("written {}", f.sent);
  if (f.total) line += fmt::format(" of {}", *f.total);
  line += fmt::format("  {:.0f} records/s", rate_per_s_);
  if (f.total && rate_per_s_ > 0 && *f.total > f.done)
    line += "  ETA " + duration_text(static_cast<double>(*f.total - f.done) / rate_per_s_);
  std::fprintf(stderr, "\r\x1b[K%s", line.c_str());
  std::fflush(stderr);
  shown_ = true;
}

void ProgressLine::clear() {
  if (!enabled_ || !shown_) return;
  std::fprintf(stderr, "\r\x1b[K");
  std::fflush(stderr);
  shown_ = false;
}

}  // namespace rigcal::tool
