#pragma once
// Tables shared by all channels: Student t critical values per confidence level, and detector designs
// per (target ARL0, design shift). Building either costs milliseconds, so channels share them; a
// plant with 100 000 channels has only a handful of distinct settings.
//
// Design shifts are rounded DOWN to a grid of 20 steps per decade (12 % apart) before designing:
// a slightly smaller design shift keeps the ARL0 target exactly and detects the configured shift
// marginally later than an exact design would, and it bounds the number of designs.
#include <map>
#include <memory>
#include <tuple>

#include "rigcal/detect/arl.hpp"
#include "rigcal/detect/mixture.hpp"
#include "rigcal/result.hpp"
#include "rigcal/stats/quantiles.hpp"

namespace rigcal::engine {

class EngineTables {
 public:
  // REQUIRES: 0 < confidence < 1. The reference stays valid for the tables' lifetime.
  const stats::TwoSidedT& t(double confidence);

  static double grid_shift(double shift_sigma);
  const Result<detect::CusumDesign>& cusum(double target_arl0, double shift_sigma);
  const Result<detect::EwmaDesign>& ewma(double target_arl0, double shift_sigma);
  const Result<detect::MixtureDesign>& mixture(double alpha, double shift_sigma);

 private:
  std::map<double, std::unique_ptr<stats::TwoSidedT>> t_;
  std::map<std::pair<double, double>, Result<detect::CusumDesign>> cusum_;
  std::map<std::pair<double, double>, Result<detect::EwmaDesign>> ewma_;
  std::map<std::pair<double, double>, Result<detect::MixtureDesign>> mixture_;
};

}  // namespace rigcal::engine
