// rigcal fit: the offline as-found calibration of one sensor from a CSV file of pairs.
#include <cmath>
#include <fmt/format.h>
#include <iostream>
#include <nlohmann/json.hpp>

#include "cli_support.hpp"
#include "rigcal/stats/inference.hpp"
#include "rigcal/stats/streaming_fit.hpp"
#include "rigcal/stats/york_fit.hpp"
#include "rigcal/table/pair_table.hpp"

namespace rigcal::tool {

namespace {

using namespace rigcal::stats;

struct FitOptions {
  std::string file;
  table::PairColumns columns;
  std::string delimiter = ",";
  double confidence = 0.95;
  bool through_origin = false;
  bool json = false;
  std::optional<double> certified_intercept, certified_slope;
  double u_certified_intercept = 0, u_certified_slope = 0;
  bool errors_in_variables = false;
  std::optional<double> u_reference, u_sensor;  // constant standard uncertainties for the York fit
};

nlohmann::ordered_json interval_json(const Interval& i) { return nlohmann::ordered_json::array({i.lo, i.hi}); }

nlohmann::ordered_json to_json(const FitOptions& o, const LineFit& f, const CoefficientIntervals& ci,
                       const std::optional<CertificateVerdict>& verdict, const CertifiedLine& cert,
                       const std::optional<YorkFit>& york) {
  const bool line = f.model == Model::line;
  nlohmann::ordered_json j = {
      {"source", o.file},
      {"model", line ? "line" : "through_origin"},
      {"method", york ? "york" : (o.columns.weight.empty() ? "ols" : "wls")},
      {"confidence", o.confidence},
      {"t", ci.t},
      {"n", f.count},
      {"dof", f.dof},
      {"b0", line ? nlohmann::ordered_json(f.b0) : nlohmann::ordered_json()},
      {"b1", f.b1},
      {"se_b0", line ? nlohmann::ordered_json(f.se_b0) : nlohmann::ordered_json()},
      {"se_b1", f.se_b1},
      {"cov_b0_b1", line ? nlohmann::ordered_json(f.cov_b0_b1) : nlohmann::ordered_json()},
      {"corr_b0_b1", line ? nlohmann::ordered_json(f.corr_b0_b1) : nlohmann::ordered_json()},
      {"s", york ? nlohmann::ordered_json() : nlohmann::ordered_json(f.s)},
      {"r2", f.r2 && !york ? nlohmann::ordered_json(*f.r2) : nlohmann::ordered_json()},
      {"ci_b0", line ? interval_json(ci.b0) : nlohmann::ordered_json()},
      {"ci_b1", interval_json(ci.b1)},
      {"mean_x", f.mean_x},
      {"mean_y", f.mean_y},
      {"sxx", f.sxx},
      {"ssr", f.ssr},
  };
  if (york)
    j["york"] = {{"chi_square", york->chi_square},
                 {"reduced_chi_square", york->reduced_chi_square},
                 {"p_value", york->p_value},
                 {"se_b0_scaled", york->u_a_scaled},
                 {"se_b1_scaled", york->u_b_scaled},
                 {"iterations", york->iterations}};
  if (verdict) {
    j["certificate"] = {{"intercept", cert.intercept}, {"slope", cert.slope},
                        {"u_intercept", cert.u_intercept}, {"u_slope", cert.u_slope}};
    j["verdict"] = {
        {"slope", {{"consistent", verdict->slope_consistent}, {"deviation", verdict->slope_deviation},
                   {"limit", verdict->slope_limit}}},
        {"intercept", line ? nlohmann::ordered_json{{"consistent", verdict->intercept_consistent},
                                            {"deviation", verdict->intercept_deviation},
                                            {"limit", verdict->intercept_limit}}
                           : nlohmann::ordered_json()},
        {"joint", {{"consistent", verdict->joint_consistent}, {"statistic", verdict->joint_statistic},
                   {"critical", verdict->joint_critical}}},
        {"consistent", verdict->slope_consistent && verdict->intercept_consistent && verdict->joint_consistent},
    };
  }
  return j;
}

const char* agreement(bool consistent) { return consistent ? "consistent" : "NOT consistent"; }

void print_summary(const FitOptions& o, const table::PairTable& t, const LineFit& f, const CoefficientIntervals& ci,
                   const std::optional<CertificateVerdict>& verdict, const CertifiedLine& cert,
                   const std::optional<YorkFit>& york) {
  const bool line = f.model == Model::line;
  const int pct = static_cast<int>(std::lround(o.confidence * 1000));
  const std::string conf = pct % 10 == 0 ? fmt::format("{}", pct / 10) : fmt::format("{:.1f}", pct / 10.0);
  std::cout << fmt::format("{}: {} pairs, {} = {}, {} % two-sided intervals (t = {:.4f}, {} dof)\n\n",
                           o.file, f.count, t.sensor_name, line ? "b0 + b1 * " + t.reference_name
                                                                : "b1 * " + t.reference_name,
                           conf, ci.t, f.dof);
  if (line)
    std::cout << fmt::format("  intercept b0  {:>18.12g}   SE {:<14.8g} [{:.8g}, {:.8g}]\n", f.b0, f.se_b0, ci.b0.lo,
                             ci.b0.hi);
  std::cout << fmt::format("  slope     b1  {:>18.12g}   SE {:<14.8g} [{:.8g}, {:.8g}]\n", f.b1, f.se_b1, ci.b1.lo,
                           ci.b1.hi);
  if (line)
    std::cout << fmt::format("  cov(b0, b1)   {:>18.8g}   correlation {:.4f}\n", f.cov_b0_b1, f.corr_b0_b1);
  if (york) {
    std::cout << fmt::format("  York fit (uncertainty in both variables): chi^2 {:.6g} on {} dof, reduced {:.4g}, p {:.4g}\n",
                             york->chi_square, york->dof, york->reduced_chi_square, york->p_value);
    std::cout << fmt::format("  standard errors from the stated uncertainties; scaled by sqrt(chi^2/dof): SE(b0) {:.8g}, "
                             "SE(b1) {:.8g}\n",
                             york->u_a_scaled, york->u_b_scaled);
  } else {
    std::cout << fmt::format("  residual SD s {:>18.12g}   R^2 {}\n", f.s,
                             f.r2 ? fmt::format("{:.12g}", *f.r2) : std::string("undefined (no spread in readings)"));
  }
  std::cout << fmt::format("  mean {} {:.10g}, mean {} {:.10g}, Sxx {:.10g}\n", t.reference_name, f.mean_x,
                           t.sensor_name, f.mean_y, f.sxx);
  if (!verdict) return;
  std::cout << fmt::format("\n  certificate: b0* = {:g} (u {:g}), b1* = {:g} (u {:g})\n", cert.intercept,
                           cert.u_intercept, cert.slope, cert.u_slope);
  std::cout << fmt::format("  slope      {:<15} |b1 - b1*| = {:.6g}, limit {:.6g}\n",
                           agreement(verdict->slope_consistent), std::abs(verdict->slope_deviation),
                           verdict->slope_limit);
  if (line) {
    std::cout << fmt::format("  intercept  {:<15} |b0 - b0*| = {:.6g}, limit {:.6g}\n",
                             agreement(verdict->intercept_consistent), std::abs(verdict->intercept_deviation),
                             verdict->intercept_limit);
    std::cout << fmt::format("  joint      {:<15} F = {:.6g}, critical F(2, {:g}) = {:.6g}\n",
                             agreement(verdict->joint_consistent), verdict->joint_statistic, std::floor(f.dof),
                             verdict->joint_critical);
  }
  std::cout << "\n  These verdicts test statistical agreement with the certificate line; they are not a\n"
               "  tolerance pass/fail and do not replace a calibration by an accredited laboratory.\n";
}

}  // namespace

int run_fit(const Args& args) {
  FitOptions o;
  po::options_description options("options");
  options.add_options()
      ("file", po::value(&o.file)->required(), "CSV file of pairs ('-' reads standard input)")
      ("reference-column", po::value(&o.columns.reference), "column of reference values x (name or 1-based index)")
      ("sensor-column", po::value(&o.columns.sensor), "column of sensor readings y (name or 1-based index)")
      ("weight-column", po::value(&o.columns.weight), "column of weights (weighted least squares)")
      ("delimiter", po::value(&o.delimiter)->default_value(","), "field delimiter (one character)")
      ("confidence", po::value(&o.confidence)->default_value(0.95), "two-sided confidence level, 0 < c < 1")
      ("through-origin", po::bool_switch(&o.through_origin), "fit y = b1 x (no intercept)")
      ("certified-intercept", po::value<double>(), "intercept b0* from the sensor's certificate")
      ("certified-slope", po::value<double>(), "slope b1* from the sensor's certificate")
      ("certified-intercept-u", po::value(&o.u_certified_intercept), "standard uncertainty of b0* (widens the tests)")
      ("certified-slope-u", po::value(&o.u_certified_slope), "standard uncertainty of b1* (widens the tests)")
      ("errors-in-variables", po::bool_switch(&o.errors_in_variables),
       "York fit with uncertainty in both variables (give --u-reference/--u-sensor or their columns)")
      ("u-reference", po::value<double>(), "standard uncertainty of every reference value (York fit)")
      ("u-sensor", po::value<double>(), "standard uncertainty of every sensor reading (York fit)")
      ("u-reference-column", po::value(&o.columns.u_reference), "column of per-row reference uncertainties (York fit)")
      ("u-sensor-column", po::value(&o.columns.u_sensor), "column of per-row sensor uncertainties (York fit)")
      ("json", po::bool_switch(&o.json), "print one JSON object instead of the summary");
  po::positional_options_description positional;
  positional.add("file", 1);
  po::variables_map vm;
  if (auto done = parse_command_line("fit", "FILE [options]", args, options, positional, vm)) return *done;
  if (vm.count("certified-intercept")) o.certified_intercept = vm["certified-intercept"].as<double>();
  if (vm.count("certified-slope")) o.certified_slope = vm["certified-slope"].as<double>();
  if (vm.count("u-reference")) o.u_reference = vm["u-reference"].as<double>();
  if (vm.count("u-sensor")) o.u_sensor = vm["u-sensor"].as<double>();
  if (o.errors_in_variables) {
    const bool x_given = o.u_reference.has_value() != !o.columns.u_reference.empty();
    const bool y_given = o.u_sensor.has_value() != !o.columns.u_sensor.empty();
    if (!x_given || !y_given) {
      std::cerr << "rigcal fit: --errors-in-variables needs one of --u-reference/--u-reference-column and one of "
                   "--u-sensor/--u-sensor-column\n";
      return exit_usage;
    }
    if ((o.u_reference && !(*o.u_reference > 0)) || (o.u_sensor && !(*o.u_sensor > 0))) {
      std::cerr << "rigcal fit: uncertainties must be greater than zero\n";
      return exit_usage;
    }
    if (o.through_origin || !o.columns.weight.empty()) {
      std::cerr << "rigcal fit: --errors-in-variables fits a line with its own weights (no --through-origin, "
                   "no --weight-column)\n";
      return exit_usage;
    }
  } else if (o.u_reference || o.u_sensor || !o.columns.u_reference.empty() || !o.columns.u_sensor.empty()) {
    std::cerr << "rigcal fit: uncertainty options need --errors-in-variables\n";
    return exit_usage;
  }

  if (!(o.confidence > 0 && o.confidence < 1)) {
    std::cerr << "rigcal fit: --confidence must be between 0 and 1 (exclusive), got " << o.confidence << "\n";
    return exit_usage;
  }
  if (o.delimiter.size() != 1) {
    std::cerr << "rigcal fit: --delimiter must be a single character\n";
    return exit_usage;
  }
  if (o.u_certified_intercept < 0 || o.u_certified_slope < 0) {
    std::cerr << "rigcal fit: certificate uncertainties must not be negative\n";
    return exit_usage;
  }
  if (o.certified_intercept && !o.certified_slope && !o.through_origin) {
    std::cerr << "rigcal fit: --certified-intercept needs --certified-slope\n";
    return exit_usage;
  }

  std::string text, error;
  if (o.file == "-") {
    text.assign(std::istreambuf_iterator<char>(std::cin), std::istreambuf_iterator<char>());
  } else if (auto contents = read_text_file(o.file, error)) {
    text = std::move(*contents);
  } else {
    std::cerr << "rigcal fit: " << error << "\n";
    return exit_no_input;
  }
  const std::string source = o.file == "-" ? "<stdin>" : o.file;
  auto table = table::read_pair_table(text, source, o.columns, o.delimiter[0]);
  if (!table) {
    std::cerr << "rigcal fit: " << table.error().message << "\n";
    return exit_data;
  }
  const bool weighted = !table->w.empty();
  StreamingLineFit fit(MemoryPolicy::cumulative(), weighted);
  for (std::size_t i = 0; i < table->x.size(); ++i) fit.add(table->x[i], table->y[i], weighted ? table->w[i] : 1.0);
  const Model model = o.through_origin ? Model::through_origin : Model::line;
  auto summary = fit.summary(model);
  std::optional<YorkFit> york;
  if (o.errors_in_variables && summary) {
    const std::size_t n = table->x.size();
    std::vector<double> ux = table->u_x.empty() ? std::vector<double>(n, *o.u_reference) : table->u_x;
    std::vector<double> uy = table->u_y.empty() ? std::vector<double>(n, *o.u_sensor) : table->u_y;
    auto y = york_fit(table->x, ux, table->y, uy);
    if (!y) {
      std::cerr << "rigcal fit: " << source << ": York fit: " << y.error().message << "\n";
      return exit_data;
    }
    double sum_uy2 = 0;
    for (double u : uy) sum_uy2 += u * u;
    york = y.value();
    summary = line_fit_from_york(*york, std::sqrt(sum_uy2 / static_cast<double>(n)));
  }
  if (!summary) {
    std::cerr << "rigcal fit: " << source << ": " << summary.error().message << "\n";
    return exit_data;
  }
  const TwoSidedT t(o.confidence);
  const CoefficientIntervals ci = coefficient_intervals(summary.value(), t);
  CertifiedLine cert;
  std::optional<CertificateVerdict> verdict;
  if (o.certified_slope) {
    cert = {o.certified_intercept.value_or(0.0), *o.certified_slope, o.u_certified_intercept, o.u_certified_slope};
    verdict = judge_against_certificate(summary.value(), cert, t, true);
  }
  if (o.json)
    std::cout << to_json(o, summary.value(), ci, verdict, cert, york).dump(2) << "\n";
  else
    print_summary(o, table.value(), summary.value(), ci, verdict, cert, york);
  return exit_ok;
}

}  // namespace rigcal::tool
