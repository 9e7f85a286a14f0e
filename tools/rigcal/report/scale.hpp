#pragma once
// Maps data values onto pixel positions along one axis of a plot, linearly or logarithmically.
// Pixels may run in either direction (an SVG y axis grows downwards, so its p0 is below p1).
namespace rigcal::report {

enum class ScaleKind { linear, log10 };

class Scale {
 public:
  // REQUIRES: d0 < d1 (both > 0 for log10), p0 != p1, all finite.
  Scale(ScaleKind kind, double d0, double d1, double p0, double p1);

  double to_pixel(double v) const;  // v outside [d0, d1] maps outside [p0, p1]; log10: v > 0
  double to_data(double px) const;

  ScaleKind kind() const { return kind_; }
  double d0() const { return d0_; }
  double d1() const { return d1_; }
  double p0() const { return p0_; }
  double p1() const { return p1_; }

 private:
  double transform(double v) const;
  ScaleKind kind_;
  double d0_, d1_, p0_, p1_;
};

}  // namespace rigcal::report
