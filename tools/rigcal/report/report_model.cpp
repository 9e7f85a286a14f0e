#include "report_model.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "rigcal/stats/streaming_fit.hpp"

namespace rigcal::report {

namespace {

constexpr int band_samples = 81;
constexpr int error_curve_samples = 61;
constexpr int averaging_samples_per_decade = 8;
constexpr int averaging_decades = 4;  // m = 1 .. 10^4

// How the reader supplies a missing piece: an option for a CSV report, a configuration key for one
// from the journal.
std::string how(const ReportOptions& o, const char* option, const char* key) {
  return o.from_configuration ? fmt::format("channel key {}", key) : fmt::format("{}", option);
}

Status check_options(const ReportData& d, const ReportOptions& o) {
  if (!(o.confidence > 0 && o.confidence < 1))
    return Error{fmt::format("confidence must be between 0 and 1 (exclusive), got {}", o.confidence)};
  if (!(o.coverage > 0 && o.coverage < 1))
    return Error{fmt::format("coverage probability must be between 0 and 1 (exclusive), got {}", o.coverage)};
  if (!(std::isfinite(o.averaged_readings) && o.averaged_readings >= 1))
    return Error{fmt::format("the number of averaged readings must be at least 1, got {}", o.averaged_readings)};
  if (o.resolution && !(std::isfinite(*o.resolution) && *o.resolution >= 0))
    return Error{fmt::format("resolution must be a finite number >= 0, got {}", *o.resolution)};
  if (o.reading && !std::isfinite(*o.reading)) return Error{"the representative reading must be a finite number"};
  if (d.x.size() != d.y.size() || (!d.w.empty() && d.w.size() != d.x.size()) ||
      (!d.time_s.empty() && d.time_s.size() != d.x.size()))
    return Error{"internal: the pair table's columns differ in length"};
  return ok_status();
}

Result<stats::LineFit> fit_pairs(const ReportData& d, stats::Model model) {
  const bool weighted = !d.w.empty();
  stats::StreamingLineFit fit(stats::MemoryPolicy::cumulative(), weighted);
  for (std::size_t i = 0; i < d.x.size(); ++i) fit.add(d.x[i], d.y[i], weighted ? d.w[i] : 1.0);
  return fit.summary(model);
}

ResidualSummary summarise_residuals(const ReportData& d, const stats::LineFit& fit) {
  ResidualSummary r;
  for (std::size_t i = 0; i < d.x.size(); ++i) {
    const double e = d.y[i] - fit.predict(d.x[i]);
    r.residuals.push_back(e);
    const double w = d.w.empty() ? 1.0 : d.w[i];
    // Internally standardised: Var(e_i) = s^2 (1/w_i - h_i) for a pair of weight w_i.
    const double room = 1.0 - w * fit.leverage(d.x[i]);
    if (!(fit.s > 0 && room > 0)) continue;
    const double z = e * std::sqrt(w) / (fit.s * std::sqrt(room));
    if (std::abs(z) > std::abs(r.largest_standardised)) {
      r.largest_standardised = z;
      r.largest_index = i;
    }
  }
  return r;
}

// The reference values the plots span: the data, and the sensor's range when one is given.
void plotted_span(const Report& r, double& lo, double& hi) {
  const auto [mn, mx] = std::minmax_element(r.data.x.begin(), r.data.x.end());
  lo = *mn;
  hi = *mx;
  if (r.options.tolerance && r.options.tolerance->range) {
    lo = std::min(lo, r.options.tolerance->range->lo);
    hi = std::max(hi, r.options.tolerance->range->hi);
  }
}

std::vector<BandSample> sample_band(const Report& r, const stats::TwoSidedT& t) {
  double lo = 0, hi = 0;
  plotted_span(r, lo, hi);
  std::vector<BandSample> out;
  for (int i = 0; i < band_samples; ++i) {
    const double x = lo + (hi - lo) * i / (band_samples - 1);
    out.push_back({x, r.fit.predict(x), stats::confidence_interval_at(r.fit, x, t),
                   stats::prediction_interval_at(r.fit, x, t)});
  }
  return out;
}

void judge_certificate(Report& r, const stats::TwoSidedT& t) {
  const ReportOptions& o = r.options;
  if (!o.certificate) {
    r.certificate_notes.push_back(
        "No certificate line was given (" + how(o, "--certified-slope and --certified-intercept", "certificate") +
        "): the certified line is not drawn, the fit is not tested against it and the tolerance cannot be judged.");
    return;
  }
  r.certificate_verdict = stats::judge_against_certificate(r.fit, *o.certificate, t, o.widen_by_certificate);
  const bool stated = o.certificate->u_intercept > 0 || o.certificate->u_slope > 0 || o.certificate->cov != 0;
  if (!stated) {
    r.certificate_notes.push_back("The certificate's own uncertainties were not given (" +
                                  how(o, "--certified-intercept-u and --certified-slope-u",
                                      "certificate.u_intercept and u_slope") +
                                  "): the tests treat the certified line as exact.");
  } else if (!o.widen_by_certificate) {
    r.certificate_notes.push_back(
        "The certificate's uncertainties are stated but not used: the configuration sets "
        "fit.widen_by_certificate to false, so the tests treat the certified line as exact.");
  }
  if (r.labels.certificate_id.empty())
    r.certificate_notes.push_back("No certificate id was given (" + how(o, "--certificate-id", "certificate.id") +
                                  "): the report cannot name the certificate it checks.");
}

Status judge_tolerance_section(Report& r, const stats::TwoSidedT& t_cov) {
  const ReportOptions& o = r.options;
  if (!o.tolerance) {
    r.tolerance_notes.push_back(
        "No tolerance was given (" +
        how(o, "--tolerance-absolute, --tolerance-percent-of-reading or --tolerance-percent-of-span", "tolerance") +
        "): there is no pass/fail verdict.");
    return ok_status();
  }
  if (!o.tolerance->range) {
    r.tolerance_notes.push_back("No range was given (" + how(o, "--range LO HI", "range") +
                                "): the tolerance cannot be judged without the reference values it applies to.");
    return ok_status();
  }
  if (!o.certificate) {
    r.tolerance_notes.push_back(
        "The tolerance is not judged: the sensor's error is measured against the certificate line in use, "
        "and none was given.");
    return ok_status();
  }
  metrology::VerdictOptions vo;
  vo.rule = o.tolerance->rule;
  vo.guard_band = o.tolerance->guard_band;
  const metrology::ReferenceStandardUncertainty ref = r.reference.value_or(metrology::ReferenceStandardUncertainty{});
  auto v = metrology::judge_tolerance(r.fit, *o.certificate, ref, o.tolerance->mpe, *o.tolerance->range, vo, t_cov);
  if (!v) return v.error();
  r.tolerance = std::move(v).value();
  const auto& range = *o.tolerance->range;
  for (int i = 0; i < error_curve_samples; ++i) {
    const double x = range.lo + (range.hi - range.lo) * i / (error_curve_samples - 1);
    if (auto e = metrology::sensor_error_at(r.fit, *o.certificate, ref, x, t_cov)) r.error_curve.push_back(*e);
  }
  if (!r.reference)
    r.tolerance_notes.push_back("The reference standard's uncertainty was not given, so U_e holds the fit's part "
                                "only and understates the uncertainty of the error.");
  return ok_status();
}

Status reference_section(Report& r) {
  const ReportOptions& o = r.options;
  if (o.reference) {
    auto ref = metrology::reference_from_certificate(o.reference->expanded_uncertainty, o.reference->coverage_factor,
                                                     o.reference->dof);
    if (!ref) return Error{"reference standard: " + ref.error().message};
    r.reference = ref.value();
  } else {
    r.budget_notes.push_back("The reference standard's uncertainty was not given (" +
                             how(o, "--reference-expanded-uncertainty and --reference-coverage-factor",
                                 "reference.expanded_uncertainty") +
                             "): its budget line is zero and the budget understates the uncertainty.");
  }
  if (r.labels.reference_id.empty())
    r.budget_notes.push_back("No reference standard id was given (" + how(o, "--reference-id", "reference.id") +
                             "): the report cannot name the standard the data is traceable to.");
  return ok_status();
}

AveragingPoint averaging_point(const metrology::CorrectedValue& cv) {
  const auto& b = cv.budget;
  AveragingPoint p;
  p.m = cv.inverse.m;
  p.u_c = b.u_c;
  p.u_repeatability = b.lines.at(0).contribution;
  double floor2 = 0;
  for (std::size_t i = 1; i < b.lines.size(); ++i) floor2 += b.lines[i].contribution * b.lines[i].contribution;
  p.floor = std::sqrt(floor2);
  p.nu_eff = b.nu_eff;
  p.k = b.k;
  p.expanded = b.expanded;
  return p;
}

Status budget_section(Report& r, const stats::TwoSidedT& t_cov) {
  const ReportOptions& o = r.options;
  metrology::CorrectedValueInputs inputs;
  if (r.reference) inputs.reference = *r.reference;
  inputs.resolution = o.resolution.value_or(0.0);
  if (!o.resolution)
    r.budget_notes.push_back("The sensor's resolution was not given (" + how(o, "--resolution", "sensor.resolution") +
                             "): its budget line is zero.");
  r.reading = o.reading.value_or(r.fit.mean_y);
  auto cv = metrology::corrected_value(r.fit, r.reading, o.averaged_readings, inputs, t_cov);
  if (!cv) return cv.error();
  r.corrected = std::move(cv).value();
  for (int i = 0; i <= averaging_samples_per_decade * averaging_decades; ++i) {
    const double m = std::pow(10.0, static_cast<double>(i) / averaging_samples_per_decade);
    auto at = metrology::corrected_value(r.fit, r.reading, m, inputs, t_cov);
    if (!at) return at.error();
    r.averaging.push_back(averaging_point(*at));
    if (i % averaging_samples_per_decade == 0) r.averaging_table.push_back(r.averaging.back());
  }
  return ok_status();
}

Status york_section(Report& r) {
  const ReportOptions& o = r.options;
  if (!o.errors_in_variables) {
    r.york_notes.push_back("No errors-in-variables fit was asked for (" +
                           how(o, "--errors-in-variables", "fit.errors_in_variables") +
                           "): the fit treats the reference values as exact.");
    return ok_status();
  }
  if (o.model != stats::Model::line) return Error{"the errors-in-variables fit is available for the line model only"};
  const auto& e = *o.errors_in_variables;
  const std::size_t n = r.data.x.size();
  auto column = [n](const std::vector<double>& per_pair, const std::optional<double>& constant,
                    const char* what) -> Result<std::vector<double>> {
    if (!per_pair.empty()) return per_pair;
    if (!constant) return Error{fmt::format("the errors-in-variables fit needs the {} uncertainty", what)};
    if (!(std::isfinite(*constant) && *constant > 0))
      return Error{fmt::format("the {} uncertainty must be greater than zero, got {}", what, *constant)};
    return std::vector<double>(n, *constant);
  };
  auto ux = column(r.data.u_x, e.u_reference, "reference");
  if (!ux) return ux.error();
  auto uy = column(r.data.u_y, e.u_sensor, "sensor");
  if (!uy) return uy.error();
  auto y = stats::york_fit(r.data.x, *ux, r.data.y, *uy);
  if (!y) return Error{"errors-in-variables fit: " + y.error().message};
  r.york = y.value();
  return ok_status();
}

void data_section(Report& r) {
  r.data_notes = r.data.source_notes;
  if (r.data.time_s.empty())
    r.data_notes.push_back("The pairs carry no time stamps: the residuals are plotted against the order of the "
                           "pairs, and no period is stated.");
  if (!r.data.w.empty())
    r.data_notes.push_back("The fit is weighted by the weight column; prediction intervals are for one reading of "
                           "unit weight.");
}

}  // namespace

std::string percent_label(double probability) { return fmt::format("{:.4g} %", probability * 100); }

Result<Report> build_report(ReportLabels labels, ReportData data, ReportOptions options) {
  if (auto s = check_options(data, options); !s) return s.error();
  auto fit = fit_pairs(data, options.model);
  if (!fit) return fit.error();
  Report r;
  r.labels = std::move(labels);
  r.data = std::move(data);
  r.options = std::move(options);
  r.fit = fit.value();
  const stats::TwoSidedT t_fit(r.options.confidence);
  const stats::TwoSidedT t_cov(r.options.coverage);
  r.intervals = stats::coefficient_intervals(r.fit, t_fit);
  r.residuals = summarise_residuals(r.data, r.fit);
  r.band = sample_band(r, t_fit);
  judge_certificate(r, t_fit);
  for (auto* section : {&reference_section, &york_section})
    if (auto s = section(r); !s) return s.error();
  if (auto s = judge_tolerance_section(r, t_cov); !s) return s.error();
  if (auto s = budget_section(r, t_cov); !s) return s.error();
  data_section(r);
  return r;
}

}  // namespace rigcal::report
