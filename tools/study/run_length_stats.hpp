#pragma once
// Estimates from Monte Carlo run lengths, some of them censored (stopped at a limit without an alarm).
#include <cstdint>
#include <vector>

namespace rigcal::study {

struct RunLength {
  std::uint64_t pairs = 0;  // up to and including the alarm; the limit when censored
  bool alarmed = false;
};

// In-control average run length.
//  - No run censored: the sample mean, with its standard error s / sqrt(n) (no model needed).
//  - Some censored: the maximum-likelihood estimate for geometric run lengths, total pairs observed
//    divided by the number of alarms, with standard error ARL / sqrt(alarms) (the inverse Fisher
//    information). CUSUM and EWMA run lengths from the zero state are close to geometric once the
//    statistic has left its start (Brook & Evans 1972 show the geometric tail; from memory), and the
//    study keeps censoring rare by stopping at several times the target, so the model matters little.
//    With no alarm at all the estimate is +infinity and `lower_bound_95` says how small it could be.
struct ArlEstimate {
  double arl = 0;
  double standard_error = 0;
  std::uint64_t runs = 0;
  std::uint64_t alarms = 0;
  std::uint64_t censored = 0;
  double exposure_pairs = 0;  // total pairs observed
  // One-sided 95 % lower bound on the ARL: exposure / 3 when no alarm was seen (3 = -ln 0.05, the
  // Poisson bound on the rate), else ARL - 1.645 SE.
  double lower_bound_95 = 0;
};
ArlEstimate estimate_arl(const std::vector<RunLength>& runs);

// Fraction of runs with an alarm at or before `horizon` pairs (a run censored before the horizon does
// not count: the study's limits are beyond every horizon it asks about), with its binomial standard error.
struct Proportion {
  double p = 0;
  double standard_error = 0;
  std::uint64_t runs = 0;
};
Proportion alarm_fraction_by(const std::vector<RunLength>& runs, std::uint64_t horizon);

// Detection delays: pairs from the change to the alert, over the runs with no false alert before the
// change. Censored delays (no alert within the limit) enter the mean at the limit, which makes the mean
// a lower bound; `censored` says how many.
struct DelayEstimate {
  double mean = 0;
  double standard_error = 0;
  double median = 0;
  std::uint64_t runs = 0;          // runs that reached the change without a false alert
  std::uint64_t false_alerts = 0;  // runs discarded because of an alert before the change
  std::uint64_t censored = 0;
};
DelayEstimate estimate_delay(const std::vector<RunLength>& delays, std::uint64_t false_alerts);

}  // namespace rigcal::study
