#pragma once
// Running a delivery to its target and reporting it: the part of `send` and `simulate` after their
// own options have been read.
#include <string>

#include "delivery.hpp"
#include "record_feed.hpp"

namespace rigcal::tool {

struct DeliveryPlan {
  const char* command;       // "send" or "simulate"
  std::string source;        // for the final line: the file or the scenario
  DeliveryOptions options;   // checked: exactly one of tcp, serial set
  std::string stream;        // TCP stream name to use when --stream is not given
  Pacer pacer = Pacer::as_fast_as_possible();
};

// Checks the target-specific options, delivers every record of `feed`, prints the failure (stderr)
// and the final line (stdout), and returns the exit status.
int run_delivery(const DeliveryPlan& plan, RecordFeed& feed, const po::variables_map& vm);

}  // namespace rigcal::tool
