#include "scale.hpp"

#include <cmath>

namespace rigcal::report {

Scale::Scale(ScaleKind kind, double d0, double d1, double p0, double p1)
    : kind_(kind), d0_(d0), d1_(d1), p0_(p0), p1_(p1) {}

double Scale::transform(double v) const { return kind_ == ScaleKind::log10 ? std::log10(v) : v; }

double Scale::to_pixel(double v) const {
  const double f = (transform(v) - transform(d0_)) / (transform(d1_) - transform(d0_));
  return p0_ + f * (p1_ - p0_);
}

double Scale::to_data(double px) const {
  const double f = (px - p0_) / (p1_ - p0_);
  const double t = transform(d0_) + f * (transform(d1_) - transform(d0_));
  return kind_ == ScaleKind::log10 ? std::pow(10.0, t) : t;
}

}  // namespace rigcal::report
