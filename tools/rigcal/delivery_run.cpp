#include "delivery_run.hpp"

#include <termios.h>
#include <unistd.h>

#include <iostream>

#include "line_writer.hpp"
#include "progress_line.hpp"
#include "tcp_delivery.hpp"

namespace rigcal::tool {

namespace {

// Options that only mean something for the other kind of target are refused rather than ignored.
std::optional<std::string> misplaced_option(const po::variables_map& vm, bool tcp) {
  const char* tcp_only[] = {"stream", "secret-file", "ack-timeout", "give-up-after", "max-unacknowledged"};
  const char* serial_only[] = {"baud", "data-bits", "parity", "stop-bits", "flow-control"};
  for (const char* name : tcp ? serial_only : tcp_only)
    if (vm.count(name) && !vm[name].defaulted())
      return std::string("--") + name + (tcp ? " applies to --serial only" : " applies to --tcp only");
  if (!tcp && vm.count("show-rejects") && vm["show-rejects"].as<bool>())
    return std::string("--show-rejects applies to --tcp only (a serial line has no replies)");
  return std::nullopt;
}

int report(const DeliveryPlan& plan, const DeliveryResult& r) {
  if (!r.failure.empty()) std::cerr << "rigcal " << plan.command << ": " << r.failure << "\n";
  std::cout << "rigcal " << plan.command << ": " << summary_line(plan.source, r) << std::endl;
  return delivery_exit_status(r);
}

int run_tcp(const DeliveryPlan& plan, RecordFeed& feed) {
  const DeliveryOptions& o = plan.options;
  auto target = parse_tcp_target(o.tcp);
  if (!target) {
    std::cerr << "rigcal " << plan.command << ": --tcp " << target.error().message << "\n";
    return exit_usage;
  }
  TcpDeliverySettings s;
  s.target = *target;
  s.stream = o.stream.empty() ? plan.stream : o.stream;
  if (!o.secret_file.empty()) {
    auto secret = read_secret_file(o.secret_file);
    if (!secret) {
      std::cerr << "rigcal " << plan.command << ": --secret-file " << secret.error().message << "\n";
      return exit_no_input;
    }
    s.secret = *secret;
  }
  s.ack_timeout_s = o.ack_timeout_s;
  s.give_up_after_s = o.give_up_after_s;
  s.max_unacknowledged = o.max_unacknowledged;
  s.show_rejects = o.show_rejects;
  s.command = plan.command;
  asio::io_context io;
  ProgressLine progress;
  TcpDelivery delivery(io, s, feed, plan.pacer, progress);
  delivery.start();
  io.run();
  return report(plan, delivery.result());
}

int run_serial(const DeliveryPlan& plan, RecordFeed& feed) {
  const DeliveryOptions& o = plan.options;
  if (!supported_baud(o.line.baud)) {
    std::cerr << "rigcal " << plan.command << ": --baud " << o.line.baud
              << " is not a standard speed (e.g. 9600, 19200, 38400, 57600, 115200)\n";
    return exit_usage;
  }
  auto fd = open_serial_device(o.serial, o.line);
  if (!fd) {
    std::cerr << "rigcal " << plan.command << ": " << fd.error().message << "\n";
    return exit_unavailable;
  }
  ProgressLine progress;
  LineWriterSettings s;
  s.target = o.serial;
  s.with_seq = true;
  s.stop_on_signal = true;
  DeliveryResult r = write_lines(*fd, s, feed, plan.pacer, &progress);
  // Wait until the bytes are on the line, so that the count printed is what left the port.
  tcdrain(*fd);
  ::close(*fd);
  if (r.interrupted && r.failure.empty()) {
    r.failure = "interrupted";
    r.failure_status = exit_unavailable;
  }
  return report(plan, r);
}

}  // namespace

int run_delivery(const DeliveryPlan& plan, RecordFeed& feed, const po::variables_map& vm) {
  const bool tcp = !plan.options.tcp.empty();
  if (auto m = misplaced_option(vm, tcp)) {
    std::cerr << "rigcal " << plan.command << ": " << *m << "\n";
    return exit_usage;
  }
  return tcp ? run_tcp(plan, feed) : run_serial(plan, feed);
}

}  // namespace rigcal::tool
