#include "systemd_notify.hpp"

#include <systemd/sd-daemon.h>
#include <time.h>

namespace rigcal::service::systemd {

void ready(const std::string& s) { sd_notifyf(0, "READY=1\nSTATUS=%s", s.c_str()); }

void reloading() {
  timespec ts{};
  clock_gettime(CLOCK_MONOTONIC, &ts);
  const unsigned long long usec =
      static_cast<unsigned long long>(ts.tv_sec) * 1000000ull + static_cast<unsigned long long>(ts.tv_nsec) / 1000ull;
  sd_notifyf(0, "RELOADING=1\nMONOTONIC_USEC=%llu", usec);
}

void stopping() { sd_notify(0, "STOPPING=1\nSTATUS=stopping: draining inputs and writing a checkpoint"); }
void status(const std::string& text) { sd_notifyf(0, "STATUS=%s", text.c_str()); }
void watchdog() { sd_notify(0, "WATCHDOG=1"); }

std::uint64_t watchdog_ping_interval_us() {
  uint64_t usec = 0;
  if (sd_watchdog_enabled(0, &usec) <= 0) return 0;
  return usec / 2;
}

}  // namespace rigcal::service::systemd
