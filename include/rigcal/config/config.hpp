#pragma once
// rigcald's configuration as an immutable value, loaded in one pass from YAML (loader.hpp).
//
// Every field's key, unit, default and constraint is declared once, in daemon/config/schema.hpp;
// the defaults below are the ones documented there and in config/reference.md, which is
// generated from the schema (`rigcald --config-reference`) and checked against it by a test.
#include <algorithm>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "rigcal/metrology/linearisation.hpp"
#include "rigcal/stats/line_fit.hpp"
#include "rigcal/stats/streaming_fit.hpp"

namespace rigcal::config {

enum class LogLevel { trace, debug, info, warning, error, critical };
enum class FsyncPolicy { interval, every_batch };
enum class SegmentRetention { remove, archive };

struct JournalConfig {
  FsyncPolicy fsync = FsyncPolicy::interval;
  int fsync_interval_ms = 20;
  std::uint64_t segment_bytes = 64ull << 20;
  SegmentRetention retain = SegmentRetention::remove;
};

struct TimeRules {
  double max_future_s = 300;      // a timestamp further ahead of rigcald's clock is rejected
  double max_backwards_s = 3600;  // a timestamp older than the channel's latest by more is rejected
};

// An IPv4 or IPv6 network in CIDR form, e.g. 10.20.0.0/16.
struct Network {
  std::string text;
  bool v6 = false;
  unsigned char bytes[16] = {};
  int prefix = 0;
};

struct TlsConfig {
  std::string certificate_file;
  std::string private_key_file;
  std::string client_ca_file;  // when set, senders must present a certificate signed by it
  bool enabled() const { return !certificate_file.empty(); }
};

struct TcpInput {
  std::string name;
  std::string address = "127.0.0.1";
  int port = 0;
  int max_connections = 256;
  int max_line_bytes = 1024;
  double idle_timeout_s = 300;
  std::vector<Network> allow;
  std::string secret_file;
  TlsConfig tls;
};

enum class Parity { none, odd, even };
enum class StopBits { one, onepointfive, two };
enum class FlowControl { none, software, hardware };

struct SerialInput {
  std::string name;
  std::string device;
  unsigned baud = 9600;
  unsigned data_bits = 8;
  Parity parity = Parity::none;
  StopBits stop_bits = StopBits::one;
  FlowControl flow_control = FlowControl::none;
  int max_line_bytes = 1024;
  int reopen_initial_ms = 500;
  int reopen_max_ms = 30000;
};

struct Inputs {
  std::vector<TcpInput> tcp;
  std::vector<SerialInput> serial;
};

struct HookConfig {
  std::string program;
  std::vector<std::string> args;
  double timeout_s = 10;
};

struct AlertOutputs {
  std::string file = "alerts.jsonl";
  std::optional<HookConfig> hook;
};

struct HistorianListener {
  std::string address = "127.0.0.1";
  int port = 0;
  int max_subscribers = 16;
  int queue_records = 10000;
  std::vector<Network> allow;
};

struct HistorianOutputs {
  std::optional<HistorianListener> listen;
  std::string csv_directory = "historian";
};

struct RejectOutput {
  std::string file = "rejects.jsonl";
  int log_per_minute = 10;
};

struct Outputs {
  AlertOutputs alerts;
  HistorianOutputs historian;
  RejectOutput rejects;
};

struct ControlConfig {
  std::string socket = "control.sock";
  std::string secret_file;
};

// --- per channel ---
// One copy of each channel's configuration lives as long as the channel: the small fields of a
// struct are kept next to each other so that the struct loses little to padding.

struct ReferenceStandard {
  std::string id;
  double expanded_uncertainty = 0;  // U of the certificate, in the channel's units
  double coverage_factor = 2;       // k of that U
  double dof = std::numeric_limits<double>::infinity();
  double noise_sd = 0;  // random scatter of one reference reading (errors-in-variables fits)
  metrology::Linearisation linearisation;  // when the reference reports a raw signal
  double standard_uncertainty() const { return coverage_factor > 0 ? expanded_uncertainty / coverage_factor : 0; }
};

struct Certificate {
  std::string id;
  double intercept = 0;
  double slope = 1;
  double u_intercept = 0;
  double u_slope = 0;
  double cov = 0;
};

struct SensorSpec {
  metrology::Linearisation linearisation;  // raw signal -> channel units, before the fit
  double resolution = 0;            // smallest step of the indication, channel units
  std::optional<double> noise_sd;   // standard deviation of one reading; learned when absent
};

struct Tolerance {
  double absolute = 0;
  double percent_of_reading = 0;
  double percent_of_span = 0;
  bool configured() const { return absolute > 0 || percent_of_reading > 0 || percent_of_span > 0; }
};

enum class DecisionRule { simple, guarded };

struct FitConfig {
  stats::MemoryPolicy::Kind memory = stats::MemoryPolicy::Kind::window;
  int window_pairs = 1000;
  double forgetting_factor = 0.999;
  stats::Model model = stats::Model::line;
  bool errors_in_variables = false;
  bool widen_by_certificate = true;
  double confidence = 0.95;
  std::optional<double> min_reference_spread;  // RMS of the fit's reference values; default: span/20
  stats::MemoryPolicy policy() const {
    switch (memory) {
      case stats::MemoryPolicy::Kind::window: return stats::MemoryPolicy::window(static_cast<std::size_t>(window_pairs));
      case stats::MemoryPolicy::Kind::forgetting: return stats::MemoryPolicy::forgetting(forgetting_factor);
      case stats::MemoryPolicy::Kind::cumulative: break;
    }
    return stats::MemoryPolicy::cumulative();
  }
};

struct ScreeningConfig {
  bool enabled = true;
  double limit = 6.0;
  int max_held = 3;
  int episode_pairs = 20;
};

enum class DetectorKind { interval, cusum, ewma, anytime };

struct DetectorConfig {
  DetectorKind kind = DetectorKind::cusum;
  int learn_pairs = 0;                      // 0: min_pairs
  double target_arl0_pairs = 0;             // 0: use the false-alert interval form below
  double false_alert_interval_days = 365;
  double pair_rate_hz = 1;
  double min_slope_change = 0.005;          // fraction of the certified slope
  std::optional<double> min_offset_change;  // channel units; default: a quarter of the tolerance at mid-range
  double alpha = 0.001;                     // anytime-valid test: probability of any false alert, ever
  double arl0_pairs() const {
    return target_arl0_pairs > 0 ? target_arl0_pairs : false_alert_interval_days * 86400.0 * pair_rate_hz;
  }
};

struct AlertPolicy {
  std::optional<int> raise_after;  // consecutive evaluations with a finding; default by detector
  double raise_after_s = 0;
  int clear_after = 200;
  double clear_after_s = 0;
};

struct AveragingConfig {
  int block_readings = 0;  // close a block after this many readings (0: use time buckets)
  bool include_pair_readings = false;
  double bucket_s = 60;    // fixed UTC-aligned buckets when block_readings is 0
  double coverage_probability = 0.95;
};

struct ForecastConfig {
  bool enabled = true;
  int min_snapshots = 5;
  double snapshot_interval_s = 86400;
  double warn_before_days = 30;
};

struct ChannelConfig {
  std::string id;
  std::string description;
  std::string units;
  ReferenceStandard reference;
  Certificate certificate;
  SensorSpec sensor;
  std::optional<double> range_low, range_high;  // reference values over which the sensor is used
  Tolerance tolerance;
  std::optional<double> guard_band;  // default: the expanded uncertainty of the error
  FitConfig fit;
  int min_pairs = 30;
  DecisionRule decision_rule = DecisionRule::guarded;
  ScreeningConfig screening;
  DetectorConfig detector;
  AlertPolicy alert;
  AveragingConfig averaging;
  ForecastConfig forecast;

  // The least RMS spread of the reference values in the fit before verdicts are given (a fit of pairs
  // at one set point cannot say anything about the slope): configured, else a twentieth of the
  // range's span, else 0.
  double min_reference_spread() const {
    if (fit.min_reference_spread) return *fit.min_reference_spread;
    if (range_low && range_high) return (*range_high - *range_low) / 20.0;
    return 0.0;
  }

  // Default persistence: 1 for the sequential detectors (their ARL0 is designed); for the interval
  // rule twice the fit's window (2000 pairs without a window), which the detector study
  // (tools/study/results) found puts the rule near a one-false-alert-a-year ARL0 at 1 pair/s; its
  // re-tested intervals on overlapping windows have no design of their own.
  int raise_after() const {
    if (alert.raise_after) return *alert.raise_after;
    if (detector.kind != DetectorKind::interval) return 1;
    return fit.memory == stats::MemoryPolicy::Kind::window ? 2 * fit.window_pairs : default_interval_raise_after;
  }
  static constexpr int default_interval_raise_after = 2000;
  // Pairs the sequential detectors learn over before they are designed: configured, else min_pairs when
  // the noise is configured, else at least 500 (a sigma learned from n pairs has a standard error of
  // about 1/sqrt(2n): 13 % at 30 pairs, 3 % at 500, and the designed ARL0 is very sensitive to it).
  int learn_pairs() const {
    if (detector.learn_pairs > 0) return detector.learn_pairs;
    return sensor.noise_sd ? min_pairs : std::max(min_pairs, 500);
  }
};

struct Config {
  std::string file;  // where it was loaded from (for messages)
  LogLevel log_level = LogLevel::info;
  std::string state_directory = "/var/lib/rigcald";
  JournalConfig journal;
  double checkpoint_interval_s = 300;
  TimeRules time;
  ControlConfig control;
  Inputs inputs;
  Outputs outputs;
  std::vector<ChannelConfig> channels;
};

}  // namespace rigcal::config
