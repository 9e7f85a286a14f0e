#include "delivery.hpp"

#include <unistd.h>

#include <charconv>
#include <climits>
#include <fmt/format.h>
#include <iostream>

#include "rigcal/protocol/auth_secret.hpp"
#include "rigcal/protocol/record.hpp"

namespace rigcal::tool {

Result<TcpTarget> parse_tcp_target(const std::string& text) {
  TcpTarget t;
  t.text = text;
  std::string port;
  if (!text.empty() && text.front() == '[') {
    const auto close = text.find(']');
    if (close == std::string::npos || close + 1 >= text.size() || text[close + 1] != ':')
      return Error{"'" + text + "' is not HOST:PORT or [IPV6]:PORT"};
    t.host = text.substr(1, close - 1);
    port = text.substr(close + 2);
  } else {
    const auto colon = text.rfind(':');
    if (colon == std::string::npos || text.find(':') != colon)
      return Error{"'" + text + "' is not HOST:PORT (write an IPv6 address as [ADDRESS]:PORT)"};
    t.host = text.substr(0, colon);
    port = text.substr(colon + 1);
  }
  unsigned value = 0;
  const auto [end, ec] = std::from_chars(port.data(), port.data() + port.size(), value);
  if (t.host.empty()) return Error{"'" + text + "' has no host"};
  if (port.empty() || ec != std::errc{} || end != port.data() + port.size() || value < 1 || value > 65535)
    return Error{"'" + text + "': the port must be a number from 1 to 65535"};
  t.port = static_cast<std::uint16_t>(value);
  return t;
}

po::options_description tcp_option_descriptions(DeliveryOptions& o) {
  po::options_description d("TCP (the line protocol's sessions: acknowledged, resent after a lost connection)");
  d.add_options()
      ("stream", po::value(&o.stream), "stream name sent in HELLO (default: derived from this host and the source)")
      ("secret-file", po::value(&o.secret_file), "file holding the listener's shared secret (sent as AUTH)")
      ("ack-timeout", po::value(&o.ack_timeout_s)->default_value(10),
       "seconds to wait for acknowledgements: after the last record, then give up; while sending, "
       "drop the silent connection and reconnect")
      ("give-up-after", po::value(&o.give_up_after_s)->default_value(60),
       "seconds without a working connection before giving up")
      ("max-unacknowledged", po::value(&o.max_unacknowledged_text)->default_value("10000"),
       "records held for resending; sending pauses when this many are unacknowledged")
      ("show-rejects", po::bool_switch(&o.show_rejects), "print each rejected record with the server's reason");
  return d;
}

po::options_description serial_option_descriptions(DeliveryOptions& o) {
  po::options_description d("serial (no acknowledgements exist on a serial line: records are written and counted)");
  d.add_options()
      ("baud", po::value(&o.line.baud)->default_value(9600), "line speed, bit/s")
      ("data-bits", po::value(&o.line.data_bits)->default_value(8), "character size, 5..8")
      ("parity", po::value(&o.parity_text)->default_value("none"), "none, odd or even")
      ("stop-bits", po::value(&o.stop_bits_text)->default_value("1"), "1 or 2")
      ("flow-control", po::value(&o.flow_control_text)->default_value("none"),
       "none, software (XON/XOFF) or hardware (RTS/CTS)");
  return d;
}

std::optional<int> check_delivery_options(const char* command, DeliveryOptions& o) {
  auto usage = [&](const std::string& message) {
    std::cerr << "rigcal " << command << ": " << message << "\n";
    return std::optional<int>(exit_usage);
  };
  if (!o.tcp.empty() && !o.serial.empty()) return usage("give --tcp or --serial, not both");
  if (o.rate && o.as_fast_as_possible) return usage("give --rate or --as-fast-as-possible, not both");
  if (o.rate && !(*o.rate > 0 && *o.rate < 1e9)) return usage("--rate must be a number of records per second above 0");
  if (!(o.ack_timeout_s > 0)) return usage("--ack-timeout must be a number of seconds above 0");
  if (!(o.give_up_after_s > 0)) return usage("--give-up-after must be a number of seconds above 0");
  const auto window = parse_count(o.max_unacknowledged_text);
  if (!window || *window < 1 || *window > 100'000'000)
    return usage("--max-unacknowledged must be a whole number from 1 to 100000000, got '" +
                 o.max_unacknowledged_text + "'");
  o.max_unacknowledged = static_cast<std::size_t>(*window);
  if (!o.stream.empty() && !protocol::is_valid_channel_name(o.stream))
    return usage("--stream '" + o.stream + "' must be 1-64 characters from A-Z a-z 0-9 _ . : / -");
  if (o.line.data_bits < 5 || o.line.data_bits > 8) return usage("--data-bits must be 5, 6, 7 or 8");
  using config::FlowControl, config::Parity, config::StopBits;
  if (o.stop_bits_text == "1") o.line.stop_bits = StopBits::one;
  else if (o.stop_bits_text == "2") o.line.stop_bits = StopBits::two;
  else if (o.stop_bits_text == "1.5") return usage("--stop-bits 1.5 cannot be set through a POSIX serial driver");
  else return usage("--stop-bits must be 1 or 2, got '" + o.stop_bits_text + "'");
  if (o.parity_text == "none") o.line.parity = Parity::none;
  else if (o.parity_text == "odd") o.line.parity = Parity::odd;
  else if (o.parity_text == "even") o.line.parity = Parity::even;
  else return usage("--parity must be none, odd or even, got '" + o.parity_text + "'");
  if (o.flow_control_text == "none") o.line.flow_control = FlowControl::none;
  else if (o.flow_control_text == "software") o.line.flow_control = FlowControl::software;
  else if (o.flow_control_text == "hardware") o.line.flow_control = FlowControl::hardware;
  else return usage("--flow-control must be none, software or hardware, got '" + o.flow_control_text + "'");
  return std::nullopt;
}

Pacer choose_pacer(const DeliveryOptions& o, Pacer default_pacer) {
  if (o.rate) return Pacer::rate(*o.rate);
  if (o.as_fast_as_possible) return Pacer::as_fast_as_possible();
  return default_pacer;
}

Result<std::string> read_secret_file(const std::string& path) {
  std::string error;
  auto text = read_text_file(path, error);
  if (!text) return Error{error};
  return protocol::auth_secret_from_text(*text, path);
}

namespace {
bool stream_char(char c) {
  return (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' || c == '.' ||
         c == ':' || c == '/' || c == '-';
}
}  // namespace

std::string stream_name_from(const std::string& joined_parts) {
  std::string s = joined_parts;
  for (char& c : s)
    if (!stream_char(c)) c = '_';
  if (s.empty()) s = "rigcal";
  if (s.size() <= protocol::max_channel_name_bytes) return s;
  std::uint64_t h = 14695981039346656037ull;  // FNV-1a: stable across runs and machines
  for (unsigned char c : joined_parts) h = (h ^ c) * 1099511628211ull;
  return s.substr(0, protocol::max_channel_name_bytes - 17) + "-" + fmt::format("{:016x}", h);
}

std::string host_name() {
  char buf[HOST_NAME_MAX + 1] = {};
  if (gethostname(buf, sizeof buf - 1) != 0 || buf[0] == '\0') return "localhost";
  std::string h = buf;
  return h.substr(0, h.find('.'));  // the short name: stable if the domain changes
}

std::string summary_line(const std::string& source, const DeliveryResult& r) {
  const auto& c = r.counts;
  if (r.serial) {
    std::string s = fmt::format("{}: {} written", source, c.sent);
    if (r.not_sent > 0) s += fmt::format(", {} not written", r.not_sent);
    return s + " (a serial line has no acknowledgements)";
  }
  const std::uint64_t failed = c.abandoned + r.not_sent;
  std::string s = fmt::format("{}: {} sent, {} acknowledged, {} rejected, {} failed", source, c.sent,
                              c.acknowledged, c.rejected, failed);
  std::string notes;
  auto note = [&](const std::string& n) { notes += (notes.empty() ? "" : ", ") + n; };
  if (c.already_held > 0) note(fmt::format("{} already held by the server", c.already_held));
  if (c.resent > 0) note(fmt::format("{} resent after reconnecting", c.resent));
  if (c.abandoned > 0) note(fmt::format("{} sent but not acknowledged", c.abandoned));
  if (r.not_sent > 0) note(fmt::format("{} never sent", r.not_sent));
  return notes.empty() ? s : s + " (" + notes + ")";
}

int delivery_exit_status(const DeliveryResult& r) {
  if (!r.failure.empty() && r.failure_status != 0) return r.failure_status;
  if (r.counts.abandoned > 0 || r.not_sent > 0 || r.regressed) return exit_unavailable;
  if (r.counts.rejected > 0) return exit_data;
  return exit_ok;
}

}  // namespace rigcal::tool
