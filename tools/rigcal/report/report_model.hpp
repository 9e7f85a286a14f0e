#pragma once
// The calibration report as a value: what the technician supplied (pairs, labels, certificate,
// tolerance, reference standard, options) and everything computed from it with the library's
// statistics and metrology (never a second copy of the maths). The HTML and text renderers only
// format this value; the command only gathers its inputs.
//
// Every optional piece that is absent is recorded as a sentence saying what was not given and what
// is therefore missing from the report (Report::notes), so that no section silently disappears.
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "rigcal/metrology/corrected_value_budget.hpp"
#include "rigcal/metrology/max_permissible_error.hpp"
#include "rigcal/metrology/reference_standard.hpp"
#include "rigcal/metrology/tolerance_verdict.hpp"
#include "rigcal/result.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/york_fit.hpp"
#include "monitoring_history.hpp"

namespace rigcal::report {

// The calibration pairs, already in engineering units (linearised), in the order they were taken.
struct ReportData {
  std::vector<double> x, y;        // reference values, sensor indications
  std::vector<double> w;           // precision weights; empty: unweighted
  std::vector<double> u_x, u_y;    // per-pair standard uncertainties (errors-in-variables); may be empty
  std::vector<double> time_s;      // UTC seconds since the epoch of each pair; empty: not known
  std::vector<std::string> where;  // where each pair came from ("asfound.csv:14", "segment 3"), for notes
  std::vector<std::string> source_notes;  // what the source's reader left out or found, one sentence each
};

// Identification: what the report is about and where its data came from. Free text, escaped on output.
struct ReportLabels {
  std::string channel;       // channel or sensor id
  std::string description;
  std::string units;         // of the reference values and the indications (both in the channel's units)
  std::string source;        // the data source in words: a file, or a state directory and a period
  std::string reference_name = "reference value";  // axis wording for x and y
  std::string sensor_name = "sensor indication";
  std::string reference_id;  // reference standard
  std::string certificate_id;
  std::string generated_utc;  // when the report was made, RFC 3339
  std::string version;        // rigcal's version
  std::optional<std::string> period_from, period_until;  // a selected period (journal), RFC 3339
};

struct ReferenceStandardInput {
  double expanded_uncertainty = 0;  // U of its certificate, channel units
  double coverage_factor = 2;       // k of that U
  double dof = std::numeric_limits<double>::infinity();
};

struct ToleranceInput {
  metrology::MaximumPermissibleError mpe;
  std::optional<metrology::SensorRange> range;
  metrology::DecisionRule rule = metrology::DecisionRule::guarded_acceptance;
  std::optional<double> guard_band;  // fixed w; default U_e at each point (guarded rule)
};

struct ErrorsInVariablesInput {
  // Standard uncertainty of every reference value / indication, used when the data has no per-pair
  // uncertainties. REQUIRES (checked by build_report): each given > 0.
  std::optional<double> u_reference, u_sensor;
};

struct ReportOptions {
  stats::Model model = stats::Model::line;
  double confidence = 0.95;  // coefficient intervals, bands and the certificate tests
  double coverage = 0.95;    // expanded uncertainties (budget, tolerance)
  std::optional<stats::CertifiedLine> certificate;
  bool widen_by_certificate = true;  // widen the certificate tests by its stated uncertainties
  std::optional<ToleranceInput> tolerance;
  std::optional<ReferenceStandardInput> reference;
  std::optional<double> resolution;  // channel units
  std::optional<double> reading;     // representative indication for the budget; default: mean indication
  double averaged_readings = 1;      // m for the budget table
  std::string averaged_readings_origin = "";  // why that m ("--averaged-readings", the configuration), or empty
  std::optional<ErrorsInVariablesInput> errors_in_variables;
  // The inputs come from rigcald's configuration (a report from the journal), not from the command
  // line: the notes then name configuration keys instead of options.
  bool from_configuration = false;
};

// A sampled band of the fitted line: its confidence and prediction intervals at x.
struct BandSample {
  double x = 0, fit = 0;
  stats::Interval confidence, prediction;
};

// The corrected value's uncertainty after averaging m readings, at the representative reading.
struct AveragingPoint {
  double m = 1;
  double u_c = 0;            // combined standard uncertainty, reference units
  double u_repeatability = 0;
  double floor = 0;          // what averaging cannot reduce: calibration line, reference, resolution
  double nu_eff = 0, k = 0, expanded = 0;
};

struct ResidualSummary {
  std::vector<double> residuals;  // y - fit(x), indication units
  std::size_t largest_index = 0;  // of the largest |standardised residual|
  double largest_standardised = 0;  // r sqrt(w) / (s sqrt(1 - w h)); 0 when s = 0
};

struct Report {
  ReportLabels labels;
  ReportData data;
  ReportOptions options;

  stats::LineFit fit;
  stats::CoefficientIntervals intervals;
  ResidualSummary residuals;
  std::vector<BandSample> band;  // across the plotted reference values, for the bands

  std::optional<stats::CertificateVerdict> certificate_verdict;
  std::optional<stats::YorkFit> york;
  std::optional<metrology::ReferenceStandardUncertainty> reference;  // u = U/k when stated
  std::optional<metrology::ToleranceVerdict> tolerance;
  std::vector<metrology::SensorError> error_curve;  // e(x) +- U_e across the range, for the plot

  double reading = 0;  // the indication whose corrected value is budgeted
  metrology::CorrectedValue corrected;
  std::vector<AveragingPoint> averaging;        // m = 1 .. 10^4 for the plot
  std::vector<AveragingPoint> averaging_table;  // m = 1, 10, ..., 10^4

  // Journal reports only: the channel replayed through the daemon's engine (monitoring_history.hpp).
  std::optional<MonitoringHistory> monitoring;

  // Sentences for what was not given or could not be done, by section.
  std::vector<std::string> certificate_notes, tolerance_notes, budget_notes, york_notes, data_notes;
};

// Builds the report. Errors: the fit itself fails (too few pairs, no spread in the reference values,
// a weight or uncertainty out of range), an option is out of range (confidence or coverage not in
// (0, 1), m < 1, negative resolution, bad reference standard), the errors-in-variables fit was asked
// for without uncertainties or fails, or the corrected value cannot be formed (slope zero).
// A tolerance that cannot be judged (no certificate, no range) is a note, not an error; an invalid
// tolerance (negative terms, lo >= hi) is an error.
Result<Report> build_report(ReportLabels labels, ReportData data, ReportOptions options);

// Words for the model and confidence levels, shared by both renderings.
std::string percent_label(double probability);  // 0.95 -> "95 %", 0.9545 -> "95.45 %"

}  // namespace rigcal::report
