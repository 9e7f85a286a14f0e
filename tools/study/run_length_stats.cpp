#include "run_length_stats.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace rigcal::study {

namespace {

struct Moments {
  double mean = 0, standard_error = 0;
};

Moments sample_moments(const std::vector<RunLength>& runs) {
  Moments m;
  const double n = static_cast<double>(runs.size());
  if (runs.empty()) return m;
  double sum = 0;
  for (const auto& r : runs) sum += static_cast<double>(r.pairs);
  m.mean = sum / n;
  if (runs.size() < 2) return m;
  double ss = 0;
  for (const auto& r : runs) ss += (static_cast<double>(r.pairs) - m.mean) * (static_cast<double>(r.pairs) - m.mean);
  m.standard_error = std::sqrt(ss / (n - 1) / n);
  return m;
}

}  // namespace

ArlEstimate estimate_arl(const std::vector<RunLength>& runs) {
  ArlEstimate e;
  e.runs = runs.size();
  for (const auto& r : runs) {
    e.exposure_pairs += static_cast<double>(r.pairs);
    if (r.alarmed) {
      ++e.alarms;
    } else {
      ++e.censored;
    }
  }
  if (e.alarms == 0) {
    e.arl = std::numeric_limits<double>::infinity();
    e.standard_error = std::numeric_limits<double>::infinity();
    e.lower_bound_95 = e.exposure_pairs / 3.0;
    return e;
  }
  if (e.censored == 0) {
    const Moments m = sample_moments(runs);
    e.arl = m.mean;
    e.standard_error = m.standard_error;
  } else {
    e.arl = e.exposure_pairs / static_cast<double>(e.alarms);
    e.standard_error = e.arl / std::sqrt(static_cast<double>(e.alarms));
  }
  e.lower_bound_95 = e.arl - 1.645 * e.standard_error;
  return e;
}

Proportion alarm_fraction_by(const std::vector<RunLength>& runs, std::uint64_t horizon) {
  Proportion p;
  p.runs = runs.size();
  if (runs.empty()) return p;
  std::uint64_t hits = 0;
  for (const auto& r : runs) hits += r.alarmed && r.pairs <= horizon;
  const double n = static_cast<double>(runs.size());
  p.p = static_cast<double>(hits) / n;
  p.standard_error = std::sqrt(p.p * (1 - p.p) / n);
  return p;
}

DelayEstimate estimate_delay(const std::vector<RunLength>& delays, std::uint64_t false_alerts) {
  DelayEstimate d;
  d.runs = delays.size();
  d.false_alerts = false_alerts;
  if (delays.empty()) return d;
  for (const auto& r : delays) d.censored += !r.alarmed;
  const Moments m = sample_moments(delays);
  d.mean = m.mean;
  d.standard_error = m.standard_error;
  std::vector<std::uint64_t> sorted;
  sorted.reserve(delays.size());
  for (const auto& r : delays) sorted.push_back(r.pairs);
  std::sort(sorted.begin(), sorted.end());
  const std::size_t n = sorted.size();
  d.median = n % 2 ? static_cast<double>(sorted[n / 2])
                   : 0.5 * static_cast<double>(sorted[n / 2 - 1] + sorted[n / 2]);
  return d;
}

}  // namespace rigcal::study
