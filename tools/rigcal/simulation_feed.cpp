#include "simulation_feed.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

namespace rigcal::tool {

namespace {
std::string value_text(double v, int decimals) {
  // fmt's default for a double is the shortest text that reads back to the same value.
  return decimals < 0 ? fmt::format("{}", v) : fmt::format("{:.{}f}", v, decimals);
}
}  // namespace

std::string format_sim_record(const sim::Scenario& s, const sim::SimRecord& r, bool arrival_time) {
  const sim::ChannelModel& c = s.channels[r.channel];
  const sim::ValueDecimals d = sim::emitted_decimals(c);
  const std::string time = arrival_time ? std::string("-") : protocol::format_rfc3339(r.time, 3);
  if (r.kind == sim::SimRecord::Kind::pair)
    return fmt::format("P {} {} {} {}", c.id, time, value_text(r.reference, d.reference), value_text(r.sensor, d.sensor));
  return fmt::format("R {} {} {}", c.id, time, value_text(r.sensor, d.sensor));
}

SimulationFeed::SimulationFeed(const sim::Scenario& scenario, std::uint64_t seed, protocol::TimeNs start_ns,
                               SimulationLimits limits, bool arrival_time)
    : sim_(scenario, seed, start_ns), limits_(limits), arrival_time_(arrival_time) {}

Result<std::optional<FeedItem>> SimulationFeed::next() {
  if (done_ || (limits_.records && emitted_ >= *limits_.records)) return std::optional<FeedItem>();
  auto r = sim_.next();
  if (!r) {
    done_ = true;
    return r.error();
  }
  if (limits_.duration_s) {
    const double elapsed_s = static_cast<double>(r->time - sim_.start_ns()) / 1e9;
    if (elapsed_s >= *limits_.duration_s) {
      done_ = true;
      return std::optional<FeedItem>();
    }
  }
  FeedItem item;
  item.seq = ++emitted_;
  item.origin = item.seq;
  item.text = format_sim_record(sim_.scenario(), *r, arrival_time_);
  item.sim_time = r->time;
  return std::optional<FeedItem>(std::move(item));
}

std::optional<std::uint64_t> SimulationFeed::expected_total() const {
  std::optional<std::uint64_t> n = limits_.records;
  if (limits_.duration_s) {
    const std::uint64_t slots = sim::Simulator::scheduled_slots(sim_.scenario(), *limits_.duration_s);
    n = n ? std::min(*n, slots) : slots;
  }
  return n;
}

}  // namespace rigcal::tool
