// ChannelEngine::save / load: the checkpoint layout of one channel. Version it when it changes.
#include "rigcal/engine/channel_engine.hpp"

namespace rigcal::engine {

namespace {
constexpr std::uint32_t channel_layout_version = 1;

void put_moments(state::BinaryWriter& w, const stats::LineMoments& m) {
  w.u64(m.count);
  for (double v : {m.sum_w, m.shift_x, m.shift_y, m.dmean_x, m.dmean_y, m.cxx, m.cxy, m.cyy, m.ssr, m.a1, m.a2}) w.f64(v);
}

stats::LineMoments get_moments(state::BinaryReader& r) {
  stats::LineMoments m;
  m.count = r.u64();
  for (double* v : {&m.sum_w, &m.shift_x, &m.shift_y, &m.dmean_x, &m.dmean_y, &m.cxx, &m.cxy, &m.cyy, &m.ssr, &m.a1,
                    &m.a2})
    *v = r.f64();
  return m;
}

void put_block(state::BinaryWriter& w, const Block& b) {
  w.i64(b.first);
  w.i64(b.last);
  w.i64(b.start);
  w.i64(b.end);
  w.u64(b.m);
  w.f64(b.mean);
  w.f64(b.m2);
  w.f64(b.mean_raw);
}

Block get_block(state::BinaryReader& r) {
  Block b;
  b.first = r.i64();
  b.last = r.i64();
  b.start = r.i64();
  b.end = r.i64();
  b.m = r.u64();
  b.mean = r.f64();
  b.m2 = r.f64();
  b.mean_raw = r.f64();
  return b;
}
}  // namespace

void ChannelEngine::save(state::BinaryWriter& w) const {
  w.u32(channel_layout_version);
  w.u64(version_);
  w.u64(historian_seq_);
  w.boolean(has_time_);
  w.i64(last_time_);
  put_moments(w, fit_.moments());
  w.u64(fit_.removals_since_rebuild());
  const std::size_t n = fit_.window_size();
  w.u64(n);
  for (std::size_t i = 0; i < n; ++i) {
    double x, y, wt;
    fit_.window_pair(i, x, y, wt);
    w.f64(x);
    w.f64(y);
  }
  w.u32(screen_.episode_left());
  w.u64(screen_.held().size());
  for (const HeldPair& p : screen_.held()) {
    w.i64(p.time);
    for (double v : {p.x, p.y, p.x_raw, p.y_raw, p.residual}) w.f64(v);
  }
  drift_.save(w);
  const auto& a = alert_.state();
  w.boolean(a.raised);
  w.u32(a.present_run);
  w.u32(a.absent_run);
  w.i64(a.run_start);
  w.i64(a.since);
  w.boolean(averager_.open().has_value());
  if (averager_.open()) put_block(w, *averager_.open());
  w.i64(quiet_since_);
  w.boolean(reading_since_tick_);
  w.i64(next_snapshot_);
  w.u64(pairs_since_tolerance_check_);
  w.boolean(due_alert_);
  w.boolean(tolerance_alert_);
  for (const metrology::DueForecastTracker* tracker : {due_ ? &due_->low : nullptr, due_ ? &due_->high : nullptr}) {
    w.boolean(tracker != nullptr);
    if (!tracker) continue;
    const auto st = tracker->state();
    put_moments(w, st.moments);
    w.boolean(st.latest_time_s.has_value());
    w.f64(st.latest_time_s.value_or(0));
  }
  const ChannelCounters& c = counters_;
  for (std::uint64_t v : {c.pairs, c.pairs_in_fit, c.readings, c.outliers, c.released, c.signal_rejects,
                          c.clock_rejects, c.historian_records, c.alerts_raised, c.alerts_cleared})
    w.u64(v);
}

bool ChannelEngine::load(state::BinaryReader& r) {
  if (r.u32() != channel_layout_version) return false;
  version_ = r.u64();
  historian_seq_ = r.u64();
  has_time_ = r.boolean();
  last_time_ = r.i64();
  const stats::LineMoments m = get_moments(r);
  const std::uint64_t removals = r.u64();
  const std::uint64_t n = r.count(16);
  std::vector<double> xs(n), ys(n);
  for (std::uint64_t i = 0; i < n; ++i) {
    xs[i] = r.f64();
    ys[i] = r.f64();
  }
  if (!r.ok() || !fit_.restore(m, xs, ys, {}, removals)) return false;
  const std::uint32_t episode_left = r.u32();
  const std::uint64_t held = r.count(48);
  std::vector<HeldPair> pairs(held);
  for (HeldPair& p : pairs) {
    p.time = r.i64();
    for (double* v : {&p.x, &p.y, &p.x_raw, &p.y_raw, &p.residual}) *v = r.f64();
  }
  screen_.restore(std::move(pairs), episode_left);
  if (!drift_.load(r)) return false;
  AlertMachine::State a;
  a.raised = r.boolean();
  a.present_run = r.u32();
  a.absent_run = r.u32();
  a.run_start = r.i64();
  a.since = r.i64();
  alert_.restore(a);
  if (r.boolean()) {
    averager_.restore(get_block(r));
  } else {
    averager_.clear();
  }
  quiet_since_ = r.i64();
  reading_since_tick_ = r.boolean();
  next_snapshot_ = r.i64();
  pairs_since_tolerance_check_ = r.u64();
  due_alert_ = r.boolean();
  tolerance_alert_ = r.boolean();
  for (metrology::DueForecastTracker* tracker : {due_ ? &due_->low : nullptr, due_ ? &due_->high : nullptr}) {
    const bool present = r.boolean();
    if (!present) continue;
    metrology::DueForecastTracker::State st;
    st.moments = get_moments(r);
    const bool has_time = r.boolean();
    const double latest = r.f64();
    if (has_time) st.latest_time_s = latest;
    if (!r.ok() || !tracker || !tracker->restore(st)) return false;
  }
  ChannelCounters& c = counters_;
  for (std::uint64_t* v : {&c.pairs, &c.pairs_in_fit, &c.readings, &c.outliers, &c.released, &c.signal_rejects,
                           &c.clock_rejects, &c.historian_records, &c.alerts_raised, &c.alerts_cleared})
    *v = r.u64();
  return r.ok();
}

}  // namespace rigcal::engine
