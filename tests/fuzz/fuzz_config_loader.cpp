// Any text as rigcald's YAML configuration: the loader reports problems, never crashes, and every
// problem it reports names the file.
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "rigcal/config/loader.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  const auto result = rigcal::config::load_config(text, "fuzz.yaml");
  for (const auto& e : result.errors)
    if (e.file != "fuzz.yaml" || e.to_string().empty()) std::abort();
  return 0;
}
