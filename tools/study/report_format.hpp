#pragma once
// Internal helpers of the report writers.
#include <string>

#include "run_length_stats.hpp"

namespace rigcal::study {

// printf into a string (at most 511 characters).
std::string format(const char* f, ...) __attribute__((format(printf, 1, 2)));
std::string format_probability(const Proportion& p);

}  // namespace rigcal::study
