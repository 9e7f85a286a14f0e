// rigcal report: the calibration report a technician files after an as-found check, from a CSV file
// of pairs or from rigcald's journal and configuration. Writes one self-contained HTML page and,
// optionally, a plain-text summary.
//
// Roadmap: parse options -> check that they fit the chosen source -> gather the source's pairs,
// labels and metrology inputs -> build the report (all maths in the library) -> render and write.
#include <chrono>
#include <cstring>
#include <fmt/format.h>
#include <fstream>
#include <iostream>

#include "cli_support.hpp"
#include "report/journal_pairs.hpp"
#include "report/report_html.hpp"
#include "report/report_inputs.hpp"
#include "report/report_text.hpp"
#include "report/report_wording.hpp"
#include "rigcal/config/loader.hpp"
#include "rigcal/protocol/timestamp.hpp"
#include "rigcal/version.hpp"

namespace rigcal::tool {

namespace {

const char* const usage_line =
    "(--csv FILE [column options] | --journal STATE_DIR --config RIGCALD.YAML --channel ID [--since UTC] "
    "[--until UTC]) --output REPORT.html [--text REPORT.txt] [options]";

// Options that describe the sensor and its metrology: given on the command line for a CSV report,
// taken from the channel's configuration for a journal report.
constexpr const char* csv_only_options[] = {
    "reference-column", "sensor-column", "weight-column", "time-column", "u-reference-column", "u-sensor-column",
    "delimiter", "through-origin", "description", "units", "reference-id", "certificate-id", "certified-intercept",
    "certified-slope", "certified-intercept-u", "certified-slope-u", "certified-covariance", "tolerance-absolute",
    "tolerance-percent-of-reading", "tolerance-percent-of-span", "range", "decision-rule", "guard-band",
    "reference-expanded-uncertainty", "reference-coverage-factor", "reference-dof", "resolution", "confidence",
    "coverage", "errors-in-variables", "u-reference", "u-sensor"};

struct ReportCommandOptions {
  std::string csv, journal, config, channel, since, until, output, text;
  table::PairColumns columns;
  std::string delimiter = ",";
};

po::options_description describe_options(ReportCommandOptions& o) {
  po::options_description source("data source");
  source.add_options()
      ("csv", po::value(&o.csv), "CSV file of reference/sensor pairs ('-' reads standard input)")
      ("journal", po::value(&o.journal), "rigcald's state directory (journal segments, archive/ too)")
      ("config", po::value(&o.config), "rigcald's YAML configuration (with --journal)")
      ("channel", po::value(&o.channel), "channel id: selects the channel (--journal) or names the sensor (--csv)")
      ("since", po::value(&o.since), "first time included, UTC (RFC 3339 with Z, or epoch seconds)")
      ("until", po::value(&o.until), "end of the period, UTC, not included");
  po::options_description csv("CSV columns (as rigcal fit)");
  csv.add_options()
      ("reference-column", po::value(&o.columns.reference), "column of reference values x (name or 1-based index)")
      ("sensor-column", po::value(&o.columns.sensor), "column of sensor indications y")
      ("weight-column", po::value(&o.columns.weight), "column of weights (weighted least squares)")
      ("time-column", po::value(&o.columns.time), "column of UTC time stamps (residuals against time)")
      ("u-reference-column", po::value(&o.columns.u_reference), "column of u(x) per pair (errors in variables)")
      ("u-sensor-column", po::value(&o.columns.u_sensor), "column of u(y) per pair (errors in variables)")
      ("delimiter", po::value(&o.delimiter)->default_value(","), "field delimiter (one character)")
      ("through-origin", po::bool_switch(), "fit y = b1 x (no intercept)");
  po::options_description sensor("sensor, certificate and tolerance (CSV reports; a journal report reads them "
                                 "from the configuration)");
  sensor.add_options()
      ("description", po::value<std::string>(), "what the sensor is, in words")
      ("units", po::value<std::string>(), "units of the reference values and indications")
      ("reference-id", po::value<std::string>(), "id of the reference standard")
      ("certificate-id", po::value<std::string>(), "id of the sensor's calibration certificate")
      ("certified-intercept", po::value<double>(), "intercept b0* of the certificate line in use")
      ("certified-slope", po::value<double>(), "slope b1* of the certificate line in use")
      ("certified-intercept-u", po::value<double>(), "standard uncertainty of b0* (widens the tests)")
      ("certified-slope-u", po::value<double>(), "standard uncertainty of b1* (widens the tests)")
      ("certified-covariance", po::value<double>(), "covariance of b0* and b1*")
      ("tolerance-absolute", po::value<double>(), "maximum permissible error, absolute part (units)")
      ("tolerance-percent-of-reading", po::value<double>(), "maximum permissible error, % of reading")
      ("tolerance-percent-of-span", po::value<double>(), "maximum permissible error, % of span (needs --range)")
      ("range", po::value<std::vector<double>>()->multitoken(), "LO HI: reference values the sensor is used over")
      ("decision-rule", po::value<std::string>(), "simple or guarded (ILAC-G8 acceptance; default guarded)")
      ("guard-band", po::value<double>(), "fixed guard band w (guarded rule; default U of the error)")
      ("reference-expanded-uncertainty", po::value<double>(), "U of the reference standard's certificate (units)")
      ("reference-coverage-factor", po::value<double>(), "k of that U (default 2)")
      ("reference-dof", po::value<double>(), "degrees of freedom of the standard's u (default infinite)")
      ("resolution", po::value<double>(), "smallest step of the sensor's indication (units)")
      ("confidence", po::value<double>(), "two-sided confidence of intervals, bands and certificate tests (0.95)")
      ("coverage", po::value<double>(), "coverage probability of expanded uncertainties (0.95)")
      ("errors-in-variables", po::bool_switch(), "also fit a York line with uncertainty in both variables")
      ("u-reference", po::value<double>(), "standard uncertainty of every reference value (errors in variables)")
      ("u-sensor", po::value<double>(), "standard uncertainty of every indication (errors in variables)");
  po::options_description output("budget and output");
  output.add_options()
      ("reading", po::value<double>(), "indication whose corrected value is budgeted (default: the mean)")
      ("averaged-readings", po::value<double>(), "number m of readings averaged for that value (default 1)")
      ("output", po::value(&o.output)->required(), "HTML report to write")
      ("text", po::value(&o.text), "plain-text summary to write ('-' for standard output)");
  po::options_description all("options");
  all.add(source).add(csv).add(sensor).add(output);
  return all;
}

int usage_error(const std::string& message) {
  std::cerr << "rigcal report: " << message << "\nusage: rigcal report " << usage_line << "  (--help for options)\n";
  return exit_usage;
}

bool given(const po::variables_map& vm, const char* name) { return vm.count(name) && !vm[name].defaulted(); }

template <class T>
std::optional<T> optional_value(const po::variables_map& vm, const char* name) {
  if (!vm.count(name)) return std::nullopt;
  return vm[name].as<T>();
}

// Checks the combination of options for the chosen source; returns a message, or empty when fine.
std::string check_combination(const ReportCommandOptions& o, const po::variables_map& vm) {
  if (o.csv.empty() == o.journal.empty()) return "give exactly one data source: --csv FILE or --journal STATE_DIR";
  if (!o.journal.empty()) {
    if (o.config.empty() || o.channel.empty()) return "--journal needs --config RIGCALD.YAML and --channel ID";
    for (const char* name : csv_only_options)
      if (given(vm, name))
        return fmt::format("--{} is for --csv reports; a journal report takes it from the channel's configuration",
                           name);
    return {};
  }
  for (const char* name : {"config", "since", "until"})
    if (given(vm, name)) return fmt::format("--{} is for --journal reports", name);
  if (o.delimiter.size() != 1) return "--delimiter must be a single character";
  if (given(vm, "certified-slope") != given(vm, "certified-intercept") && !given(vm, "through-origin"))
    return "the certificate line needs both --certified-slope and --certified-intercept (0 for a line without one)";
  for (const char* name : {"certified-intercept-u", "certified-slope-u", "certified-covariance"})
    if (given(vm, name) && !given(vm, "certified-slope")) return fmt::format("--{} needs --certified-slope", name);
  if (given(vm, "range") && vm["range"].as<std::vector<double>>().size() != 2)
    return "--range takes two numbers: LO HI";
  if (given(vm, "reference-coverage-factor") && !given(vm, "reference-expanded-uncertainty"))
    return "--reference-coverage-factor needs --reference-expanded-uncertainty";
  if (given(vm, "decision-rule")) {
    const auto rule = vm["decision-rule"].as<std::string>();
    if (rule != "simple" && rule != "guarded") return "--decision-rule must be simple or guarded, got '" + rule + "'";
    if (rule == "simple" && given(vm, "guard-band")) return "--guard-band applies to the guarded rule only";
  }
  const bool tolerance = given(vm, "tolerance-absolute") || given(vm, "tolerance-percent-of-reading") ||
                         given(vm, "tolerance-percent-of-span");
  for (const char* name : {"decision-rule", "guard-band"})
    if (given(vm, name) && !tolerance) return fmt::format("--{} needs a tolerance (--tolerance-absolute, ...)", name);
  const bool eiv = given(vm, "errors-in-variables");
  if (eiv && given(vm, "through-origin")) return "--errors-in-variables fits the line model only, not --through-origin";
  const bool ux = given(vm, "u-reference") || !o.columns.u_reference.empty();
  const bool uy = given(vm, "u-sensor") || !o.columns.u_sensor.empty();
  if (!eiv && (ux || uy)) return "--u-reference, --u-sensor and their columns are used only with --errors-in-variables";
  if (eiv && !(ux && uy))
    return "--errors-in-variables needs the uncertainty of both variables: --u-reference (or --u-reference-column) "
           "and --u-sensor (or --u-sensor-column)";
  if ((given(vm, "u-reference") && !o.columns.u_reference.empty()) ||
      (given(vm, "u-sensor") && !o.columns.u_sensor.empty()))
    return "give each uncertainty either as a constant or as a column, not both";
  return {};
}

report::ReportOptions csv_report_options(const po::variables_map& vm) {
  report::ReportOptions o;
  o.model = given(vm, "through-origin") ? stats::Model::through_origin : stats::Model::line;
  o.confidence = optional_value<double>(vm, "confidence").value_or(0.95);
  o.coverage = optional_value<double>(vm, "coverage").value_or(0.95);
  if (auto slope = optional_value<double>(vm, "certified-slope")) {
    o.certificate = stats::CertifiedLine{optional_value<double>(vm, "certified-intercept").value_or(0.0), *slope,
                                         optional_value<double>(vm, "certified-intercept-u").value_or(0.0),
                                         optional_value<double>(vm, "certified-slope-u").value_or(0.0),
                                         optional_value<double>(vm, "certified-covariance").value_or(0.0)};
  }
  const auto abs = optional_value<double>(vm, "tolerance-absolute");
  const auto reading = optional_value<double>(vm, "tolerance-percent-of-reading");
  const auto span = optional_value<double>(vm, "tolerance-percent-of-span");
  if (abs || reading || span) {
    report::ToleranceInput t;
    t.mpe = {abs.value_or(0.0), reading.value_or(0.0), span.value_or(0.0)};
    if (auto r = optional_value<std::vector<double>>(vm, "range")) t.range = metrology::SensorRange{(*r)[0], (*r)[1]};
    if (optional_value<std::string>(vm, "decision-rule").value_or("guarded") == "simple")
      t.rule = metrology::DecisionRule::simple_acceptance;
    t.guard_band = optional_value<double>(vm, "guard-band");
    o.tolerance = t;
  }
  if (auto u = optional_value<double>(vm, "reference-expanded-uncertainty")) {
    o.reference = report::ReferenceStandardInput{*u, optional_value<double>(vm, "reference-coverage-factor").value_or(2.0),
                                                 optional_value<double>(vm, "reference-dof")
                                                     .value_or(std::numeric_limits<double>::infinity())};
  }
  o.resolution = optional_value<double>(vm, "resolution");
  if (given(vm, "errors-in-variables"))
    o.errors_in_variables = report::ErrorsInVariablesInput{optional_value<double>(vm, "u-reference"),
                                                           optional_value<double>(vm, "u-sensor")};
  return o;
}

report::ReportLabels csv_report_labels(const ReportCommandOptions& c, const po::variables_map& vm,
                                       const table::PairTable& t, const std::string& source) {
  report::ReportLabels l;
  l.channel = c.channel;
  l.description = optional_value<std::string>(vm, "description").value_or("");
  l.units = optional_value<std::string>(vm, "units").value_or("");
  l.reference_id = optional_value<std::string>(vm, "reference-id").value_or("");
  l.certificate_id = optional_value<std::string>(vm, "certificate-id").value_or("");
  l.source = "CSV file " + source + " (reference: column '" + t.reference_name + "', indication: column '" +
             t.sensor_name + "')";
  l.reference_name = "reference value, " + t.reference_name;
  l.sensor_name = "indication, " + t.sensor_name;
  return l;
}

struct Gathered {
  report::ReportLabels labels;
  report::ReportData data;
  report::ReportOptions options;
  std::string source;  // for messages
  std::optional<report::MonitoringHistory> monitoring;  // journal reports
};

// Reads the CSV source. Returns an exit status on failure (after printing the reason).
std::optional<int> gather_csv(const ReportCommandOptions& c, const po::variables_map& vm, Gathered& g) {
  std::string text, error;
  if (c.csv == "-") {
    text.assign(std::istreambuf_iterator<char>(std::cin), std::istreambuf_iterator<char>());
  } else if (auto contents = read_text_file(c.csv, error)) {
    text = std::move(*contents);
  } else {
    std::cerr << "rigcal report: " << error << "\n";
    return exit_no_input;
  }
  g.source = c.csv == "-" ? "<stdin>" : c.csv;
  auto table = table::read_pair_table(text, g.source, c.columns, c.delimiter[0]);
  if (!table) {
    std::cerr << "rigcal report: " << table.error().message << "\n";
    return exit_data;
  }
  auto data = report::data_from_table(table.value(), g.source, c.columns.time);
  if (!data) {
    std::cerr << "rigcal report: " << data.error().message << "\n";
    return exit_data;
  }
  g.data = std::move(data).value();
  g.options = csv_report_options(vm);
  g.labels = csv_report_labels(c, vm, table.value(), g.source);
  return std::nullopt;
}

std::optional<protocol::TimeNs> parse_time_option(const std::string& text, const char* name, std::string& error) {
  const auto parsed = protocol::parse_timestamp(text);
  if (!parsed.time) error = fmt::format("--{} \"{}\": not a UTC time ({})", name, text, parsed.error.reason);
  return parsed.time;
}

const config::ChannelConfig* find_channel(const config::Config& cfg, const std::string& id, std::string& known) {
  for (const auto& ch : cfg.channels) {
    if (ch.id == id) return &ch;
    known += (known.empty() ? "" : ", ") + ch.id;
  }
  return nullptr;
}

// Reads the configuration and the journal. Returns an exit status on failure.
std::optional<int> gather_journal(const ReportCommandOptions& c, Gathered& g) {
  report::JournalSelection sel;
  sel.channel = c.channel;
  std::string error;
  if (!c.since.empty() && !(sel.since = parse_time_option(c.since, "since", error))) return usage_error(error);
  if (!c.until.empty() && !(sel.until = parse_time_option(c.until, "until", error))) return usage_error(error);
  if (sel.since && sel.until && *sel.since >= *sel.until) return usage_error("--since must be before --until");
  auto yaml = read_text_file(c.config, error);
  if (!yaml) {
    std::cerr << "rigcal report: " << error << "\n";
    return exit_no_input;
  }
  const auto loaded = config::load_config(*yaml, c.config);
  if (!loaded.ok()) {
    for (const auto& e : loaded.errors) std::cerr << "rigcal report: " << e.to_string() << "\n";
    return exit_data;
  }
  std::string known;
  const config::ChannelConfig* ch = find_channel(loaded.config, c.channel, known);
  if (!ch) return usage_error(fmt::format("no channel '{}' in {} (channels: {})", c.channel, c.config, known));
  auto scan = report::scan_journal(c.journal, sel);
  if (!scan) {
    std::cerr << "rigcal report: " << scan.error().message << "\n";
    return exit_no_input;
  }
  g.source = c.journal;
  auto data = report::data_from_journal(scan.value(), *ch);
  if (!data) {
    std::cerr << "rigcal report: " << c.journal << ": " << data.error().message << "\n";
    return exit_data;
  }
  g.data = std::move(data).value();
  for (auto& n : report::journal_notes(scan.value(), *ch)) g.data.source_notes.push_back(std::move(n));
  g.options = report::options_from_channel(*ch);
  g.labels = report::labels_from_channel(*ch);
  g.labels.source = fmt::format("rigcald journal in {} ({} segment(s), {} archived), configuration {}", c.journal,
                                scan->segments, scan->archived_segments, c.config);
  if (sel.since) g.labels.period_from = protocol::format_rfc3339(*sel.since, 3);
  if (sel.until) g.labels.period_until = protocol::format_rfc3339(*sel.until, 3);
  auto history = report::replay_monitoring(c.journal, loaded.config, *ch, sel.until);
  if (!history) {
    std::cerr << "rigcal report: " << history.error().message << "\n";
    return exit_no_input;
  }
  g.monitoring = std::move(history).value();
  return std::nullopt;
}

bool write_file(const std::string& path, const std::string& content) {
  if (path == "-") {
    std::cout << content;
    return static_cast<bool>(std::cout.flush());
  }
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  if (out) out << content;
  if (out) out.close();
  if (!out) {
    std::cerr << "rigcal report: " << path << ": " << std::strerror(errno) << "\n";
    return false;
  }
  return true;
}

std::string now_utc() {
  const auto now = std::chrono::system_clock::now().time_since_epoch();
  return protocol::format_rfc3339(std::chrono::duration_cast<std::chrono::nanoseconds>(now).count(), 0);
}

}  // namespace

int run_report(const Args& args) {
  ReportCommandOptions c;
  const po::options_description options = describe_options(c);
  po::variables_map vm;
  const int style = po::command_line_style::unix_style & ~po::command_line_style::allow_short;
  if (auto done = parse_command_line("report", usage_line, args, options, {}, vm, "", style)) return *done;
  if (const std::string problem = check_combination(c, vm); !problem.empty()) return usage_error(problem);

  Gathered g;
  if (auto failed = c.journal.empty() ? gather_csv(c, vm, g) : gather_journal(c, g)) return *failed;
  g.options.reading = optional_value<double>(vm, "reading");
  if (auto m = optional_value<double>(vm, "averaged-readings")) {
    g.options.averaged_readings = *m;
    g.options.averaged_readings_origin = "";
  }
  g.labels.generated_utc = now_utc();
  g.labels.version = version_string;

  auto report = report::build_report(std::move(g.labels), std::move(g.data), std::move(g.options));
  if (!report) {
    std::cerr << "rigcal report: " << g.source << ": " << report.error().message << "\n";
    return exit_data;
  }
  report.value().monitoring = std::move(g.monitoring);
  if (!write_file(c.output, report::render_html(report.value()))) return exit_io;
  if (!c.text.empty() && !write_file(c.text, report::render_text(report.value()))) return exit_io;
  if (c.text != "-") {
    const auto& r = report.value();
    std::cout << fmt::format("rigcal report: wrote {} ({} pairs; tolerance {}; certificate {})\n", c.output,
                             r.fit.count, r.tolerance ? report::verdict_word(r.tolerance->verdict) : "not judged",
                             !r.certificate_verdict ? "not tested"
                             : r.certificate_verdict->slope_consistent && r.certificate_verdict->intercept_consistent &&
                                     r.certificate_verdict->joint_consistent
                                 ? "consistent"
                                 : "NOT consistent");
  }
  return exit_ok;
}

}  // namespace rigcal::tool
