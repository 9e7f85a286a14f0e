#include "rigcal/engine/engine.hpp"

#include "rigcal/config/fingerprint.hpp"

namespace rigcal::engine {

Engine::Engine(const config::Config& cfg) : time_(cfg.time) {
  channels_.reserve(cfg.channels.size());
  for (const auto& c : cfg.channels)
    channels_.push_back(
        std::make_unique<ChannelEngine>(std::make_shared<const config::ChannelConfig>(c), time_, tables_));
  index();
}

void Engine::index() {
  by_id_.clear();
  by_id_.reserve(channels_.size());
  for (std::size_t i = 0; i < channels_.size(); ++i) by_id_.emplace(channels_[i]->config().id, i);
}

ChannelEngine* Engine::find(std::string_view id) {
  const auto it = by_id_.find(id);
  return it == by_id_.end() ? nullptr : channels_[it->second].get();
}

void Engine::tick(protocol::TimeNs now, EventSink& sink) {
  for (auto& c : channels_) c->tick(now, sink);
}

ReconfigureSummary Engine::reconfigure(const config::Config& cfg) {
  ReconfigureSummary summary;
  time_ = cfg.time;
  std::unordered_map<std::string, std::unique_ptr<ChannelEngine>> old;
  for (auto& c : channels_) old.emplace(c->config().id, std::move(c));
  channels_.clear();
  for (const auto& c : cfg.channels) {
    auto it = old.find(c.id);
    if (it != old.end() && it->second->fingerprint() == config::channel_fingerprint(c)) {
      it->second->set_time_rules(time_);
      channels_.push_back(std::move(it->second));
      summary.kept.push_back(c.id);
    } else {
      (it != old.end() ? summary.changed : summary.added).push_back(c.id);
      auto fresh = std::make_unique<ChannelEngine>(std::make_shared<const config::ChannelConfig>(c), time_, tables_);
      if (it != old.end()) fresh->set_calibration_version(it->second->calibration_version() + 1);
      channels_.push_back(std::move(fresh));
    }
    if (it != old.end()) old.erase(it);
  }
  for (auto& [id, engine] : old) summary.removed.push_back(id);
  index();
  return summary;
}

}  // namespace rigcal::engine
