// Any bytes as a checkpoint file, and (to get past the checksum) any bytes as a checkpoint body with
// a correct CRC appended. Byte 0 chooses: even = the bytes as they are, odd = body + its CRC-32C.
// A checkpoint that decodes has its channel blobs loaded into the channels of the example
// configuration; a blob that loads must leave an engine that takes pairs and ticks without crashing.
#include <cstdint>
#include <cstdlib>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>
#include <string_view>

#include "rigcal/config/loader.hpp"
#include "rigcal/engine/engine.hpp"
#include "rigcal/state/binary_codec.hpp"
#include "rigcal/state/checkpoint_format.hpp"
#include "rigcal/state/crc32c.hpp"

namespace {
const rigcal::config::Config& example_config() {
  static const rigcal::config::Config cfg = [] {
    std::ifstream in(RIGCAL_SOURCE_DIR "/config/rigcald.yaml");
    std::ostringstream text;
    text << in.rdbuf();
    auto loaded = rigcal::config::load_config(text.str(), "rigcald.yaml");
    if (!loaded.ok() || loaded.config.channels.empty()) std::abort();
    return loaded.config;
  }();
  return cfg;
}
}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size < 1) return 0;
  std::string bytes(reinterpret_cast<const char*>(data + 1), size - 1);
  if (data[0] & 1) {
    const std::uint32_t crc = rigcal::state::crc32c(bytes);
    bytes.append(reinterpret_cast<const char*>(&crc), 4);
  }
  const auto decoded = rigcal::state::decode_checkpoint(bytes);
  if (!decoded) return 0;
  rigcal::engine::Engine engine(example_config());
  rigcal::engine::NullSink sink;
  const auto& cp = decoded.value();
  for (std::size_t i = 0; i < cp.channels.size() && i < 8; ++i) {
    rigcal::engine::ChannelEngine& ch = engine.channel(i % engine.size());
    rigcal::state::BinaryReader r(cp.channels[i].blob);
    if (!ch.load(r)) {
      ch.restart_fresh();
      continue;
    }
    const std::int64_t t = ch.last_time().value_or(0);
    for (int k = 0; k < 5; ++k) ch.on_pair(t + k * 1'000'000'000LL, 20.0 + 10 * k, 20.1 + 10 * k, sink);
    ch.on_reading(t + 6'000'000'000LL, 55.0, sink);
    ch.tick(t + 7'000'000'000LL, sink);
    (void)ch.fit_summary();
    (void)ch.calibration();
  }
  return 0;
}
