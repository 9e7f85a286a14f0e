#pragma once
// rigcald's exit statuses: each failed start-up stage has its own (sysexits.h values), so a
// supervisor or a person can tell what failed; a failed start never exits 0.
namespace rigcal::service::exit_code {
inline constexpr int ok = 0;
inline constexpr int usage = 64;         // EX_USAGE: bad command line
inline constexpr int internal = 70;      // EX_SOFTWARE: an unexpected internal error
inline constexpr int state_dir = 73;     // EX_CANTCREAT: state directory missing or not writable
inline constexpr int restore = 74;       // EX_IOERR: checkpoint/journal could not be read back
inline constexpr int open_io = 75;       // EX_TEMPFAIL: a listener, port or output could not be opened
inline constexpr int config = 78;        // EX_CONFIG: configuration invalid
}  // namespace rigcal::service::exit_code
