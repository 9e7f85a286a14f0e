#include "rigcal/sim/sensor_model.hpp"

#include <cmath>

namespace rigcal::sim {

namespace {
constexpr double seconds_per_day = 86400.0;

double days_since(const Fault& f, double t_s) { return (t_s - f.after_s) / seconds_per_day; }
}  // namespace

double quantise(double v, double step) {
  if (!(step > 0)) return v;
  const double q = std::round(v / step) * step;
  return q == 0 ? 0.0 : q;
}

SensorModel::SensorModel(const SensorReading& sensor, std::vector<Fault> faults)
    : sensor_(sensor), faults_(std::move(faults)), latched_(faults_.size()) {}

double SensorModel::slope_at(double t_s) const {
  double slope = sensor_.slope;
  for (const Fault& f : faults_) {
    if (t_s < f.after_s) continue;
    if (f.kind == Fault::Kind::gain_step) slope *= 1 + f.change;
    if (f.kind == Fault::Kind::ageing) slope *= 1 + f.gain_per_day * days_since(f, t_s);
  }
  return slope;
}

double SensorModel::offset_at(double t_s) const {
  double offset = sensor_.offset;
  for (const Fault& f : faults_) {
    if (t_s < f.after_s) continue;
    if (f.kind == Fault::Kind::offset_step) offset += f.change;
    if (f.kind == Fault::Kind::ageing) offset += f.offset_per_day * days_since(f, t_s);
  }
  return offset;
}

bool SensorModel::stuck_active(const Fault& f, double t_s) const {
  return f.kind == Fault::Kind::stuck && t_s >= f.after_s && (!f.duration_s || t_s < f.after_s + *f.duration_s);
}

SensorSample SensorModel::read(double t_s, double true_value, RandomStream& rng) {
  const double noise = rng.normal(0.0, sensor_.noise_sd);
  const bool spike = rng.chance(sensor_.spikes.probability);
  const double sign = rng.uniform01() < 0.5 ? -1.0 : 1.0;
  double y = offset_at(t_s) + slope_at(t_s) * true_value + noise;
  if (spike) y += sign * sensor_.spikes.size;
  SensorSample out{quantise(y, sensor_.resolution), spike, false};
  for (std::size_t i = 0; i < faults_.size(); ++i) {
    if (!stuck_active(faults_[i], t_s)) {
      latched_[i].reset();  // a stuck fault that has ended lets go; a later one latches afresh
      continue;
    }
    if (!latched_[i]) latched_[i] = out.value;
    out = SensorSample{*latched_[i], false, true};
  }
  return out;
}

}  // namespace rigcal::sim
