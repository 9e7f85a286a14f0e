#pragma once
// Reads a simulation scenario from YAML text, as strictly as rigcald's configuration is read: unknown
// and duplicate keys refused (with "did you mean"), numbers parsed completely and range-checked, keys
// that belong to another fault or raw-signal kind refused, and check_scenario's problems reported at
// their place in the file. Every problem is reported, each as FILE:LINE:COLUMN: PATH: message
// (config::ConfigError). Text in, value out: the caller reads the file.
//
// The format is documented in the comment header of config/demo-scenario.yaml.
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/config/loader.hpp"
#include "rigcal/sim/scenario.hpp"

namespace rigcal::sim {

struct ScenarioLoadResult {
  Scenario scenario;                        // meaningful only when errors is empty
  std::vector<config::ConfigError> errors;  // in file order
  bool ok() const { return errors.empty(); }
};

ScenarioLoadResult load_scenario(std::string_view yaml_text, const std::string& file_name);

}  // namespace rigcal::sim
