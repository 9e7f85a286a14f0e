#pragma once
// Writing the study's results: the full Markdown report, the compact table the README includes, a
// CSV of every cell, and the delay figure (SVG).
#include <string>

#include "study.hpp"

namespace rigcal::study {

// Facts about the run for the report's header.
struct RunInfo {
  std::string date_utc;  // RFC 3339
  std::string machine;   // CPU model, cores, OS
  std::string compiler;
  std::string command;  // the exact command line that produced the results
};
RunInfo describe_run(int argc, char** argv, const std::string& invoked_as);

std::string markdown_report(const StudyResults& res, const RunInfo& run);
// The headline table alone (ARL0, P(false alert within the target) and every change's delay per
// detector), for the README section.
std::string summary_table(const StudyResults& res);
std::string csv_cells(const StudyResults& res);
std::string delay_figure_svg(const StudyResults& res);

// Cell texts, exposed for tests: "20300 ± 640", "12.3 ± 0.4", ">= 1e5" and so on.
std::string format_estimate(double value, double standard_error);
std::string format_arl(const ArlEstimate& e);
std::string format_delay(const DelayEstimate& d);

}  // namespace rigcal::study
