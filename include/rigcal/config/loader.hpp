#pragma once
// Loads and validates rigcald's YAML configuration in one pass into an immutable Config.
//
// Strict: unknown keys are refused (with "did you mean"), duplicate keys too, numbers must parse
// completely and lie in their documented range, enumerations take only their listed words, and
// nothing is clamped or "fixed" silently. Every problem found is reported, each as
//   FILE:LINE:COLUMN: PATH: what was expected (and what was found)
// This is text in, value out: the loader opens no file (the caller reads it) and no socket.
#include <string>
#include <string_view>
#include <vector>

#include "rigcal/config/config.hpp"
#include "rigcal/config/fingerprint.hpp"

namespace rigcal::config {

struct ConfigError {
  std::string file;
  int line = 0;    // 1-based; 0 when not tied to a place in the file
  int column = 0;  // 1-based
  std::string path;  // e.g. channels[2].fit.window_pairs
  std::string message;
  std::string to_string() const;
};

struct LoadResult {
  Config config;                    // meaningful only when errors is empty
  std::vector<ConfigError> errors;  // every problem found, in file order
  bool ok() const { return errors.empty(); }
};

LoadResult load_config(std::string_view yaml_text, const std::string& file_name);

}  // namespace rigcal::config
