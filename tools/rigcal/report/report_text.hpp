#pragma once
// The calibration report's plain-text summary: the same identity, results, verdicts, notes and
// cautions as the HTML page, without the figures, for a log book, an e-mail or a terminal.
#include <string>

#include "report_model.hpp"

namespace rigcal::report {

std::string render_text(const Report& r);

}  // namespace rigcal::report
