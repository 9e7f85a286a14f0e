#pragma once
// What the schema gives besides reading: the configuration reference and channel fingerprints.
#include <cstdint>
#include <string>

#include "rigcal/config/config.hpp"

namespace rigcal::config {

// The configuration reference (Markdown), generated from the same schema the loader reads with.
std::string config_reference_markdown();

// A fingerprint of one channel's configuration: equal fingerprints mean an identical channel, so a
// reload (or a restart) keeps its state; any difference restarts its fit.
std::uint64_t channel_fingerprint(const ChannelConfig& c);

}  // namespace rigcal::config
