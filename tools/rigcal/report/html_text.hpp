#pragma once
// Text that goes into the report's HTML and SVG: escaping of user-supplied text (channel ids,
// descriptions, column names, file names) and numbers written for machines (data attributes).
#include <span>
#include <string>
#include <string_view>

namespace rigcal::report {

// Escapes & < > " ' so that the text is safe both as element content and inside a quoted attribute
// value. Control characters other than tab, LF and CR are replaced by U+FFFD: they are not allowed in
// HTML text and would make the SVG ill-formed XML.
std::string escape_html(std::string_view text);

// The shortest decimal text that reads back as exactly `v` ("inf", "-inf", "nan" for the others),
// for data attributes that tests and other tools parse.
std::string exact_number(double v);

// exact_number of each value, separated by single spaces.
std::string exact_number_list(std::span<const double> values);

}  // namespace rigcal::report
