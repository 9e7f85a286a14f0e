#include "rigcal/engine/channel_engine.hpp"

#include <cmath>
#include <cstdio>

#include "correction.hpp"
#include "rigcal/config/fingerprint.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/york_fit.hpp"

namespace rigcal::engine {

namespace {

constexpr double ns_per_s = 1e9;

AlertTiming timing_of(const config::ChannelConfig& c) {
  AlertTiming t;
  t.raise_after = static_cast<std::uint32_t>(c.raise_after());
  t.raise_after_ns = static_cast<std::int64_t>(c.alert.raise_after_s * ns_per_s);
  t.clear_after = static_cast<std::uint32_t>(c.alert.clear_after);
  t.clear_after_ns = static_cast<std::int64_t>(c.alert.clear_after_s * ns_per_s);
  return t;
}

// What a drift finding means, in words.
std::string finding_text(std::string_view test) {
  if (test == "offset") return "an offset change";
  if (test == "slope") return "a slope (gain) change";
  if (test == "offset+slope") return "offset and slope changes";
  if (test == "joint") return "the certified line outside the fit's joint confidence region";
  if (test == "intercept") return "the certified intercept outside the fit's interval";
  if (test == "line") return "a change of the line (anytime-valid test)";
  return std::string(test);
}

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

}  // namespace

ChannelEngine::ChannelEngine(std::shared_ptr<const config::ChannelConfig> cfg, const config::TimeRules& time,
                             EngineTables& tables)
    : cfg_(std::move(cfg)),
      fingerprint_(config::channel_fingerprint(*cfg_)),
      max_backwards_ns_(time.max_backwards_s * ns_per_s),
      t_fit_(tables.t(cfg_->fit.confidence)),
      t_cov_(tables.t(cfg_->averaging.coverage_probability)),
      fit_(cfg_->fit.policy(), false),
      screen_(cfg_->screening.enabled, cfg_->screening.limit, static_cast<std::uint32_t>(cfg_->screening.max_held),
              static_cast<std::uint32_t>(cfg_->screening.episode_pairs)),
      drift_(*cfg_, tables),
      alert_(timing_of(*cfg_)),
      averager_(static_cast<std::uint64_t>(cfg_->averaging.block_readings),
                static_cast<std::int64_t>(cfg_->averaging.bucket_s * ns_per_s)) {
  init_tolerance();
}

Result<stats::LineFit> ChannelEngine::fit_summary() const {
  if (!cfg_->fit.errors_in_variables) return fit_.summary(cfg_->fit.model);
  const double u_sensor = cfg_->sensor.noise_sd.value_or(0);
  auto york = stats::york_fit_from_moments(fit_.moments(), cfg_->reference.noise_sd, u_sensor);
  if (!york) return york.error();
  return stats::line_fit_from_york(york.value(), u_sensor);
}

bool ChannelEngine::convert(double raw, const metrology::Linearisation& lin, double& out, std::string& why) const {
  if (lin.kind == metrology::Linearisation::Kind::none) {
    out = raw;
    return true;
  }
  auto v = metrology::linearise(lin, raw);
  if (!v) {
    why = v.error().message;
    return false;
  }
  out = v.value();
  return true;
}

void ChannelEngine::set_time_rules(const config::TimeRules& t) { max_backwards_ns_ = t.max_backwards_s * ns_per_s; }

bool ChannelEngine::clock_ok(protocol::TimeNs t) {
  if (has_time_ && static_cast<double>(last_time_ - t) > max_backwards_ns_) return false;
  if (!has_time_ || t > last_time_) last_time_ = t;
  has_time_ = true;
  return true;
}

void ChannelEngine::reject(protocol::TimeNs t, protocol::RejectReason reason, std::string detail, double x_raw,
                           double y_raw, bool pair, EventSink& sink) {
  EngineReject r;
  r.channel = cfg_->id;
  r.time = t;
  r.reason = reason;
  r.detail = std::move(detail);
  r.reference_raw = x_raw;
  r.sensor_raw = y_raw;
  r.is_pair = pair;
  sink.on_reject(r);
}

void ChannelEngine::on_pair(protocol::TimeNs t, double x_raw, double y_raw, EventSink& sink) {
  ++counters_.pairs;
  HeldPair p;
  p.time = t;
  p.x_raw = x_raw;
  p.y_raw = y_raw;
  std::string why;
  if (!convert(x_raw, cfg_->reference.linearisation, p.x, why)) {
    ++counters_.signal_rejects;
    return reject(t, protocol::RejectReason::out_of_signal_range, "reference: " + why, x_raw, y_raw, true, sink);
  }
  if (!convert(y_raw, cfg_->sensor.linearisation, p.y, why)) {
    ++counters_.signal_rejects;
    return reject(t, protocol::RejectReason::out_of_signal_range, "sensor: " + why, x_raw, y_raw, true, sink);
  }
  if (!clock_ok(t)) {
    ++counters_.clock_rejects;
    return reject(t, protocol::RejectReason::clock_backwards,
                  "timestamp " + protocol::format_rfc3339(t) + " is older than the channel's latest " +
                      protocol::format_rfc3339(last_time_),
                  x_raw, y_raw, true, sink);
  }
  if (!screen_.enabled() || fit_.moments().count < static_cast<std::uint64_t>(cfg_->min_pairs))
    return accept_pair(p, sink);
  const auto before = ols_summary();
  if (!before) return accept_pair(p, sink);
  p.residual = OutlierScreen::studentised_residual(before.value(), p.x, p.y, cfg_->sensor.resolution / std::sqrt(12.0));
  const auto verdict = screen_.offer(p);
  for (const HeldPair& spike : screen_.take_rejected()) {
    ++counters_.outliers;
    reject(spike.time, protocol::RejectReason::outlier,
           "studentised residual " + fmt("%.3g", spike.residual) + " beyond the screening limit " +
               fmt("%g", screen_.limit()) + ", an isolated spike (fewer than " +
               std::to_string(cfg_->screening.max_held) + " such pairs within " +
               std::to_string(cfg_->screening.episode_pairs) + ")",
           spike.x_raw, spike.y_raw, true, sink);
  }
  if (verdict == OutlierScreen::Verdict::pass) return accept_pair(p, sink);
  const auto released = screen_.take_released();
  counters_.released += released.size();
  for (const HeldPair& q : released) accept_pair(q, sink);
}

void ChannelEngine::accept_pair(const HeldPair& p, EventSink& sink) {
  fit_.add(p.x, p.y);
  ++counters_.pairs_in_fit;
  const bool need_summary =
      cfg_->detector.kind == config::DetectorKind::interval || drift_.phase() != DriftMonitor::Phase::monitoring;
  const Result<stats::LineFit> after = need_summary ? fit_summary() : Result<stats::LineFit>(Error{"not needed"});
  const DriftFinding f = drift_.update(p.x, p.y, after);
  if (drift_.take_phase_change()) notify_phase(p.time, sink);
  if (f.evaluated) {
    last_finding_ = f;
    switch (alert_.update(f.present, p.time)) {
      case AlertTransition::raised: emit_alert(Transition::raised, f, p.time, sink); break;
      case AlertTransition::cleared: emit_alert(Transition::cleared, f, p.time, sink); break;
      case AlertTransition::none: break;
    }
  }
  after_pair_checks(p.time, sink);
  if (cfg_->averaging.include_pair_readings) add_reading(p.time, p.y, p.y_raw, sink);
}

void ChannelEngine::notify_phase(protocol::TimeNs t, EventSink& sink) {
  Notice n;
  n.channel = cfg_->id;
  n.time = t;
  const DriftDesign& d = drift_.design();
  switch (drift_.phase()) {
    case DriftMonitor::Phase::learning:
      n.message = "learning the reference centre" + std::string(cfg_->sensor.noise_sd ? "" : " and the sensor noise") +
                  " for the " + std::string(d.kind) + " detector";
      break;
    case DriftMonitor::Phase::monitoring:
      if (d.kind == "interval") {
        n.message = "monitoring with the interval rule (raise after " + std::to_string(cfg_->raise_after()) +
                    " consecutive findings)";
      } else if (d.kind == "anytime") {
        n.message = "monitoring with the anytime-valid test: P(any false alert) <= " + fmt("%g", d.alpha) +
                    ", rho " + fmt("%.4g", d.rho) + ", sigma " + fmt("%.4g", d.sigma) +
                    (d.sigma_learned ? " (learned)" : "") + ", about " + fmt("%.0f", d.arl1_offset_pairs) +
                    " pairs to detect the design change";
      } else {
        n.message = "monitoring with " + std::string(d.kind) + ": designed ARL0 " + fmt("%.3g", d.arl0_pairs) +
                    " pairs; expected pairs to detect the design offset change " + fmt("%.3g", d.arl1_offset_pairs) +
                    ", slope change " + fmt("%.3g", d.arl1_slope_pairs) + "; sigma " + fmt("%.4g", d.sigma) +
                    (d.sigma_learned ? " (learned)" : "") + ", reference centre " + fmt("%.5g", d.centre.x_centre);
      }
      break;
    case DriftMonitor::Phase::unavailable:
      n.level = NoticeLevel::warning;
      n.message = "drift detection is NOT running: " + drift_.unavailable_reason() +
                  " (reset the channel after fixing the cause)";
      break;
    case DriftMonitor::Phase::waiting:
      return;
  }
  sink.on_notice(n);
}

void ChannelEngine::on_reading(protocol::TimeNs t, double y_raw, EventSink& sink) {
  ++counters_.readings;
  double y = 0;
  std::string why;
  if (!convert(y_raw, cfg_->sensor.linearisation, y, why)) {
    ++counters_.signal_rejects;
    return reject(t, protocol::RejectReason::out_of_signal_range, "sensor: " + why, 0, y_raw, false, sink);
  }
  if (!clock_ok(t)) {
    ++counters_.clock_rejects;
    return reject(t, protocol::RejectReason::clock_backwards,
                  "timestamp " + protocol::format_rfc3339(t) + " is older than the channel's latest " +
                      protocol::format_rfc3339(last_time_),
                  0, y_raw, false, sink);
  }
  add_reading(t, y, y_raw, sink);
}

void ChannelEngine::add_reading(protocol::TimeNs t, double value, double raw, EventSink& sink) {
  reading_since_tick_ = true;
  if (auto closed = averager_.add(t, value, raw)) emit_historian(*closed, sink);
}

void ChannelEngine::tick(protocol::TimeNs now, EventSink& sink) {
  if (reading_since_tick_ || !averager_.open()) {
    reading_since_tick_ = false;
    quiet_since_ = now;
    return;
  }
  const auto quiet_ns = static_cast<protocol::TimeNs>(cfg_->averaging.bucket_s * ns_per_s);
  if (now - quiet_since_ >= quiet_ns)
    if (auto closed = averager_.close_open()) emit_historian(*closed, sink);
}

CalibrationSnapshot ChannelEngine::calibration() const {
  CalibrationSnapshot c;
  c.version = version_;
  c.n = fit_.moments().count;
  const auto f = fit_summary();
  if (!f) return c;
  c.valid = true;
  c.b0 = f->b0;
  c.b1 = f->b1;
  c.var_b0 = f->se_b0 * f->se_b0;
  c.var_b1 = f->se_b1 * f->se_b1;
  c.cov_b0_b1 = f->cov_b0_b1;
  c.s = f->s;
  c.dof = f->dof;
  return c;
}

// The texts of a record that name its channel, from the configuration.
void ChannelEngine::name_record(HistorianRecord& r) const {
  r.channel = cfg_->id;
  r.units = cfg_->units;
  r.reference_id = cfg_->reference.id;
  r.certificate_id = cfg_->certificate.id;
}

std::optional<HistorianRecord> ChannelEngine::last_record() const {
  if (!last_record_) return std::nullopt;
  HistorianRecord r;
  static_cast<HistorianValues&>(r) = *last_record_;
  name_record(r);
  return r;
}

void ChannelEngine::emit_historian(const Block& b, EventSink& sink) {
  HistorianRecord r;
  name_record(r);
  r.seq = ++historian_seq_;
  r.window_start = b.start;
  r.window_end = b.end;
  r.m = b.m;
  r.raw_mean = b.mean_raw;
  r.indication = b.mean;
  r.calibration = calibration();
  r.drift_alert = alert_.raised();
  const bool enough = fit_.moments().count >= static_cast<std::uint64_t>(cfg_->min_pairs);
  correct_block(*cfg_, fit_summary(), enough, alert_.raised(), t_cov_, r);
  ++counters_.historian_records;
  last_record_ = static_cast<const HistorianValues&>(r);
  sink.on_historian(r);
}

void ChannelEngine::emit_alert(Transition tr, const DriftFinding& f, protocol::TimeNs t, EventSink& sink) {
  AlertEvent e = base_event(t, AlertKind::drift, tr);
  e.detector = drift_.design().kind;
  e.test = f.test;
  e.statistic = f.statistic;
  e.threshold = f.threshold;
  e.ne107 = "maintenance_required";
  const auto fit = fit_summary();
  std::string fitted = "the fit is not determined yet";
  if (fit) {
    const auto ci = stats::coefficient_intervals(fit.value(), t_fit_);
    const std::string pct = fmt("%g", cfg_->fit.confidence * 100);
    fitted = "slope " + fmt("%.6g", fit->b1) + " (" + pct + " % interval " + fmt("%.6g", ci.b1.lo) + " to " +
             fmt("%.6g", ci.b1.hi) + ") against certified " + fmt("%.6g", cfg_->certificate.slope) + ", intercept " +
             fmt("%.5g", fit->b0) + " " + cfg_->units + " (" + fmt("%.5g", ci.b0.lo) + " to " + fmt("%.5g", ci.b0.hi) +
             ") against certified " + fmt("%.5g", cfg_->certificate.intercept) + ", from " +
             std::to_string(fit->count) + " pairs";
  }
  const std::string cert = cfg_->certificate.id.empty() ? "its certificate" : "certificate " + cfg_->certificate.id;
  const std::string tolerance =
      e.tolerance_verdict.empty() ? "" : " Tolerance verdict as found: " + e.tolerance_verdict + " (" + e.tolerance_rule + ").";
  if (tr == Transition::raised) {
    ++counters_.alerts_raised;
    e.message = cfg_->id + " no longer agrees with " + cert + ": the " + std::string(e.detector) + " detector found " +
                finding_text(f.test) + " (statistic " + fmt("%.4g", f.statistic) + ", threshold " +
                fmt("%.4g", f.threshold) + "). Current fit: " + fitted +
                "." + tolerance +
                " Check the sensor against a reference standard (as-found) and recalibrate if the drift is "
                "confirmed. Decision support only; not a safety function.";
  } else {
    ++counters_.alerts_cleared;
    e.message = cfg_->id + " agrees with " + cert + " again: no drift finding for " +
                std::to_string(cfg_->alert.clear_after) + " evaluations. Current fit: " + fitted + ".";
  }
  sink.on_alert(e);
}

void ChannelEngine::reset(protocol::TimeNs t, EventSink& sink) {
  // As-left: the trend of the old calibration says nothing about the new one.
  if (due_) {
    due_->low.reset();
    due_->high.reset();
  }
  next_snapshot_ = 0;
  pairs_since_tolerance_check_ = 0;
  due_alert_ = tolerance_alert_ = false;
  const bool was_raised = alert_.raised();
  fit_.reset();
  screen_.clear();
  drift_.reset();
  averager_.clear();
  last_finding_ = {};
  counters_.pairs_in_fit = 0;
  ++version_;
  if (was_raised) {
    DriftFinding f;
    f.test = "reset";
    alert_.reset();
    AlertEvent e;
    e.channel = cfg_->id;
    e.time = t;
    e.kind = AlertKind::drift;
    e.transition = Transition::cleared;
    e.detector = drift_.design().kind;
    e.test = "reset";
    e.fit = calibration();
    e.ne107 = "maintenance_required";
    e.message = cfg_->id + ": drift alert cleared by a reset of the channel (calibration version " +
                std::to_string(version_) + ").";
    ++counters_.alerts_cleared;
    sink.on_alert(e);
  }
  alert_.reset();
}

}  // namespace rigcal::engine

namespace rigcal::engine {

void ChannelEngine::restart_fresh() {
  if (due_) {
    due_->low.reset();
    due_->high.reset();
  }
  next_snapshot_ = 0;
  pairs_since_tolerance_check_ = 0;
  due_alert_ = tolerance_alert_ = false;
  fit_.reset();
  screen_.clear();
  drift_.reset();
  alert_.reset();
  averager_.clear();
  last_finding_ = {};
  counters_ = {};
  has_time_ = false;
  last_time_ = 0;
  historian_seq_ = 0;
  quiet_since_ = 0;
  reading_since_tick_ = false;
  last_record_.reset();
}

}  // namespace rigcal::engine
