#include "rigcal/engine/engine_tables.hpp"

#include <cmath>

namespace rigcal::engine {

const stats::TwoSidedT& EngineTables::t(double confidence) {
  auto& slot = t_[confidence];
  if (!slot) slot = std::make_unique<stats::TwoSidedT>(confidence);
  return *slot;
}

double EngineTables::grid_shift(double shift_sigma) {
  if (!(shift_sigma > 0) || !std::isfinite(shift_sigma)) return shift_sigma;
  const double steps = std::floor(std::log10(shift_sigma) * 20.0 + 1e-9);
  return std::pow(10.0, steps / 20.0);
}

const Result<detect::CusumDesign>& EngineTables::cusum(double target_arl0, double shift_sigma) {
  const auto key = std::make_pair(target_arl0, grid_shift(shift_sigma));
  auto it = cusum_.find(key);
  if (it == cusum_.end()) it = cusum_.emplace(key, detect::design_cusum(key.first, key.second)).first;
  return it->second;
}

const Result<detect::EwmaDesign>& EngineTables::ewma(double target_arl0, double shift_sigma) {
  const auto key = std::make_pair(target_arl0, grid_shift(shift_sigma));
  auto it = ewma_.find(key);
  if (it == ewma_.end()) it = ewma_.emplace(key, detect::design_ewma(key.first, key.second)).first;
  return it->second;
}

const Result<detect::MixtureDesign>& EngineTables::mixture(double alpha, double shift_sigma) {
  const auto key = std::make_pair(alpha, grid_shift(shift_sigma));
  auto it = mixture_.find(key);
  if (it == mixture_.end()) it = mixture_.emplace(key, detect::design_mixture(key.first, key.second)).first;
  return it->second;
}

}  // namespace rigcal::engine
