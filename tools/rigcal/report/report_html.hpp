#pragma once
// The calibration report as one self-contained HTML page: inline CSS and inline SVG only, no
// scripts, no external resources, so that it renders offline and can be filed as it is.
//
// Numbers that tests or other tools may read carry their exact value next to the printed one:
// <td data-quantity="b1" data-value="1.0021168180204547">1.00211681802</td>.
#include <string>

#include "report_model.hpp"

namespace rigcal::report {

std::string render_html(const Report& r);

}  // namespace rigcal::report
