// The Markdown report and the CSV of cells.
#include "report.hpp"

#include <sys/utsname.h>

#include <chrono>
#include <ctime>
#include <iterator>
#include <fstream>
#include <sstream>
#include <thread>

#include "report_format.hpp"
#include "rigcal/detect/arl.hpp"

namespace rigcal::study {

namespace {

std::string cpu_model() {
  std::ifstream in("/proc/cpuinfo");
  for (std::string line; std::getline(in, line);) {
    if (line.rfind("model name", 0) != 0) continue;
    const auto colon = line.find(':');
    if (colon != std::string::npos) return line.substr(colon + 2);
  }
  return "unknown CPU";
}

std::string row(const std::vector<std::string>& cells) {
  std::string s = "|";
  for (const auto& c : cells) s += " " + c + " |";
  return s + "\n";
}

std::string header_row(const std::string& first, const std::vector<Column>& columns) {
  std::vector<std::string> cells{first};
  for (const auto& c : columns) cells.push_back(c.label);
  std::string s = row(cells);
  s += "|";
  for (std::size_t i = 0; i < cells.size(); ++i) s += i == 0 ? " --- |" : " ---: |";
  return s + "\n";
}

// The anytime test's run length is defective, so its censored "ARL0" depends on the censoring limit:
// marked, with the reason in the text under each table.
std::string arl0_row(const std::string& label, const std::vector<Arl0Cell>& cells, const std::vector<Column>& columns) {
  std::vector<std::string> out{label};
  for (std::size_t j = 0; j < cells.size(); ++j) {
    const bool defective = columns[j].setting.kind == config::DetectorKind::anytime && cells[j].arl0.alarms > 0;
    out.push_back(format_arl(cells[j].arl0) + (defective ? " †" : ""));
  }
  return row(out);
}

const char* defective_note =
    "† The anytime test's in-control run length is defective (most runs never alert, the others alert early), "
    "so the censored geometric estimate depends on the censoring limit and is not an ARL0 in the usual sense; "
    "compare it on P(false alert within the target).\n";

std::string probability_row(const std::string& label, const std::vector<Arl0Cell>& cells) {
  std::vector<std::string> out{label};
  for (const auto& c : cells) out.push_back(format_probability(c.false_alert_by_target));
  return row(out);
}

std::string delay_row(const std::string& label, const std::vector<DelayEstimate>& cells) {
  std::vector<std::string> out{label};
  for (const auto& c : cells) out.push_back(format_delay(c));
  return row(out);
}

std::size_t index_of(const std::vector<ChangeSpec>& changes, const std::string& label) {
  std::size_t i = 0;
  while (i < changes.size() && changes[i].label != label) ++i;
  return i;
}

std::string grouped(double v) { return format("%.0f", v); }

std::string setup_section(const StudyResults& r) {
  const auto& c = r.channel;
  const auto& o = r.options;
  std::ostringstream s;
  s << "## Setup\n\n"
    << "- **Channel** (tools/study/study_channel.hpp): reference values x i.i.d. uniform on [" << c.x_low << ", "
    << c.x_high << "] degC, certificate y = " << c.line.intercept << " + " << c.line.slope << " x, noise sigma = "
    << c.sigma << " degC (configured as `sensor.noise_sd`), tolerance " << c.tolerance_absolute
    << " degC (default smallest offset change: a quarter of it, 0.5 sigma), default smallest slope change 0.5 %, "
    << "every other setting the daemon's default (fit window 1000 pairs, screening limit 6 with 3 held in 20, "
    << "learning over 30 pairs). One pair per second of record time.\n"
    << "- **Engine**: every figure except the simulator check comes from `rigcal::engine::ChannelEngine` fed "
    << "the simulated pairs; an alert is the engine's drift alert (after its persistence rule).\n"
    << "- **Target**: ARL0 = " << grouped(o.target_arl0) << " pairs for every detector. The CUSUM and EWMA are "
    << "designed for it by the engine (`detector.target_arl0_pairs`). The interval rule has no design: its "
    << "persistence `alert.raise_after` is calibrated by simulation (section 1). The anytime-valid test has no "
    << "finite ARL0 (with probability about 1 - alpha it never alerts); it is matched on the probability of a false "
    << "alert within " << grouped(o.target_arl0) << " pairs, 1 - exp(-1) = " << format("%.3f", r.matched_probability)
    << " for a geometric run length with that ARL0, and also shown at the daemon's default alpha = 0.001.\n"
    << "- **Changes**: a gain change multiplies the slope by (1 + g) about x = 0; an offset change adds o sigma. "
    << "Steps and ramps start after a burn-in of " << o.burn_in_pairs << " in-control pairs; ramps grow linearly "
    << "from the start. The delay is the number of pairs from the first changed pair to the alert (1 = that pair), "
    << "over the runs without a false alert before the change; runs with one are dropped and counted.\n"
    << "- **Estimators**: ARL0 from runs censored at " << grouped(5 * o.target_arl0) << " pairs: the sample mean "
    << "when none is censored, else the geometric maximum-likelihood estimate (pairs observed / alerts), SE = "
    << "ARL0 / sqrt(alerts). Delays: mean ± standard error of the mean; '≥' marks cells where some runs reached "
    << "the limit without an alert (counted at the limit). All streams come from fixed seeds (base " << o.seed
    << "); every detector sees the same streams.\n\n";
  return s.str();
}

std::string calibration_section(const StudyResults& r) {
  std::ostringstream s;
  s << "## 1. Matching the detectors without an ARL design\n\n"
    << "**Interval rule**: in-control ARL0 for each persistence (one set of streams per confidence; the rule's "
    << "alert machine counted outside the engine, see calibration.hpp). Chosen: the smallest multiple of 5 at "
    << "or above the target on a log-linear interpolation: **raise_after = " << r.persistence95
    << " at 95 %**, **" << r.persistence99 << " at 99 %**. The grid starts at 25, the daemon's default "
    << "before this study; the default is now twice fit.window_pairs.\n\n"
    << "| confidence | raise_after | ARL0 (pairs) | alerts / runs |\n| --- | ---: | ---: | ---: |\n";
  auto curve_rows = [&s](const char* conf, const std::vector<PersistencePoint>& c) {
    for (const auto& p : c)
      s << row({conf, std::to_string(p.raise_after), format_arl(p.arl0),
                format("%llu / %llu", static_cast<unsigned long long>(p.arl0.alarms), static_cast<unsigned long long>(p.arl0.runs))});
  };
  curve_rows("95 %", r.interval95_curve);
  curve_rows("99 %", r.interval99_curve);
  if (r.merged_evaluations > 0)
    s << "\nNote: " << r.merged_evaluations << " pairs caused several evaluations at once (screen releases).\n";
  s << "\n**Anytime-valid test**: probability of a false alert within " << grouped(r.options.target_arl0)
    << " pairs by alpha (rho from the engine's design for each alpha; raw test on the engine's innovations). "
    << "Matched alpha (rounded to 0.01): **" << format("%.2f", r.matched_alpha) << "**.\n\n"
    << "| alpha | rho | P(false alert within target) |\n| ---: | ---: | ---: |\n";
  for (const auto& a : r.alpha_curve)
    s << row({format("%g", a.alpha), format("%.4f", a.rho), format_probability(a.false_alert_by_horizon)});
  return s.str() + "\n";
}

std::string headline_table(const StudyResults& r) {
  std::string s = header_row("", r.columns);
  s += arl0_row("**ARL0** (pairs)", r.arl0[0], r.columns);
  s += probability_row(format("P(false alert within %.0f)", r.options.target_arl0), r.arl0[0]);
  for (std::size_t k = 0; k < r.changes.size(); ++k) s += delay_row(r.changes[k].label, r.delays[k]);
  return s;
}

std::string detection_section(const StudyResults& r) {
  std::ostringstream s;
  s << "## 2. In-control run length and detection delay, i.i.d. normal noise\n\n"
    << "ARL0 ± SE, then the mean delay ± SE in pairs for each change.\n\n"
    << headline_table(r) << "\n" << defective_note << "\n";
  s << "Median delays (pairs), and runs dropped for a false alert before the change (of the replicates):\n\n"
    << header_row("", r.columns);
  for (std::size_t k = 0; k < r.changes.size(); ++k) {
    std::vector<std::string> cells{r.changes[k].label};
    for (const auto& d : r.delays[k])
      cells.push_back(format("%.0f (%llu dropped)", d.median, static_cast<unsigned long long>(d.false_alerts)));
    s << row(cells);
  }
  s << "\n### Changes after a long time in control\n\nThe same steps after " << r.options.late_burn_in_pairs
    << " in-control pairs instead of " << r.options.burn_in_pairs << ":\n\n"
    << header_row("", r.columns);
  for (std::size_t k = 0; k < r.probe_changes.size(); ++k) {
    s << delay_row(r.probe_changes[k].label + " (mean)", r.late_delays[k]);
    std::vector<std::string> cells{r.probe_changes[k].label + " (median; dropped)"};
    for (const auto& d : r.late_delays[k])
      cells.push_back(format("%.0f; %llu", d.median, static_cast<unsigned long long>(d.false_alerts)));
    s << row(cells);
  }
  return s.str() + "\n";
}

std::string conditions_section(const StudyResults& r) {
  std::ostringstream s;
  s << "## 3. Autocorrelated noise and spikes\n\n"
    << "Each detector as matched above (i.i.d. calibration), under other noise. AR(1) noise keeps its marginal "
    << "SD at sigma; 'sigma configured x f' sets `sensor.noise_sd` to f sigma, f = sqrt((1 + phi) / (1 - phi)), "
    << "the long-run SD of the AR(1) mean (the usual correction; it does not touch the interval rule, which uses "
    << "the fit's own residual SD). Spikes: each pair with probability 0.005 gets +-20 sigma.\n\n"
    << header_row("", r.columns);
  for (std::size_t c = 0; c < r.conditions.size(); ++c) {
    s << arl0_row("**" + r.conditions[c].label + "**: ARL0", r.arl0[c], r.columns);
    s << probability_row("P(false alert within target)", r.arl0[c]);
    for (std::size_t k = 0; k < r.probe_changes.size(); ++k) {
      // The i.i.d. delays of the probe changes are those of section 2.
      const std::size_t same = index_of(r.changes, r.probe_changes[k].label);
      if (c == 0 && same == r.changes.size()) continue;
      s << delay_row("delay, " + r.probe_changes[k].label, c == 0 ? r.delays[same] : r.condition_delays[c][k]);
    }
  }
  s << "\n" << defective_note << "\nThe outlier screen over the cusum column's in-control runs:\n\n"
    << "| condition | pairs | rejected as spikes | pairs released as a change | releases per 10^6 pairs |\n"
    << "| --- | ---: | ---: | ---: | ---: |\n";
  const double held = config::ScreeningConfig{}.max_held;  // a release is max_held pairs
  for (std::size_t c = 0; c < r.conditions.size(); ++c) {
    const auto& t = r.screen_totals[c];
    s << row({r.conditions[c].label, format("%.3g", static_cast<double>(t.pairs)), std::to_string(t.outliers),
              std::to_string(t.released),
              t.pairs ? format("%.1f", 1e6 * static_cast<double>(t.released) / held / static_cast<double>(t.pairs)) : "–"});
  }
  return s.str() + "\n";
}

std::string design_cells(const RealisticDesign& d) {
  const auto& g = d.design;
  if (g.kind == "cusum")
    return format("offset k = %.4g, h = %.4g; slope k = %.4g, h = %.4g", g.k_offset, g.h_offset, g.k_slope, g.h_slope);
  if (g.kind == "ewma")
    return format("offset lambda = %.3g, L = %.4g; slope lambda = %.3g, L = %.4g", g.lambda_offset, g.L_offset,
                  g.lambda_slope, g.L_slope);
  return format("alpha = %g, rho = %.4g", g.alpha, g.rho);
}

std::string realistic_section(const StudyResults& r) {
  std::ostringstream s;
  s << "## 4. Realistic setting: one false alert a year at 1 pair/s\n\n"
    << "ARL0 = " << format("%.4g", r.options.realistic_arl0)
    << " pairs, stated from the designs (not simulated: one run would take a simulated year). The CUSUM and "
    << "EWMA designs hit their target to 1e-9 and 1e-4 relative under i.i.d. normal innovations (arl.hpp); "
    << "the anytime test's bound P(any false alert, ever) <= alpha holds for any horizon. The interval rule has "
    << "no design for this target (section 1: its ARL0 rises steeply with raise_after beyond the window length, "
    << "and no bounded simulation reaches 3e7). Analytic ARL1: zero-state, from the start of monitoring, for the "
    << "offset steps; the simulated delays are after the usual burn-in (they agree with the analytic ARL1 for "
    << "the CUSUM and EWMA; the anytime test's are far longer because its delay grows with the time spent in "
    << "control).\n\n"
    << "| | design | designed ARL1, offset / slope design change (pairs) |";
  std::vector<std::string> offsets;
  for (const auto& c : r.changes)
    if (c.kind == ChangeKind::offset_step) offsets.push_back(c.label);
  for (const auto& o : offsets) s << " analytic ARL1, " << o << " |";
  s << "\n| --- | --- | ---: |";
  for (std::size_t i = 0; i < offsets.size(); ++i) s << " ---: |";
  s << "\n";
  for (const auto& d : r.realistic_designs) {
    std::vector<std::string> cells{d.label, design_cells(d),
                                   d.design.kind == "anytime" ? format("%.0f / –", d.design.arl1_offset_pairs)
                                                              : format("%.0f / %.0f", d.design.arl1_offset_pairs, d.design.arl1_slope_pairs)};
    for (double a : d.analytic_offset_arl1) cells.push_back(format("%.1f", a));
    s << row(cells);
  }
  for (const auto& d : r.realistic_designs)
    if (d.design.kind == "ewma" && d.design.lambda_offset <= detect::ewma_design_lambdas[0])
      s << "\nThe EWMA design's lambda is the smallest of its grid (" << detect::ewma_design_lambdas[0]
        << "): the optimum for this target and shift lies below it, and the EWMA is handicapped at the design "
           "change (arl.hpp warns of this).\n";
  s << "\nDesigned channel ARL0 (pairs) when the configured noise SD is f times the true one (analytic; "
    << "f = 0.87 and 1.13 are one standard error of a sigma learned from the default 30 pairs, 28 degrees of "
    << "freedom):\n\n| f |";
  for (double f : sigma_factors) s << " " << format("%.2f", f) << " |";
  s << "\n| --- |";
  for (std::size_t i = 0; i < std::size(sigma_factors); ++i) s << " ---: |";
  s << "\n";
  for (const auto& d : r.realistic_designs) {
    if (d.arl0_by_sigma_factor.empty()) continue;
    std::vector<std::string> cells{d.label};
    for (double a : d.arl0_by_sigma_factor) cells.push_back(format("%.3g", a));
    s << row(cells);
  }
  s << "\nSimulated delays (pairs, mean ± SE) at the realistic setting:\n\n" << header_row("", r.realistic_columns);
  std::size_t i = 0;
  for (const auto& c : r.changes) {
    if (c.kind != ChangeKind::gain_step && c.kind != ChangeKind::offset_step) continue;
    s << delay_row(c.label, r.realistic_delays[i++]);
  }
  return s.str() + "\n";
}

std::string raw_section(const StudyResults& r) {
  std::ostringstream s;
  s << "## 5. Simulator check: bare detectors on N(mu, 1) innovations\n\n"
    << "The study's run-length code against published two-sided ARLs (copies and provenance in tests/data).\n\n"
    << "| detector | mu | published | simulated | runs | source |\n| --- | ---: | ---: | ---: | ---: | --- |\n";
  for (const auto& c : r.raw_checks)
    s << row({c.detector, format("%g", c.mu), format("%g", c.published), format_arl(c.simulated),
              std::to_string(c.simulated.runs), c.source});
  return s.str() + "\n";
}

std::string diagnostics_section(const StudyResults& r) {
  std::ostringstream s;
  s << "## 6. Slope pairing rate\n\n"
    << "Slope innovations per pair (the designs assume 0.5) with the reference centre learned as the engine learns "
       "it, the median of the first N reference values, over "
    << (r.options.quick ? 200 : 2000) << " simulated channels of 20000 pairs each:\n\n"
    << "| centre | mean | 5th percentile | worst |\n| --- | ---: | ---: | ---: |\n";
  for (const auto& p : r.pairing_rates)
    s << row({p.learn_pairs ? format("learned from %d pairs", p.learn_pairs) : std::string("exact median"),
              format("%.3f", p.mean), format("%.3f", p.p05), format("%.3f", p.min)});
  s << "\nFewer slope innovations per pair stretch the slope detector's ARL0 and delays in pairs by 0.5 / rate.\n";
  return s.str() + "\n";
}

}  // namespace

RunInfo describe_run(int argc, char** argv, const std::string& invoked_as) {
  RunInfo info;
  const std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm utc{};
  gmtime_r(&now, &utc);
  char date[32];
  std::strftime(date, sizeof date, "%Y-%m-%dT%H:%M:%SZ", &utc);
  info.date_utc = date;
  utsname u{};
  uname(&u);
  info.machine = cpu_model() + ", " + std::to_string(std::thread::hardware_concurrency()) + " logical CPUs, " +
                 u.sysname + " " + u.release + " " + u.machine;
#if defined(__clang__)
  info.compiler = std::string("clang ") + __clang_version__;
#elif defined(__GNUC__)
  info.compiler = std::string("gcc ") + __VERSION__;
#else
  info.compiler = "unknown compiler";
#endif
  for (int i = 0; i < argc; ++i) {
    if (i > 0) info.command += ' ';
    info.command += argv[i];
  }
  if (!invoked_as.empty()) info.command = invoked_as + "  (runs: " + info.command + ")";
  return info;
}

std::string markdown_report(const StudyResults& r, const RunInfo& run) {
  std::ostringstream s;
  s << "# Drift detector run-length study" << (r.options.quick ? " (quick mode: few replicates)" : "") << "\n\n"
    << "- Date: " << run.date_utc << "\n- Machine: " << run.machine << "\n- Compiler: " << run.compiler
    << "\n- Command: `" << run.command << "`\n"
    << format("- Run time: %.0f s of CPU on one core (%.0f s wall clock), %.3g pairs through the engine\n\n",
              r.cpu_seconds, r.seconds, static_cast<double>(r.pairs_simulated))
    << setup_section(r) << calibration_section(r) << detection_section(r) << conditions_section(r)
    << realistic_section(r) << raw_section(r) << diagnostics_section(r);
  return s.str();
}

std::string summary_table(const StudyResults& r) { return headline_table(r) + "\n" + defective_note; }

std::string csv_cells(const StudyResults& r) {
  std::ostringstream s;
  s << "section,condition,change,detector,quantity,value,standard_error,runs,dropped_or_alerts\n";
  auto q = [](const std::string& t) { return "\"" + t + "\""; };
  for (std::size_t c = 0; c < r.conditions.size(); ++c)
    for (std::size_t j = 0; j < r.columns.size(); ++j) {
      const auto& a = r.arl0[c][j];
      s << "arl0," << q(r.conditions[c].label) << ",," << q(r.columns[j].label) << ",arl0,"
        << format("%.6g,%.6g,%llu,%llu\n", a.arl0.arl, a.arl0.standard_error, static_cast<unsigned long long>(a.arl0.runs),
                  static_cast<unsigned long long>(a.arl0.alarms));
    }
  auto delays = [&](const char* section, const std::string& cond, const std::vector<ChangeSpec>& changes,
                    const std::vector<std::vector<DelayEstimate>>& cells, const std::vector<Column>& cols) {
    for (std::size_t k = 0; k < cells.size() && k < changes.size(); ++k)
      for (std::size_t j = 0; j < cols.size(); ++j) {
        const auto& d = cells[k][j];
        s << section << "," << q(cond) << "," << q(changes[k].label) << "," << q(cols[j].label) << ",mean_delay,"
          << format("%.6g,%.6g,%llu,%llu\n", d.mean, d.standard_error, static_cast<unsigned long long>(d.runs),
                    static_cast<unsigned long long>(d.false_alerts));
      }
  };
  delays("delay", r.conditions[0].label, r.changes, r.delays, r.columns);
  delays("late_delay", r.conditions[0].label, r.probe_changes, r.late_delays, r.columns);
  for (std::size_t c = 1; c < r.conditions.size(); ++c)
    delays("delay", r.conditions[c].label, r.probe_changes, r.condition_delays[c], r.columns);
  std::vector<ChangeSpec> steps;
  for (const auto& c : r.changes)
    if (c.kind == ChangeKind::gain_step || c.kind == ChangeKind::offset_step) steps.push_back(c);
  delays("realistic_delay", r.conditions[0].label, steps, r.realistic_delays, r.realistic_columns);
  return s.str();
}

}  // namespace rigcal::study
