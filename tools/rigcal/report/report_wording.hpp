#pragma once
// The report's sentences that both renderings (HTML and plain text) print: verdicts in words, the
// cautions, and the R^2 caution. Plain text; the HTML rendering escapes it.
#include <string>
#include <vector>

#include "report_model.hpp"

namespace rigcal::report {

// The fitted model in words, e.g. "y = b0 + b1 x by ordinary least squares (unweighted)".
std::string model_sentence(const Report& r);

// One sentence each; empty when the piece was not given (the notes say so).
std::string certificate_sentence(const Report& r);
std::string tolerance_sentence(const Report& r);
std::string york_sentence(const Report& r);

// A high R^2 does not make a calibration fit for purpose.
std::string r2_caution();

// What the report and its verdicts are for, and what they are not.
std::vector<std::string> cautions();

// "pass", "fail", "indeterminate" in capitals for headlines.
std::string verdict_word(metrology::Verdict v);

// The origin of a tolerance check point in words ("low end of the range", ...).
std::string point_origin_words(metrology::PointOrigin o);

// A UTC time in seconds as RFC 3339 with whole seconds, or with milliseconds when it has a fraction.
std::string utc_text(double t_s);

// Sentences of the monitoring history (journal reports): the detector, its state, the forecast.
std::vector<std::string> monitoring_sentences(const MonitoringHistory& h, const std::string& units);

}  // namespace rigcal::report
