// rigcal send: replays a record file to rigcald, over TCP (acknowledged, resumable) or a serial line.
#include <filesystem>
#include <iostream>

#include "cli_support.hpp"
#include "delivery.hpp"
#include "delivery_run.hpp"
#include "record_file_feed.hpp"

namespace rigcal::tool {

namespace {

const char* send_description =
    "Sends every record of FILE (blank lines and # comments are skipped; the rest is sent verbatim),\n"
    "each prefixed with @SEQ, its record number in the file.\n"
    "\n"
    "TCP: the connection opens with AUTH (with --secret-file) and HELLO STREAM. Records stay held until\n"
    "the daemon acknowledges them; after a lost connection rigcal reconnects with backoff, drops what\n"
    "the daemon already has (its LAST) and resends the rest, so nothing is lost or duplicated. Run it\n"
    "again on the same file and stream and it sends only what the daemon does not have.\n"
    "Serial: no acknowledgements exist on a serial line; records are written with the line settings\n"
    "below and counted as written.\n"
    "\n"
    "On a terminal, one updating line shows progress; otherwise nothing is printed until the final\n"
    "line: sent, acknowledged, rejected and failed counts.\n"
    "Exit status: 0 when every record was acknowledged (TCP) or written (serial); 65 when the daemon\n"
    "rejected records (REJ); 69 when records were not acknowledged, or the daemon or device could not\n"
    "be reached; 64 for a bad command line; 66 when FILE cannot be read.\n";

}  // namespace

int run_send(const Args& args) {
  std::string file;
  DeliveryOptions o;
  po::options_description options("options");
  options.add_options()
      ("file", po::value(&file)->required(), "record file")
      ("tcp", po::value(&o.tcp), "send to rigcald's TCP listener at HOST:PORT ([IPV6]:PORT)")
      ("serial", po::value(&o.serial), "write to the serial DEVICE")
      ("rate", po::value<double>(), "records per second (default: as fast as the daemon acknowledges)")
      ("as-fast-as-possible", po::bool_switch(&o.as_fast_as_possible), "no pacing (the default)");
  options.add(tcp_option_descriptions(o)).add(serial_option_descriptions(o));
  po::positional_options_description positional;
  positional.add("file", 1);
  po::variables_map vm;
  if (auto done = parse_command_line("send", "FILE --tcp HOST:PORT | --serial DEVICE [options]", args, options,
                                     positional, vm, send_description))
    return *done;
  if (vm.count("rate")) o.rate = vm["rate"].as<double>();
  if (o.tcp.empty() && o.serial.empty()) {
    std::cerr << "rigcal send: give --tcp HOST:PORT or --serial DEVICE\n";
    return exit_usage;
  }
  if (auto bad = check_delivery_options("send", o)) return *bad;

  RecordFileFeed::OpenError error;
  auto feed = RecordFileFeed::open(file, error);
  if (!feed) {
    std::cerr << "rigcal send: " << error.message << "\n";
    return error.unreadable ? exit_no_input : exit_data;
  }
  DeliveryPlan plan{"send", file, o, stream_name_from(host_name() + ":" + std::filesystem::path(file).filename().string()),
                    choose_pacer(o, Pacer::as_fast_as_possible())};
  return run_delivery(plan, *feed, vm);
}

}  // namespace rigcal::tool
