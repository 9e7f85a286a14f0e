#pragma once
// Writing a feed of records to a file descriptor, paced: a record file or standard output
// (rigcal simulate) and a serial device (rigcal send, rigcal simulate). Nothing is acknowledged on
// these, so "delivered" means written. Lines are batched while records are due, so writing as fast
// as possible costs a system call per 64 KiB, not per record.
#include <string>

#include "delivery.hpp"
#include "pacer.hpp"
#include "progress_line.hpp"
#include "record_feed.hpp"

namespace rigcal::tool {

struct LineWriterSettings {
  std::string target;      // for messages: the file or device
  bool with_seq = false;   // prefix every record with @SEQ (serial: the daemon's sequence checks)
  std::string header;      // written first, verbatim (e.g. a comment line)
  bool stop_on_signal = false;  // SIGINT/SIGTERM end the run with a summary instead of killing it
};

// Writes every record of `feed` to fd. The result has counts.sent = records written; a write error
// or a feed error ends it early with failure set (exit_io, exit_data).
DeliveryResult write_lines(int fd, const LineWriterSettings& settings, RecordFeed& feed, Pacer pacer,
                           ProgressLine* progress);

// Opens a serial device for writing with the given line settings (raw mode: bytes go out as they
// are). Returns the descriptor, or an Error naming the device.
Result<int> open_serial_device(const std::string& device, const SerialLine& line);

// True if `baud` is a speed the serial driver interface can set.
bool supported_baud(unsigned baud);

}  // namespace rigcal::tool
