#pragma once
#include "rigcal/config/config.hpp"

namespace rigcal::service {

// Runs the daemon until SIGTERM/SIGINT; returns the process exit status (exit_codes.hpp).
int run(config::Config config);

}  // namespace rigcal::service
