#include "rigcal/engine/drift_monitor.hpp"

#include <algorithm>
#include <cmath>

namespace rigcal::engine {

namespace {

const char* kind_name(config::DetectorKind k) {
  switch (k) {
    case config::DetectorKind::interval: return "interval";
    case config::DetectorKind::cusum: return "cusum";
    case config::DetectorKind::ewma: return "ewma";
    case config::DetectorKind::anytime: return "anytime";
  }
  return "interval";
}

// The smallest offset change worth catching: configured, or a quarter of the maximum permissible
// error at mid-range (common practice, no source: a detector should act well inside the tolerance).
double min_offset_change(const config::ChannelConfig& c) {
  if (c.detector.min_offset_change) return *c.detector.min_offset_change;
  const double lo = c.range_low.value_or(0), hi = c.range_high.value_or(0);
  const double mid = 0.5 * (lo + hi);
  const double mpe = c.tolerance.absolute + c.tolerance.percent_of_reading / 100.0 * std::abs(mid) +
                     c.tolerance.percent_of_span / 100.0 * (hi - lo);
  return 0.25 * mpe;
}

std::size_t learn_pairs(const config::ChannelConfig& c) { return static_cast<std::size_t>(std::max(c.learn_pairs(), 3)); }

}  // namespace

DriftMonitor::DriftMonitor(const config::ChannelConfig& cfg, EngineTables& tables)
    : cfg_(cfg), tables_(tables), t_(tables.t(cfg.fit.confidence)) {
  design_.kind = kind_name(cfg.detector.kind);
}

stats::CertifiedLine DriftMonitor::certified_line() const {
  const auto& c = cfg_.certificate;
  return {c.intercept, c.slope, c.u_intercept, c.u_slope, c.cov};
}

const char* DriftMonitor::phase_name() const {
  switch (phase_) {
    case Phase::waiting: return "waiting for min_pairs";
    case Phase::learning: return "learning";
    case Phase::monitoring: return "monitoring";
    case Phase::unavailable: return "unavailable";
  }
  return "";
}

void DriftMonitor::reset() {
  phase_ = Phase::waiting;
  unavailable_reason_.clear();
  learning_.clear();
  design_ = DriftDesign{};
  design_.kind = kind_name(cfg_.detector.kind);
  latched_ = false;
  innovations_.reset();
  detectors_ = std::monostate{};
}

DriftFinding DriftMonitor::update(double x, double y, const Result<stats::LineFit>& fit) {
  if (cfg_.detector.kind == config::DetectorKind::interval) return interval_rule(fit);
  switch (phase_) {
    case Phase::waiting:
    case Phase::learning:
      if (phase_ == Phase::waiting) {
        phase_ = Phase::learning;
        phase_changed_ = true;
      }
      {
        const stats::CertifiedLine line = certified_line();
        learning_.push_back({x, y - (line.intercept + line.slope * x)});
      }
      if (learning_.size() >= learn_pairs(cfg_)) finish_learning(fit);
      return {};
    case Phase::unavailable:
      return {};
    case Phase::monitoring:
      break;
  }
  return sequential(x, y);
}

DriftFinding DriftMonitor::interval_rule(const Result<stats::LineFit>& fit) {
  if (!fit.ok() || fit->count < static_cast<std::uint64_t>(cfg_.min_pairs)) return {};
  if (fit->reference_spread() < cfg_.min_reference_spread()) return {};  // no verdict on the slope yet
  if (phase_ != Phase::monitoring) {
    phase_ = Phase::monitoring;
    phase_changed_ = true;
  }
  const auto v = stats::judge_against_certificate(fit.value(), certified_line(), t_, cfg_.fit.widen_by_certificate);
  DriftFinding f;
  f.evaluated = true;
  f.present = !(v.joint_consistent && v.slope_consistent && v.intercept_consistent);
  // Report the joint test unless only a separate one fails (the joint region is the one to read).
  if (!v.joint_consistent || (v.slope_consistent && v.intercept_consistent)) {
    f.test = "joint";
    f.statistic = v.joint_statistic;
    f.threshold = v.joint_critical;
  } else if (!v.slope_consistent) {
    f.test = "slope";
    f.statistic = std::abs(v.slope_deviation);
    f.threshold = v.slope_limit;
  } else if (!v.intercept_consistent) {
    f.test = "intercept";
    f.statistic = std::abs(v.intercept_deviation);
    f.threshold = v.intercept_limit;
  }
  return f;
}

// The centre and spread of the reference values, and the sensor noise, that the sequential
// detectors are standardised and designed with.
//  - With a configured range [lo, hi] the centre is its midpoint and the spread that of set points
//    spread evenly over it (RMS (hi - lo) / sqrt 12, mean absolute deviation (hi - lo) / 4): a rig
//    dwells at one set point for many pairs, so the first pairs say nothing about the spread. The
//    slope innovation is exactly N(0, 1) whatever centre is used; the centre only decides how pairs
//    are matched across it.
//  - Without a range, they are learned from the learning pairs (median, RMS, mean |x - median|).
//  - sigma: configured, or the standard deviation of y - (b0* + b1* x) over the learning pairs
//    (mean removed, so that an initial offset is not taken for noise; no spread in x needed).
void DriftMonitor::finish_learning(const Result<stats::LineFit>&) {
  auto fail = [this](std::string why) {
    phase_ = Phase::unavailable;
    phase_changed_ = true;
    unavailable_reason_ = std::move(why);
    drop_learning_pairs();
  };
  if (cfg_.range_low && cfg_.range_high) {
    const double lo = *cfg_.range_low, hi = *cfg_.range_high;
    design_.centre.x_centre = 0.5 * (lo + hi);
    design_.centre.x_spread = (hi - lo) / std::sqrt(12.0);
    design_.centre.mean_abs_deviation = 0.25 * (hi - lo);
  } else {
    std::vector<double> xs(learning_.size());
    std::transform(learning_.begin(), learning_.end(), xs.begin(), [](const LearnPair& p) { return p.x; });
    auto centre = detect::reference_centre(xs);
    if (!centre)
      return fail("cannot learn the reference centre: " + centre.error().message +
                  " (configure the channel's range, or raise detector.learn_pairs to span several set points)");
    design_.centre = centre.value();
  }
  if (cfg_.sensor.noise_sd) {
    design_.sigma = *cfg_.sensor.noise_sd;
  } else {
    double mean = 0, m2 = 0;
    for (std::size_t i = 0; i < learning_.size(); ++i) {
      const double d = learning_[i].e - mean;
      mean += d / static_cast<double>(i + 1);
      m2 += d * (learning_[i].e - mean);
    }
    const double floor = cfg_.sensor.resolution / std::sqrt(12.0);
    const std::size_t n = learning_.size();
    design_.sigma = std::max(n > 1 ? std::sqrt(m2 / static_cast<double>(n - 1)) : 0.0, floor);
    design_.sigma_learned = true;
    if (!(design_.sigma > 0))
      return fail("cannot learn the sensor noise: the readings do not scatter; configure sensor.noise_sd");
  }
  drop_learning_pairs();
  start_detectors();
}

void DriftMonitor::drop_learning_pairs() {
  learning_.clear();
  learning_.shrink_to_fit();
}

void DriftMonitor::start_detectors() {
  const double sigma = design_.sigma;
  const double offset_change = min_offset_change(cfg_);
  const double slope_change = cfg_.detector.min_slope_change * std::abs(cfg_.certificate.slope);
  design_.offset_shift_sigma = offset_change / sigma;
  design_.slope_shift_sigma = detect::slope_shift_sigma(slope_change, design_.centre, sigma);
  const double arl0 = cfg_.detector.arl0_pairs();
  design_.arl0_pairs = arl0;
  auto fail = [this](std::string why) {
    phase_ = Phase::unavailable;
    phase_changed_ = true;
    unavailable_reason_ = std::move(why);
  };
  innovations_.emplace(certified_line(), sigma, design_.centre);
  // Two detectors in parallel: each is designed for twice the channel's ARL0, so that together they
  // give one false alert per `arl0` pairs. The slope detector sees about one innovation per two pairs,
  // so its target in innovations is `arl0` (= 2 arl0 pairs).
  switch (cfg_.detector.kind) {
    case config::DetectorKind::cusum: {
      const auto& off = tables_.cusum(2 * arl0, design_.offset_shift_sigma);
      const auto& sl = tables_.cusum(arl0, design_.slope_shift_sigma);
      if (!off) return fail("offset CUSUM design: " + off.error().message);
      if (!sl) return fail("slope CUSUM design: " + sl.error().message);
      design_.k_offset = off->k;
      design_.h_offset = off->h;
      design_.k_slope = sl->k;
      design_.h_slope = sl->h;
      design_.arl1_offset_pairs = off->arl1;
      design_.arl1_slope_pairs = 2 * sl->arl1;
      detectors_ = CusumPair{detect::Cusum(off->k, off->h, 2 * off->h), detect::Cusum(sl->k, sl->h, 2 * sl->h)};
      break;
    }
    case config::DetectorKind::ewma: {
      const auto& off = tables_.ewma(2 * arl0, design_.offset_shift_sigma);
      const auto& sl = tables_.ewma(arl0, design_.slope_shift_sigma);
      if (!off) return fail("offset EWMA design: " + off.error().message);
      if (!sl) return fail("slope EWMA design: " + sl.error().message);
      design_.lambda_offset = off->lambda;
      design_.L_offset = off->L;
      design_.lambda_slope = sl->lambda;
      design_.L_slope = sl->L;
      design_.arl1_offset_pairs = off->arl1;
      design_.arl1_slope_pairs = 2 * sl->arl1;
      detectors_ = EwmaPair{detect::Ewma(off->lambda, off->L), detect::Ewma(sl->lambda, sl->L)};
      break;
    }
    case config::DetectorKind::anytime: {
      const double shift = detect::line_shift_sigma(offset_change, 0.0, design_.centre, sigma);
      const auto& d = tables_.mixture(cfg_.detector.alpha, shift);
      if (!d) return fail("anytime-valid test design: " + d.error().message);
      design_.rho = d->rho;
      design_.alpha = cfg_.detector.alpha;
      design_.arl0_pairs = 0;  // not an ARL design: P(any false alert) <= alpha
      design_.arl1_offset_pairs = d->detection_pairs;
      detectors_.emplace<detect::NormalMixtureTest>(cfg_.detector.alpha, d->rho);
      break;
    }
    case config::DetectorKind::interval:
      break;
  }
  phase_ = Phase::monitoring;
  phase_changed_ = true;
}

DriftFinding DriftMonitor::sequential(double x, double y) {
  const detect::Innovations in = innovations_->next(x, y);
  DriftFinding f;
  f.evaluated = true;
  // Deadband (ISA-18.2 practice): a finding, once present, lasts until the statistic is back below
  // half its threshold, so a statistic hovering at the threshold (a slow ramp) does not toggle.
  auto pick = [&f, this](bool off_alarm, bool sl_alarm, double off_stat, double off_thr, double sl_stat,
                         double sl_thr) {
    if (latched_ && !off_alarm && !sl_alarm)
      latched_ = off_stat > deadband_fraction * off_thr || sl_stat > deadband_fraction * sl_thr;
    else
      latched_ = off_alarm || sl_alarm;
    f.present = latched_;
    const bool slope_leads = sl_thr > 0 && off_thr > 0 && sl_stat / sl_thr > off_stat / off_thr;
    f.test = off_alarm && sl_alarm ? "offset+slope" : (sl_alarm || (!off_alarm && slope_leads) ? "slope" : "offset");
    const bool use_slope = sl_alarm && !off_alarm ? true : (!off_alarm && !sl_alarm && slope_leads);
    f.statistic = use_slope ? sl_stat : off_stat;
    f.threshold = use_slope ? sl_thr : off_thr;
  };
  if (auto* c = std::get_if<CusumPair>(&detectors_)) {
    c->offset.update(in.offset);
    if (in.slope) c->slope.update(*in.slope);
    pick(c->offset.in_alarm(), c->slope.in_alarm(), std::max(c->offset.upper(), c->offset.lower()), c->offset.h(),
         std::max(c->slope.upper(), c->slope.lower()), c->slope.h());
  } else if (auto* e = std::get_if<EwmaPair>(&detectors_)) {
    e->offset.update(in.offset);
    if (in.slope) e->slope.update(*in.slope);
    pick(e->offset.in_alarm(), e->slope.in_alarm(), std::abs(e->offset.statistic()), e->offset.limit(),
         std::abs(e->slope.statistic()), e->slope.limit());
  } else if (auto* m = std::get_if<detect::NormalMixtureTest>(&detectors_)) {
    m->update(in.offset, in.d);
    f.present = m->rejected();
    f.test = "line";
    f.statistic = m->log_martingale();
    f.threshold = m->log_threshold();
  }
  return f;
}

double DriftMonitor::statistic_offset() const {
  if (const auto* c = std::get_if<CusumPair>(&detectors_)) return std::max(c->offset.upper(), c->offset.lower());
  if (const auto* e = std::get_if<EwmaPair>(&detectors_)) return e->offset.statistic();
  if (const auto* m = std::get_if<detect::NormalMixtureTest>(&detectors_)) return m->log_martingale();
  return 0;
}

double DriftMonitor::statistic_slope() const {
  if (const auto* c = std::get_if<CusumPair>(&detectors_)) return std::max(c->slope.upper(), c->slope.lower());
  if (const auto* e = std::get_if<EwmaPair>(&detectors_)) return e->slope.statistic();
  return 0;
}

// Checkpoint layout: phase, learned x values, the learned design inputs (sigma, centre), then the
// detector states. Designs are rebuilt from EngineTables, which are deterministic.
void DriftMonitor::save(state::BinaryWriter& w) const {
  w.u8(static_cast<std::uint8_t>(phase_));
  w.text(unavailable_reason_);
  w.u64(learning_.size());
  for (const LearnPair& p : learning_) {
    w.f64(p.x);
    w.f64(p.e);
  }
  w.f64(design_.sigma);
  w.boolean(design_.sigma_learned);
  w.f64(design_.centre.x_centre);
  w.f64(design_.centre.x_spread);
  w.f64(design_.centre.mean_abs_deviation);
  const bool running = phase_ == Phase::monitoring && innovations_.has_value();
  w.boolean(latched_);
  w.boolean(running);
  if (!running) return;
  const auto s = innovations_->state();
  w.u32(s.count);
  w.u32(static_cast<std::uint32_t>(s.side));
  for (std::size_t i = 0; i < s.count; ++i) {
    w.f64(s.held[i].x);
    w.f64(s.held[i].z);
  }
  // Every kind's state is written, zeros for the kinds the channel does not run (the layout is fixed).
  const auto* cusum = std::get_if<CusumPair>(&detectors_);
  for (const auto& c : {cusum ? cusum->offset.state() : detect::Cusum::State{},
                        cusum ? cusum->slope.state() : detect::Cusum::State{}}) {
    w.f64(c.upper);
    w.f64(c.lower);
  }
  const auto* ewma = std::get_if<EwmaPair>(&detectors_);
  w.f64(ewma ? ewma->offset.state().w : 0);
  w.f64(ewma ? ewma->slope.state().w : 0);
  const auto* mixture = std::get_if<detect::NormalMixtureTest>(&detectors_);
  const auto m = mixture ? mixture->state() : detect::NormalMixtureTest::State{};
  w.u64(m.n);
  w.f64(m.mean_d);
  w.f64(m.m2_d);
  w.f64(m.s0);
  w.f64(m.s1);
  w.boolean(m.rejected);
}

bool DriftMonitor::load(state::BinaryReader& r) {
  reset();
  const auto phase = r.u8();
  if (phase > static_cast<std::uint8_t>(Phase::unavailable)) return false;
  phase_ = static_cast<Phase>(phase);
  unavailable_reason_ = r.text(4096);
  const std::uint64_t n = r.count(16);
  for (std::uint64_t i = 0; i < n; ++i) {
    LearnPair p;
    p.x = r.f64();
    p.e = r.f64();
    learning_.push_back(p);
  }
  design_.sigma = r.f64();
  design_.sigma_learned = r.boolean();
  design_.centre.x_centre = r.f64();
  design_.centre.x_spread = r.f64();
  design_.centre.mean_abs_deviation = r.f64();
  const bool latched = r.boolean();
  const bool running = r.boolean();
  if (!r.ok()) return false;
  if (!running) return true;
  detect::SlopeInnovation::State s;
  s.count = r.u32();
  s.side = static_cast<std::int32_t>(r.u32());
  if (s.count > detect::SlopeInnovation::max_pending) return false;
  for (std::size_t i = 0; i < s.count; ++i) {
    s.held[i].x = r.f64();
    s.held[i].z = r.f64();
  }
  detect::Cusum::State co{r.f64(), r.f64()}, cs{r.f64(), r.f64()};
  detect::Ewma::State eo{r.f64()}, es{r.f64()};
  detect::NormalMixtureTest::State m;
  m.n = r.u64();
  m.mean_d = r.f64();
  m.m2_d = r.f64();
  m.s0 = r.f64();
  m.s1 = r.f64();
  m.rejected = r.boolean();
  if (!r.ok() || !(design_.sigma > 0)) return false;
  start_detectors();  // rebuilds the designed detectors, then their states are restored
  if (phase_ != Phase::monitoring) return true;
  if (!innovations_->restore(s)) return false;
  if (auto* c = std::get_if<CusumPair>(&detectors_); c && (!c->offset.restore(co) || !c->slope.restore(cs)))
    return false;
  if (auto* e = std::get_if<EwmaPair>(&detectors_); e && (!e->offset.restore(eo) || !e->slope.restore(es)))
    return false;
  if (auto* mt = std::get_if<detect::NormalMixtureTest>(&detectors_); mt && !mt->restore(m)) return false;
  latched_ = latched;
  phase_changed_ = false;
  return true;
}

}  // namespace rigcal::engine
