#pragma once
// sd_notify(3) messages to systemd (no-ops when not started by systemd): READY=1 once the inputs are
// open, RELOADING=1 with MONOTONIC_USEC during a reload, STOPPING=1, STATUS=..., and WATCHDOG=1 at
// half the WATCHDOG_USEC interval.
#include <cstdint>
#include <string>

namespace rigcal::service::systemd {

void ready(const std::string& status);
void reloading();
void stopping();
void status(const std::string& text);
void watchdog();
// Half of the watchdog interval in microseconds, or 0 when the watchdog is off.
std::uint64_t watchdog_ping_interval_us();

}  // namespace rigcal::service::systemd
