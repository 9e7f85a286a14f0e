#pragma once
// The configuration schema: every key, its type, unit, range, default and meaning, declared once.
// A visitor walks these declarations: YamlReader (daemon/config/reader.hpp) reads and validates a
// file with them, ReferenceWriter (daemon/core/config/reference.cpp) writes the Markdown reference,
// FingerprintWriter hashes a channel.
// Defaults are the member initialisers of the structs in rigcal/config/config.hpp.
//
// Visitor interface (V):
//   text(key, std::string&, doc, need)          flag(key, bool&, doc)
//   integer(key, Int&, Range, unit, doc, need)  number(key, double&, Range, unit, doc, need)
//   optional_number(key, std::optional<double>&, Range, unit, doc)
//   optional_integer(key, std::optional<int>&, Range, unit, doc)
//   choice(key, Enum&, {options}, doc)          texts(key, std::vector<std::string>&, doc)
//   networks(key, std::vector<Network>&, doc)   number_pair(key, lo&, hi&, unit, doc)
//   section(key, T&, doc)  optional_section(key, std::optional<T>&, doc)  list(key, std::vector<T>&, doc)
#include <initializer_list>
#include <string>
#include <limits>
#include <type_traits>

#include "rigcal/config/config.hpp"

namespace rigcal::config::schema {

enum class Need { optional, required };

struct Range {
  double lo = -std::numeric_limits<double>::infinity();
  double hi = std::numeric_limits<double>::infinity();
  bool lo_open = false;  // lo itself excluded
  bool hi_open = false;
};
inline constexpr Range any{};
inline constexpr Range positive{0, std::numeric_limits<double>::infinity(), true, false};
inline constexpr Range non_negative{0, std::numeric_limits<double>::infinity(), false, false};
inline constexpr Range probability_open{0, 1, true, true};

template <class E>
struct Option {
  const char* name;
  E value;
  const char* doc;
};
template <class E>
using Options = std::type_identity_t<std::initializer_list<Option<E>>>;

inline constexpr const char* no_unit = "";

// "an integer from 1 to 65535", "a number greater than 0": the expected form in messages and docs.
std::string describe_range(const Range& r, bool integer);
bool in_range(const Range& r, double v);

template <class V>
void describe(V& v, JournalConfig& c) {
  v.choice("fsync", c.fsync,
           Options<FsyncPolicy>{{"interval", FsyncPolicy::interval, "fsync every fsync_interval_ms (batched)"},
                                {"every_batch", FsyncPolicy::every_batch, "fsync after every batch read from an input"}},
           "when journal writes are forced to disk; acknowledgements to senders wait for it");
  v.integer("fsync_interval_ms", c.fsync_interval_ms, Range{1, 60000}, "ms",
            "longest time an accepted record waits before it is on disk (interval mode)", Need::optional);
  v.integer("segment_bytes", c.segment_bytes, Range{65536, 1099511627776.0}, "bytes",
            "a journal segment is closed at this size or at each checkpoint", Need::optional);
  v.choice("retain", c.retain,
           Options<SegmentRetention>{{"remove", SegmentRetention::remove, "delete segments no checkpoint needs"},
                                     {"archive", SegmentRetention::archive, "move them to STATE/archive/ instead"}},
           "what happens to journal segments older than the previous checkpoint");
}

template <class V>
void describe(V& v, TimeRules& c) {
  v.number("max_future_s", c.max_future_s, positive, "s",
           "records timestamped further ahead of rigcald's clock are rejected (clock_future)", Need::optional);
  v.number("max_backwards_s", c.max_backwards_s, non_negative, "s",
           "records older than their channel's latest by more than this are rejected (clock_backwards)",
           Need::optional);
}

template <class V>
void describe(V& v, ControlConfig& c) {
  v.text("socket", c.socket, "path of the local control socket (relative: inside state_directory)", Need::optional);
  v.text("secret_file", c.secret_file, "file holding a shared secret that control clients must send (AUTH)",
         Need::optional);
}

template <class V>
void describe(V& v, TlsConfig& c) {
  v.text("certificate_file", c.certificate_file, "PEM certificate chain of this listener", Need::optional);
  v.text("private_key_file", c.private_key_file, "PEM private key of the certificate", Need::optional);
  v.text("client_ca_file", c.client_ca_file, "PEM CA bundle; when set, senders must present a certificate it signed",
         Need::optional);
}

template <class V>
void describe(V& v, TcpInput& c) {
  v.text("name", c.name, "name of this input in counters, logs and the reject file", Need::required);
  v.text("address", c.address, "IP address to listen on; 0.0.0.0 or :: for every interface", Need::optional);
  v.integer("port", c.port, Range{1, 65535}, no_unit, "TCP port", Need::required);
  v.integer("max_connections", c.max_connections, Range{1, 100000}, no_unit,
            "connections beyond this are refused with a message", Need::optional);
  v.integer("max_line_bytes", c.max_line_bytes, Range{64, 1048576}, "bytes",
            "longer lines are rejected (line_too_long) and cut off", Need::optional);
  v.number("idle_timeout_s", c.idle_timeout_s, positive, "s",
           "a connection that completes no line for this long is closed", Need::optional);
  v.networks("allow", c.allow, "peer networks allowed to connect (CIDR); empty allows any peer");
  v.text("secret_file", c.secret_file, "file holding a shared secret senders must send first (AUTH)",
         Need::optional);
  v.section("tls", c.tls, "TLS for this listener (OpenSSL)");
}

template <class V>
void describe(V& v, SerialInput& c) {
  v.text("name", c.name, "name of this input in counters, logs and the reject file", Need::required);
  v.text("device", c.device, "serial device, e.g. /dev/ttyUSB0 or /dev/serial/by-id/...", Need::required);
  v.integer("baud", c.baud, Range{50, 4000000}, "bit/s", "line speed", Need::optional);
  v.integer("data_bits", c.data_bits, Range{5, 8}, "bits", "character size", Need::optional);
  v.choice("parity", c.parity,
           Options<Parity>{{"none", Parity::none, ""}, {"odd", Parity::odd, ""}, {"even", Parity::even, ""}},
           "parity bit");
  v.choice("stop_bits", c.stop_bits,
           Options<StopBits>{{"1", StopBits::one, ""}, {"1.5", StopBits::onepointfive, ""}, {"2", StopBits::two, ""}},
           "stop bits");
  v.choice("flow_control", c.flow_control,
           Options<FlowControl>{{"none", FlowControl::none, ""},
                                {"software", FlowControl::software, "XON/XOFF"},
                                {"hardware", FlowControl::hardware, "RTS/CTS"}},
           "flow control");
  v.integer("max_line_bytes", c.max_line_bytes, Range{64, 1048576}, "bytes",
            "longer lines are rejected (line_too_long) and cut off", Need::optional);
  v.integer("reopen_initial_ms", c.reopen_initial_ms, Range{10, 600000}, "ms",
            "first retry delay after the device disappears or fails (doubles up to reopen_max_ms)", Need::optional);
  v.integer("reopen_max_ms", c.reopen_max_ms, Range{10, 3600000}, "ms", "longest retry delay", Need::optional);
}

template <class V>
void describe(V& v, Inputs& c) {
  v.list("tcp", c.tcp, "TCP listeners for senders of the line protocol");
  v.list("serial", c.serial, "serial ports carrying the line protocol");
}

template <class V>
void describe(V& v, HookConfig& c) {
  v.text("program", c.program, "absolute path of a program run (without a shell) for every alert event",
         Need::required);
  v.texts("args", c.args, "arguments given before the event's own (channel, event, detector, time)");
  v.number("timeout_s", c.timeout_s, positive, "s", "the program is killed after this long", Need::optional);
}

template <class V>
void describe(V& v, AlertOutputs& c) {
  v.text("file", c.file, "JSON-lines file of alert events (relative: inside state_directory)", Need::optional);
  v.optional_section("hook", c.hook, "program to run for each alert event (its JSON on stdin)");
}

template <class V>
void describe(V& v, HistorianListener& c) {
  v.text("address", c.address, "IP address the historian feed listens on", Need::optional);
  v.integer("port", c.port, Range{1, 65535}, no_unit, "TCP port of the historian feed", Need::required);
  v.integer("max_subscribers", c.max_subscribers, Range{1, 10000}, no_unit, "subscribers beyond this are refused",
            Need::optional);
  v.integer("queue_records", c.queue_records, Range{1, 10000000}, "records",
            "records held for a slow subscriber; beyond that the oldest are dropped and counted", Need::optional);
  v.networks("allow", c.allow, "subscriber networks allowed (CIDR); empty allows any peer");
}

template <class V>
void describe(V& v, HistorianOutputs& c) {
  v.optional_section("listen", c.listen, "TCP feed of corrected averages as JSON lines, to any number of subscribers");
  v.text("csv_directory", c.csv_directory,
         "directory of daily CSV files historian-YYYY-MM-DD.csv, UTC (relative: inside state_directory; empty: off)",
         Need::optional);
}

template <class V>
void describe(V& v, RejectOutput& c) {
  v.text("file", c.file, "JSON-lines file of rejected lines with source and reason (relative: inside state_directory)",
         Need::optional);
  v.integer("log_per_minute", c.log_per_minute, Range{0, 100000}, "lines/min",
            "rejects logged per source per minute; the rest are counted and summarised", Need::optional);
}

template <class V>
void describe(V& v, Outputs& c) {
  v.section("alerts", c.alerts, "where drift and calibration-due alerts go");
  v.section("historian", c.historian, "where corrected averages go");
  v.section("rejects", c.rejects, "where rejected input is kept");
}

// ---- channels ----

template <class V>
void describe(V& v, metrology::Linearisation& c) {
  using K = metrology::Linearisation::Kind;
  v.choice("kind", c.kind,
           Options<K>{{"none", K::none, "values already in channel units"},
                      {"thermocouple", K::thermocouple, "emf in mV, ITS-90 reference function (IEC 60584-1)"},
                      {"rtd", K::rtd, "resistance in ohm, Callendar-Van Dusen (IEC 60751)"},
                      {"current_loop", K::current_loop, "4-20 mA loop current, NAMUR NE 43 signal levels"}},
           "how the raw signal becomes channel units");
  v.choice("thermocouple_type", c.thermocouple_type,
           Options<metrology::ThermocoupleType>{{"K", metrology::ThermocoupleType::K, ""},
                                                {"J", metrology::ThermocoupleType::J, ""},
                                                {"T", metrology::ThermocoupleType::T, ""}},
           "thermocouple type (kind: thermocouple)");
  v.number("cold_junction_c", c.cold_junction_c, any, "degC", "reference-junction temperature (kind: thermocouple)",
           Need::optional);
  v.number("r0_ohm", c.r0_ohm, positive, "ohm", "resistance at 0 degC: 100 for Pt100, 1000 for Pt1000 (kind: rtd)",
           Need::optional);
  v.number("cvd_a", c.cvd.a_per_c, any, "1/degC", "Callendar-Van Dusen A (kind: rtd; default IEC 60751)",
           Need::optional);
  v.number("cvd_b", c.cvd.b_per_c2, any, "1/degC^2", "Callendar-Van Dusen B", Need::optional);
  v.number("cvd_c", c.cvd.c_per_c4, any, "1/degC^4", "Callendar-Van Dusen C (below 0 degC only)", Need::optional);
  v.number("value_at_4ma", c.loop_range.value_at_4ma, any, "channel units", "value at 4 mA (kind: current_loop)",
           Need::optional);
  v.number("value_at_20ma", c.loop_range.value_at_20ma, any, "channel units", "value at 20 mA (kind: current_loop)",
           Need::optional);
}

template <class V>
void describe(V& v, ReferenceStandard& c) {
  v.text("id", c.id, "identifier of the reference standard (asset tag or certificate number)", Need::optional);
  v.number("expanded_uncertainty", c.expanded_uncertainty, non_negative, "channel units",
           "expanded uncertainty U from the reference standard's certificate", Need::optional);
  v.number("coverage_factor", c.coverage_factor, positive, no_unit, "coverage factor k of that U", Need::optional);
  v.number("dof", c.dof, positive, no_unit,
           "effective degrees of freedom of the certificate's uncertainty (absent: infinite)", Need::optional);
  v.number("noise_sd", c.noise_sd, non_negative, "channel units",
           "random scatter of one reference reading (needed by fit.errors_in_variables)", Need::optional);
  v.section("linearisation", c.linearisation, "when the reference reports a raw signal (mV, ohm, mA)");
}

template <class V>
void describe(V& v, Certificate& c) {
  v.text("id", c.id, "identifier of the sensor's calibration certificate", Need::optional);
  v.number("intercept", c.intercept, any, "channel units", "certified intercept b0* of y = b0* + b1* x",
           Need::required);
  v.number("slope", c.slope, any, no_unit, "certified slope b1*", Need::required);
  v.number("u_intercept", c.u_intercept, non_negative, "channel units", "standard uncertainty of b0*",
           Need::optional);
  v.number("u_slope", c.u_slope, non_negative, no_unit, "standard uncertainty of b1*", Need::optional);
  v.number("cov", c.cov, any, "channel units", "covariance of b0* and b1* (0 if not stated)", Need::optional);
}

template <class V>
void describe(V& v, SensorSpec& c) {
  v.section("linearisation", c.linearisation, "when the sensor reports a raw signal (mV, ohm, mA)");
  v.number("resolution", c.resolution, non_negative, "channel units",
           "smallest step of the sensor's indication (rectangular uncertainty resolution/sqrt(12))", Need::optional);
  v.optional_number("noise_sd", c.noise_sd, positive, "channel units",
                    "standard deviation of one reading; absent: learned from the first pairs");
}

template <class V>
void describe(V& v, Tolerance& c) {
  v.number("absolute", c.absolute, non_negative, "channel units", "maximum permissible error, absolute part",
           Need::optional);
  v.number("percent_of_reading", c.percent_of_reading, non_negative, "%", "part proportional to the reading",
           Need::optional);
  v.number("percent_of_span", c.percent_of_span, non_negative, "%", "part proportional to the span of `range`",
           Need::optional);
}

template <class V>
void describe(V& v, FitConfig& c) {
  v.choice("memory", c.memory,
           Options<stats::MemoryPolicy::Kind>{
               {"window", stats::MemoryPolicy::Kind::window, "the last window_pairs pairs"},
               {"cumulative", stats::MemoryPolicy::Kind::cumulative, "every pair since the last reset"},
               {"forgetting", stats::MemoryPolicy::Kind::forgetting, "exponential forgetting by forgetting_factor"}},
           "which pairs the running fit remembers");
  v.integer("window_pairs", c.window_pairs, Range{3, 10000000}, "pairs", "window length (memory: window)",
            Need::optional);
  v.number("forgetting_factor", c.forgetting_factor, probability_open, no_unit,
           "weight kept by older pairs at each new one (memory: forgetting); effective n = (1+f)/(1-f)",
           Need::optional);
  v.choice("model", c.model,
           Options<stats::Model>{{"line", stats::Model::line, "y = b0 + b1 x"},
                                 {"through_origin", stats::Model::through_origin, "y = b1 x"}},
           "straight-line model");
  v.flag("errors_in_variables", c.errors_in_variables,
         "fit with uncertainty in both variables (York/Deming, needs reference.noise_sd and sensor.noise_sd)");
  v.number("confidence", c.confidence, probability_open, no_unit, "two-sided confidence of intervals and verdicts",
           Need::optional);
  v.flag("widen_by_certificate", c.widen_by_certificate,
         "widen the certificate tests by the certificate's own standard uncertainties");
  v.optional_number("min_reference_spread", c.min_reference_spread, non_negative, "channel units",
                    "least RMS spread of the fit's reference values before any verdict (default: a twentieth of "
                    "the range's span, 0 without a range)");
}

template <class V>
void describe(V& v, ScreeningConfig& c) {
  v.flag("enabled", c.enabled, "screen isolated outliers out before they reach the fit and the detectors");
  v.number("limit", c.limit, positive, no_unit,
           "|externally studentised residual| beyond which a pair is held as a possible outlier", Need::optional);
  v.integer("max_held", c.max_held, Range{1, 1000}, "pairs",
            "this many held pairs within one episode are a real change, not spikes: they are released into the fit",
            Need::optional);
  v.integer("episode_pairs", c.episode_pairs, Range{1, 100000}, "pairs",
            "pairs after the first held one within which max_held more make a change; fewer are spikes",
            Need::optional);
}

template <class V>
void describe(V& v, DetectorConfig& c) {
  v.choice("kind", c.kind,
           Options<DetectorKind>{
               {"cusum", DetectorKind::cusum, "two-sided CUSUM on offset and slope innovations (default)"},
               {"ewma", DetectorKind::ewma, "EWMA on offset and slope innovations"},
               {"anytime", DetectorKind::anytime, "anytime-valid mixture test: P(any false alert) <= alpha"},
               {"interval", DetectorKind::interval, "certificate outside the fit's intervals, with persistence"}},
           "drift detector");
  v.number("target_arl0_pairs", c.target_arl0_pairs, non_negative, "pairs",
           "average pairs between false alerts to design for (0: from false_alert_interval_days x pair_rate_hz)",
           Need::optional);
  v.number("false_alert_interval_days", c.false_alert_interval_days, positive, "days",
           "design for one false alert per this many days...", Need::optional);
  v.number("pair_rate_hz", c.pair_rate_hz, positive, "Hz", "...at this rate of pairs", Need::optional);
  v.number("min_slope_change", c.min_slope_change, positive, "fraction",
           "smallest change of slope worth catching, as a fraction of the certified slope", Need::optional);
  v.optional_number("min_offset_change", c.min_offset_change, positive, "channel units",
                    "smallest offset change worth catching (default: a quarter of the tolerance at mid-range)");
  v.number("alpha", c.alpha, probability_open, no_unit,
           "anytime: probability of any false alert over unlimited monitoring", Need::optional);
  v.integer("learn_pairs", c.learn_pairs, Range{0, 1000000}, "pairs",
            "pairs used to learn the noise and the reference centre (0: min_pairs with a configured noise_sd, "
            "else at least 500)", Need::optional);
}

template <class V>
void describe(V& v, AlertPolicy& c) {
  v.optional_integer("raise_after", c.raise_after, Range{1, 1000000}, "evaluations",
                     "consecutive evaluations with a drift finding before an alert is raised (default 1 for the "
                     "sequential detectors; for interval twice fit.window_pairs, or 2000)");
  v.number("raise_after_s", c.raise_after_s, non_negative, "s", "and for at least this long", Need::optional);
  v.integer("clear_after", c.clear_after, Range{1, 1000000}, "evaluations",
            "consecutive evaluations without a finding before the alert clears", Need::optional);
  v.number("clear_after_s", c.clear_after_s, non_negative, "s", "and for at least this long", Need::optional);
}

template <class V>
void describe(V& v, AveragingConfig& c) {
  v.integer("block_readings", c.block_readings, Range{0, 10000000}, "readings",
            "average blocks of this many readings (0: UTC time buckets of bucket_s)", Need::optional);
  v.number("bucket_s", c.bucket_s, positive, "s", "length of the UTC-aligned averaging buckets", Need::optional);
  v.flag("include_pair_readings", c.include_pair_readings,
         "also average the sensor side of pairs as readings");
  v.number("coverage_probability", c.coverage_probability, probability_open, no_unit,
           "coverage probability of the expanded uncertainty U (0.9545 for GUM's k = 2 convention)", Need::optional);
}

template <class V>
void describe(V& v, ForecastConfig& c) {
  v.flag("enabled", c.enabled, "forecast when the error will leave tolerance (needs tolerance and range)");
  v.number("snapshot_interval_s", c.snapshot_interval_s, positive, "s",
           "how often the error at the range ends is recorded for the trend", Need::optional);
  v.integer("min_snapshots", c.min_snapshots, Range{3, 100000}, no_unit, "snapshots before any forecast",
            Need::optional);
  v.number("warn_before_days", c.warn_before_days, non_negative, "days",
           "raise a calibration-due warning this long before the forecast crossing", Need::optional);
}

// The parts of a channel that channel_defaults may also give.
template <class V>
void describe_channel_common(V& v, ChannelConfig& c) {
  v.text("units", c.units, "engineering units of x and y after linearisation, e.g. degC or bar", Need::optional);
  v.section("reference", c.reference, "the reference standard read alongside the sensor");
  v.section("sensor", c.sensor, "the sensor under monitoring");
  v.number_pair("range", c.range_low, c.range_high, "channel units",
                "[low, high] reference values over which the sensor is used (tolerance, forecast)");
  v.section("tolerance", c.tolerance, "maximum permissible error of the sensor over its range");
  v.choice("decision_rule", c.decision_rule,
           Options<DecisionRule>{{"guarded", DecisionRule::guarded, "pass/fail only outside a guard band (ILAC-G8)"},
                                 {"simple", DecisionRule::simple, "simple acceptance (up to 50 % false-accept risk)"}},
           "decision rule of the tolerance verdict");
  v.optional_number("guard_band", c.guard_band, non_negative, "channel units",
                    "guard band w (default: the expanded uncertainty of the error)");
  v.section("fit", c.fit, "the running calibration fit");
  v.integer("min_pairs", c.min_pairs, Range{3, 100000000}, "pairs", "pairs before any verdict or alert",
            Need::optional);
  v.section("screening", c.screening, "outlier screening before the fit");
  v.section("detector", c.detector, "drift detection");
  v.section("alert", c.alert, "when drift findings become alerts");
  v.section("averaging", c.averaging, "corrected averages for the historian");
  v.section("forecast", c.forecast, "calibration-due forecast");
}

template <class V>
void describe(V& v, ChannelConfig& c) {
  v.text("id", c.id, "channel id used in records (1-64 of A-Z a-z 0-9 _ . : / -)", Need::required);
  v.text("description", c.description, "free text for people", Need::optional);
  v.section("certificate", c.certificate, "the sensor's calibration certificate: the line it should follow");
  describe_channel_common(v, c);
}

// Top level, except `channel_defaults` and `channels`, which the reader handles itself.
template <class V>
void describe_top(V& v, Config& c) {
  v.choice("log_level", c.log_level,
           Options<LogLevel>{{"trace", LogLevel::trace, ""}, {"debug", LogLevel::debug, ""},
                             {"info", LogLevel::info, ""}, {"warning", LogLevel::warning, ""},
                             {"error", LogLevel::error, ""}, {"critical", LogLevel::critical, ""}},
           "least severe log messages written");
  v.text("state_directory", c.state_directory, "journal, checkpoints, reject and alert files", Need::optional);
  v.section("journal", c.journal, "the write-ahead journal of accepted records");
  v.number("checkpoint_interval_s", c.checkpoint_interval_s, Range{1, 86400 * 7}, "s",
           "how often the fit state is checkpointed (and at shutdown)", Need::optional);
  v.section("time", c.time, "rules for record timestamps");
  v.section("control", c.control, "the local control socket (rigcal status)");
  v.section("inputs", c.inputs, "where records come from");
  v.section("outputs", c.outputs, "where results go");
}

}  // namespace rigcal::config::schema
