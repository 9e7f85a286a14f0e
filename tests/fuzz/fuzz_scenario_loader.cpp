// Any text as a simulation scenario (rigcal simulate): problems reported, never a crash.
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "rigcal/sim/scenario_loader.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  const auto result = rigcal::sim::load_scenario(text, "fuzz-scenario.yaml");
  for (const auto& e : result.errors)
    if (e.file != "fuzz-scenario.yaml") std::abort();
  return 0;
}
