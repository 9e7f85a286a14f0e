// rigcal_journal_writer: writes rigcald journal segments from a small script, so that integration
// tests can build a state directory without running the daemon. Test-only; not installed.
//
//   rigcal_journal_writer STATE_DIR < script
//
// Script lines (blank lines and '#' comments ignored; TIME is RFC 3339 UTC or epoch seconds):
//   segment NUMBER [archive]   start segment NUMBER (in STATE_DIR/archive/ with "archive")
//   pair CHANNEL TIME X Y      a reference/sensor pair (raw values)
//   reading CHANNEL TIME Y     a sensor reading
//   reset CHANNEL TIME         an operator reset (as-left)
//   frame                      close the pending entries into one frame (also done by segment/end)
//   garbage N                  N bytes that are no frame (the reader must skip them)
//   torn                       a frame header promising more bytes than the segment holds
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string>

#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/state/journal_format.hpp"

namespace {

namespace fs = std::filesystem;
using rigcal::protocol::TimeNs;

struct Writer {
  fs::path dir;
  fs::path path;
  std::string bytes;
  rigcal::state::JournalEncoder encoder;

  void flush_segment() {
    encoder.finish_frame(bytes);
    if (path.empty()) return;
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out << bytes;
    if (!out) throw std::runtime_error(path.string() + ": cannot write");
    bytes.clear();
  }
};

TimeNs parse_time(const std::string& text) {
  const auto t = rigcal::protocol::parse_timestamp(text);
  if (!t.time) throw std::runtime_error("bad time '" + text + "': " + t.error.reason);
  return *t.time;
}

void run_line(Writer& w, const std::string& line) {
  std::istringstream in(line);
  std::string op;
  in >> op;
  if (op.empty() || op[0] == '#') return;
  std::string channel, time;
  if (op == "segment") {
    w.flush_segment();
    unsigned long long number = 0;
    std::string where;
    in >> number;
    if (!(in >> where)) in.clear();  // the folder is optional
    const fs::path folder = where == "archive" ? w.dir / "archive" : w.dir;
    fs::create_directories(folder);
    char name[48];
    std::snprintf(name, sizeof name, "journal-%016llu.rgj", number);
    w.path = folder / name;
    w.encoder.start_segment();
  } else if (op == "pair") {
    double x = 0, y = 0;
    in >> channel >> time >> x >> y;
    w.encoder.pair(channel, "", 0, parse_time(time), x, y);
  } else if (op == "reading") {
    double y = 0;
    in >> channel >> time >> y;
    w.encoder.reading(channel, "", 0, parse_time(time), y);
  } else if (op == "reset") {
    in >> channel >> time;
    w.encoder.reset(channel, parse_time(time));
  } else if (op == "frame") {
    w.encoder.finish_frame(w.bytes);
  } else if (op == "garbage") {
    std::size_t n = 0;
    in >> n;
    w.encoder.finish_frame(w.bytes);
    w.bytes.append(n, '\x5a');
  } else if (op == "torn") {
    w.encoder.finish_frame(w.bytes);
    const std::uint32_t header[3] = {rigcal::state::journal_magic, 4096, 0};
    w.bytes.append(reinterpret_cast<const char*>(header), sizeof header);
    w.bytes.append(10, '\0');
  } else {
    throw std::runtime_error("unknown script command '" + op + "'");
  }
  if (in.fail()) throw std::runtime_error("malformed line: " + line);
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 2) {
    std::cerr << "usage: rigcal_journal_writer STATE_DIR < script\n";
    return 64;
  }
  try {
    Writer w;
    w.dir = argv[1];
    fs::create_directories(w.dir);
    std::string line;
    for (int n = 1; std::getline(std::cin, line); ++n) {
      try {
        run_line(w, line);
      } catch (const std::exception& e) {
        throw std::runtime_error("script line " + std::to_string(n) + ": " + e.what());
      }
    }
    w.flush_segment();
  } catch (const std::exception& e) {
    std::cerr << "rigcal_journal_writer: " << e.what() << "\n";
    return 65;
  }
  return 0;
}
