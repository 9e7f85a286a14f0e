#pragma once
// All channels of a configuration, found by id. Reconfiguring keeps every channel whose
// configuration is unchanged (same fingerprint) with its state; a changed channel restarts its fit
// with a new calibration version; a removed channel's state is dropped.
#include <memory>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "rigcal/config/config.hpp"
#include "rigcal/engine/channel_engine.hpp"
#include "rigcal/engine/engine_tables.hpp"

namespace rigcal::engine {

struct ReconfigureSummary {
  std::vector<std::string> kept, changed, added, removed;
};

class Engine {
 public:
  explicit Engine(const config::Config& cfg);

  // nullptr when no channel has this id.
  ChannelEngine* find(std::string_view id);
  std::size_t size() const { return channels_.size(); }
  ChannelEngine& channel(std::size_t i) { return *channels_[i]; }
  const ChannelEngine& channel(std::size_t i) const { return *channels_[i]; }

  void tick(protocol::TimeNs now, EventSink& sink);
  ReconfigureSummary reconfigure(const config::Config& cfg);

  EngineTables& tables() { return tables_; }

 private:
  void index();

  EngineTables tables_;
  config::TimeRules time_;
  std::vector<std::unique_ptr<ChannelEngine>> channels_;
  // The keys view the ids in the channels' own configurations, so that no id is stored twice;
  // index() rebuilds the map whenever channels_ changes.
  std::unordered_map<std::string_view, std::size_t> by_id_;
};

}  // namespace rigcal::engine
