// ChannelEngine: the tolerance verdict (ILAC-G8 decision rules) and the calibration-due forecast,
// with their alerts. The tolerance is judged every `tolerance_check_pairs` accepted pairs; the
// error at each end of the range is recorded for the drift trend every forecast.snapshot_interval_s
// of record time (snapshots should be at least a fit window apart: overlapping windows make the
// trend look more certain than it is).
#include <cmath>
#include <cstdio>

#include "rigcal/engine/channel_engine.hpp"
#include "rigcal/metrology/sensor_error.hpp"

namespace rigcal::engine {

namespace {
constexpr std::uint64_t tolerance_check_pairs = 64;
constexpr double ns_per_s = 1e9;

std::string num(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

stats::CertifiedLine certified_line(const config::ChannelConfig& c) {
  return {c.certificate.intercept, c.certificate.slope, c.certificate.u_intercept, c.certificate.u_slope,
          c.certificate.cov};
}
}  // namespace

void ChannelEngine::init_tolerance() {
  const auto& c = *cfg_;
  auto ref = metrology::reference_from_certificate(c.reference.expanded_uncertainty, c.reference.coverage_factor,
                                                   c.reference.dof);
  if (ref) reference_u_ = ref.value();
  if (!c.tolerance.configured() || !c.range_low || !c.range_high) return;
  mpe_ = {c.tolerance.absolute, c.tolerance.percent_of_reading, c.tolerance.percent_of_span};
  range_ = {*c.range_low, *c.range_high};
  if (!metrology::check_tolerance(mpe_, range_)) return;
  has_tolerance_ = true;
  if (!c.forecast.enabled) return;
  metrology::DueForecastOptions o;
  o.min_snapshots = static_cast<std::uint64_t>(c.forecast.min_snapshots);
  o.u_common = reference_u_.u;
  auto lo = metrology::DueForecastTracker::create(o), hi = metrology::DueForecastTracker::create(o);
  if (lo && hi) due_ = std::make_unique<DueTrackers>(DueTrackers{std::move(lo.value()), std::move(hi.value())});
}

Result<metrology::ToleranceVerdict> ChannelEngine::tolerance_verdict() const { return evaluate_tolerance(true); }

Result<metrology::ToleranceVerdict> ChannelEngine::evaluate_tolerance(bool explain) const {
  if (!has_tolerance_) return Error{"no tolerance configured for this channel"};
  const auto fit = fit_summary();
  if (!fit) return fit.error();
  if (const double need = cfg_->min_reference_spread(); fit->reference_spread() < need)
    return Error{"the fit's reference values spread too little (RMS " + num("%.3g", fit->reference_spread()) +
                 " against fit.min_reference_spread " + num("%.3g", need) + ") for a verdict over the range"};
  metrology::VerdictOptions o;
  o.rule = cfg_->decision_rule == config::DecisionRule::simple ? metrology::DecisionRule::simple_acceptance
                                                                : metrology::DecisionRule::guarded_acceptance;
  o.guard_band = cfg_->guard_band;
  o.explain = explain;
  return metrology::judge_tolerance(fit.value(), certified_line(*cfg_), reference_u_, mpe_, range_, o, t_cov_);
}

std::optional<metrology::DueForecast> ChannelEngine::due_forecast_low() const {
  if (!due_) return std::nullopt;
  auto f = due_->low.forecast(metrology::mpe_at(mpe_, range_, range_.lo), t_fit_);
  return f ? std::optional(f.value()) : std::nullopt;
}

std::optional<metrology::DueForecast> ChannelEngine::due_forecast_high() const {
  if (!due_) return std::nullopt;
  auto f = due_->high.forecast(metrology::mpe_at(mpe_, range_, range_.hi), t_fit_);
  return f ? std::optional(f.value()) : std::nullopt;
}

std::optional<protocol::TimeNs> ChannelEngine::due_by() const {
  std::optional<double> earliest;
  for (const auto& f : {due_forecast_low(), due_forecast_high()})
    if (f && f->crossing && (!earliest || f->crossing->due_by_s < *earliest)) earliest = f->crossing->due_by_s;
  if (!earliest) return std::nullopt;
  return static_cast<protocol::TimeNs>(*earliest * ns_per_s);
}

void ChannelEngine::after_pair_checks(protocol::TimeNs t, EventSink& sink) {
  if (!has_tolerance_ || fit_.moments().count < static_cast<std::uint64_t>(cfg_->min_pairs)) return;
  if (++pairs_since_tolerance_check_ >= tolerance_check_pairs) {
    pairs_since_tolerance_check_ = 0;
    check_tolerance(t, sink);
  }
  if (!due_) return;
  if (next_snapshot_ == 0) next_snapshot_ = t;  // the first snapshot as soon as the fit qualifies
  if (t < next_snapshot_) return;
  next_snapshot_ = t + static_cast<protocol::TimeNs>(cfg_->forecast.snapshot_interval_s * ns_per_s);
  const auto fit = fit_summary();
  if (fit && fit->reference_spread() >= cfg_->min_reference_spread()) take_snapshot(t, fit.value(), sink);
}

// Every tolerance_check_pairs pairs: only the statements are needed (explain = false).
void ChannelEngine::check_tolerance(protocol::TimeNs t, EventSink& sink) {
  const auto v = evaluate_tolerance(false);
  if (!v) return;
  const bool fail = v->verdict == metrology::Verdict::fail;
  if (fail == tolerance_alert_) return;
  tolerance_alert_ = fail;
  AlertEvent e = base_event(t, AlertKind::tolerance, fail ? Transition::raised : Transition::cleared);
  e.detector = "tolerance";
  e.test = v->rule_name;
  e.ne107 = "out_of_specification";
  const auto& w = v->worst;
  e.statistic = std::abs(w.error.error);
  e.threshold = w.mpe;
  e.message = fail ? cfg_->id + " is out of tolerance as found: error " + num("%.4g", w.error.error) + " " +
                         cfg_->units + " (U " + num("%.3g", w.error.expanded) + ") at " + num("%.5g", w.error.x) +
                         " against a maximum permissible error of " + num("%.4g", w.mpe) + " (" + v->rule_name +
                         "). Calibrate the sensor; values it reported may need review. Decision support only."
                   : cfg_->id + " is no longer judged out of tolerance (" + std::string(metrology::to_string(v->verdict)) +
                         " under " + v->rule_name + ").";
  sink.on_alert(e);
}

void ChannelEngine::take_snapshot(protocol::TimeNs t, const stats::LineFit& fit, EventSink& sink) {
  const double t_s = static_cast<double>(t) / ns_per_s;
  const stats::CertifiedLine cert = certified_line(*cfg_);
  const metrology::ReferenceStandardUncertainty no_ref{};  // the reference's share is the trackers' u_common
  for (auto [x, tracker] : {std::pair{range_.lo, &due_->low}, std::pair{range_.hi, &due_->high}}) {
    auto e = metrology::sensor_error_at(fit, cert, no_ref, x, t_fit_);
    if (e && e->u_fit > 0) tracker->add(t_s, e->error, e->u_fit);
  }
  const auto due = due_by();
  const double warn_ns = cfg_->forecast.warn_before_days * 86400.0 * ns_per_s;
  bool soon = due && static_cast<double>(*due - t) <= warn_ns;
  for (const auto& f : {due_forecast_low(), due_forecast_high()})
    if (f && f->status == metrology::DueStatus::already_outside) soon = true;
  if (soon == due_alert_) return;
  due_alert_ = soon;
  AlertEvent e = base_event(t, AlertKind::calibration_due, soon ? Transition::raised : Transition::cleared);
  e.detector = "forecast";
  e.test = "drift trend";
  e.ne107 = "maintenance_required";
  e.due_by = due;
  if (soon) {
    e.message = cfg_->id + ": calibration due " +
                (due ? "by " + protocol::format_rfc3339(*due, 0) : std::string("now (the trend is already outside)")) +
                ": the drift trend of its error is forecast to reach the tolerance (earliest crossing consistent with " +
                std::to_string(due_->low.snapshots()) +
                " snapshots, assuming linear ageing). Plan a calibration. Decision support only.";
  } else {
    e.message = cfg_->id + ": calibration no longer forecast as due within " + num("%g", cfg_->forecast.warn_before_days) +
                " days.";
  }
  sink.on_alert(e);
}

void ChannelEngine::fill_tolerance(AlertEvent& e) const {
  const auto v = evaluate_tolerance(false);  // the event carries the verdict and the worst point only
  if (!v) return;
  e.tolerance_verdict = metrology::to_string(v->verdict);
  e.tolerance_rule = v->rule_name;
  e.worst_x = v->worst.error.x;
  e.worst_error = v->worst.error.error;
  e.worst_expanded = v->worst.error.expanded;
  e.worst_mpe = v->worst.mpe;
}

AlertEvent ChannelEngine::base_event(protocol::TimeNs t, AlertKind kind, Transition tr) const {
  AlertEvent e;
  e.channel = cfg_->id;
  e.time = t;
  e.kind = kind;
  e.transition = tr;
  e.fit = calibration();
  e.certified_b0 = cfg_->certificate.intercept;
  e.certified_b1 = cfg_->certificate.slope;
  if (const auto fit = fit_summary()) {
    const auto ci = stats::coefficient_intervals(fit.value(), t_fit_);
    e.ci_b0_lo = ci.b0.lo;
    e.ci_b0_hi = ci.b0.hi;
    e.ci_b1_lo = ci.b1.lo;
    e.ci_b1_hi = ci.b1.hi;
  }
  fill_tolerance(e);
  return e;
}

}  // namespace rigcal::engine
