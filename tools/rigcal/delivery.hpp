#pragma once
// What `rigcal send` and `rigcal simulate` share to deliver records to rigcald: the command-line
// options, the choice of pacing, the default stream name, the outcome of a delivery and how it is
// reported (the final line and the exit status).
#include <cstdint>
#include <optional>
#include <string>

#include "cli_support.hpp"
#include "pacer.hpp"
#include "rigcal/config/config.hpp"
#include "rigcal/protocol/sender_session.hpp"
#include "rigcal/result.hpp"

namespace rigcal::tool {

struct TcpTarget {
  std::string host;  // name or address; IPv6 addresses without brackets
  std::uint16_t port = 0;
  std::string text;  // as given, for messages
};

// HOST:PORT or [IPV6]:PORT, port 1..65535.
Result<TcpTarget> parse_tcp_target(const std::string& text);

// Line settings of a serial device, in the words and with the defaults of rigcald's serial inputs
// (config::SerialInput), so that both ends of a line can be set alike.
struct SerialLine {
  unsigned baud = 9600;
  unsigned data_bits = 8;
  config::Parity parity = config::Parity::none;
  config::StopBits stop_bits = config::StopBits::one;
  config::FlowControl flow_control = config::FlowControl::none;
};

struct DeliveryOptions {
  std::string tcp, serial;  // the target: exactly one for send; at most one for simulate
  std::optional<double> rate;
  bool as_fast_as_possible = false;
  // TCP
  std::string stream;
  std::string secret_file;
  double ack_timeout_s = 10;
  double give_up_after_s = 60;
  std::size_t max_unacknowledged = 10000;
  std::string max_unacknowledged_text = "10000";
  bool show_rejects = false;
  // serial
  SerialLine line;
  std::string parity_text = "none", stop_bits_text = "1", flow_control_text = "none";
};

// The options above as Program_options descriptions (pacing separately: simulate words its own).
po::options_description tcp_option_descriptions(DeliveryOptions& o);
po::options_description serial_option_descriptions(DeliveryOptions& o);
// Checks the parsed options (ranges, words, exclusive choices); on failure prints "rigcal COMMAND:
// ..." and returns exit_usage. `default_pacer` is used when neither --rate nor
// --as-fast-as-possible was given.
std::optional<int> check_delivery_options(const char* command, DeliveryOptions& o);
Pacer choose_pacer(const DeliveryOptions& o, Pacer default_pacer);

// Reads --secret-file: one word, surrounding blanks and the final newline ignored.
Result<std::string> read_secret_file(const std::string& path);

// A stream name (1-64 of A-Z a-z 0-9 _ . : / -) from parts joined by ':'. Other characters become
// '_'; a name too long keeps its start and ends in a hash of the whole, so that it stays distinct.
std::string stream_name_from(const std::string& joined_parts);
std::string host_name();

// How a delivery ended.
struct DeliveryResult {
  protocol::SenderCounts counts;   // TCP; for serial only `sent` is used
  std::uint64_t not_sent = 0;      // records of the source never written (gave up, interrupted)
  bool serial = false;
  bool interrupted = false;        // SIGINT / SIGTERM
  bool regressed = false;          // the server lost records it had acknowledged
  std::string failure;             // why the delivery stopped early (empty: it did not)
  int failure_status = 0;          // exit status for that failure (exit_unavailable, exit_io, ...)
};

// The final line: counts, and what they mean.
std::string summary_line(const std::string& source, const DeliveryResult& r);
// exit_ok only when every record was acknowledged (TCP) or written (serial): a failure's own
// status, else exit_unavailable for records not acknowledged, else exit_data for rejected ones.
int delivery_exit_status(const DeliveryResult& r);

}  // namespace rigcal::tool
