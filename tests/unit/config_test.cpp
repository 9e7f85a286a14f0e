// The YAML configuration: strict reading, messages with file:line:column and the expected form,
// defaults, and the generated reference kept in step with the schema.
#include <catch2/catch.hpp>
#include <fstream>
#include <sstream>

#include "rigcal/config/loader.hpp"

using namespace rigcal::config;

namespace {
std::string read_file(const std::string& path) {
  std::ifstream in(path);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}
std::string all_errors(const LoadResult& r) {
  std::string s;
  for (const auto& e : r.errors) s += e.to_string() + "\n";
  return s;
}
const char* minimal_channel = R"(
channels:
  - id: TT-101
    certificate: {intercept: 0, slope: 1}
    detector: {kind: interval}
)";
}  // namespace

TEST_CASE("the bundled example configuration loads without errors") {
  const auto r = load_config(read_file(std::string(RIGCAL_SOURCE_DIR) + "/config/rigcald.yaml"), "rigcald.yaml");
  INFO(all_errors(r));
  REQUIRE(r.ok());
  REQUIRE(r.config.channels.size() == 2);
  const ChannelConfig& tt = r.config.channels[0];
  CHECK(tt.id == "TT-101");
  CHECK(tt.fit.window_pairs == 1000);  // from channel_defaults
  CHECK(tt.reference.standard_uncertainty() == Approx(0.01));
  CHECK(tt.range_low == 20.0);
  CHECK(r.config.channels[1].averaging.block_readings == 20);
  CHECK(r.config.channels[1].averaging.bucket_s == 60);  // default kept under an override of block_readings
  CHECK(r.config.inputs.tcp.at(0).port == 7410);
  CHECK(r.config.inputs.serial.at(0).baud == 19200);
}

TEST_CASE("defaults apply when keys are absent") {
  const auto r = load_config(minimal_channel, "min.yaml");
  INFO(all_errors(r));
  REQUIRE(r.ok());
  const Config& c = r.config;
  CHECK(c.state_directory == "/var/lib/rigcald");
  CHECK(c.journal.fsync == FsyncPolicy::interval);
  CHECK(c.channels[0].fit.confidence == 0.95);
  CHECK(c.channels[0].min_pairs == 30);
  CHECK(c.channels[0].raise_after() == 2 * c.channels[0].fit.window_pairs);  // interval rule: twice the window
}

TEST_CASE("an unknown key is refused with its place and a suggestion") {
  const auto r = load_config("log_level: info\njournal:\n  fsync_intervall_ms: 5\n", "typo.yaml");
  REQUIRE(r.errors.size() == 1);
  CHECK(r.errors[0].to_string() ==
        "typo.yaml:3:3: journal.fsync_intervall_ms: unknown key 'fsync_intervall_ms' (did you mean "
        "'fsync_interval_ms'?)");
}

TEST_CASE("numbers must parse completely and lie in range; the message gives the expected form") {
  struct Case {
    const char* yaml;
    const char* expected;
  };
  const Case cases[] = {
      {"checkpoint_interval_s: 5min\n", "rc.yaml:1:24: checkpoint_interval_s: expected a number from 1 to 604800, got '5min'"},
      {"inputs:\n  tcp:\n    - {name: a, port: 70000}\n",
       "rc.yaml:3:23: inputs.tcp[0].port: expected an integer from 1 to 65535, got '70000'"},
      {"inputs:\n  tcp:\n    - {name: a, port: 7.5}\n",
       "rc.yaml:3:23: inputs.tcp[0].port: expected an integer from 1 to 65535, got '7.5'"},
      {"journal: {fsync: sometimes}\n", "rc.yaml:1:18: journal.fsync: expected one of interval, every_batch, got 'sometimes'"},
      {"channel_defaults: {fit: {confidence: 1.0}}\n",
       "rc.yaml:1:38: channel_defaults.fit.confidence: expected a number greater than 0 and less than 1, got '1.0'"},
      {"channel_defaults: {fit: {widen_by_certificate: yes}}\n",
       "rc.yaml:1:48: channel_defaults.fit.widen_by_certificate: expected true or false, got 'yes'"},
      {"checkpoint_interval_s: .nan\n", "expected a number from 1 to 604800, got '.nan'"},
  };
  for (const auto& c : cases) {
    INFO(c.yaml);
    const auto r = load_config(c.yaml, "rc.yaml");
    REQUIRE(r.errors.size() == 1);
    CHECK_THAT(r.errors[0].to_string(), Catch::Contains(c.expected));
  }
}

TEST_CASE("required keys, duplicates and every problem reported at once") {
  const auto r = load_config(
      "inputs:\n  tcp:\n    - {name: a}\nchannels:\n  - id: TT-1\n    id: TT-2\n    certificate: {slope: 1}\n",
      "many.yaml");
  const std::string text = all_errors(r);
  INFO(text);
  CHECK_THAT(text, Catch::Contains("inputs.tcp[0].port: required key is missing"));
  CHECK_THAT(text, Catch::Contains("many.yaml:6:5: channels[0].id: duplicate key"));
  CHECK_THAT(text, Catch::Contains("channels[0].certificate.intercept: required key is missing"));
  CHECK(r.errors.size() == 3);
}

TEST_CASE("checks across fields name the field at fault") {
  const auto r = load_config(R"(
inputs:
  tcp:
    - {name: a, port: 7410}
    - {name: a, port: 7410, address: 10.0.0.300}
channels:
  - id: TT-101
    certificate: {intercept: 0, slope: 1}
    tolerance: {absolute: 0.5}
    fit: {window_pairs: 20}
  - id: TT-101
    certificate: {intercept: 0, slope: 1}
    detector: {kind: cusum}
)",
                             "cross.yaml");
  const std::string text = all_errors(r);
  INFO(text);
  CHECK_THAT(text, Catch::Contains("inputs.tcp[1].name: another input is already named 'a'"));
  CHECK_THAT(text, Catch::Contains("inputs.tcp[1].address: expected an IPv4 or IPv6 address, got '10.0.0.300'"));
  CHECK_THAT(text, Catch::Contains("channels[0].tolerance: a tolerance needs the channel's range"));
  CHECK_THAT(text, Catch::Contains("channels[0].min_pairs: min_pairs (30) exceeds fit.window_pairs (20)"));
  CHECK_THAT(text, Catch::Contains("channels[1].id: another channel already has the id 'TT-101'"));
  CHECK_THAT(text, Catch::Contains("channels[1].detector: give min_offset_change, or a tolerance"));
}

TEST_CASE("channel_defaults may not carry a channel's own identity") {
  const auto r = load_config("channel_defaults: {id: X, units: degC}\n", "d.yaml");
  REQUIRE(r.errors.size() == 1);
  CHECK_THAT(r.errors[0].to_string(), Catch::Contains("channel_defaults.id: belongs to each channel"));
}

TEST_CASE("broken YAML is reported with its place") {
  const auto r = load_config("journal: {fsync: interval\nlog_level: info\n", "broken.yaml");
  REQUIRE(r.errors.size() == 1);
  CHECK_THAT(r.errors[0].to_string(), Catch::StartsWith("broken.yaml:"));
  CHECK_THAT(r.errors[0].to_string(), Catch::Contains("not valid YAML"));
}

TEST_CASE("the channel fingerprint changes with any field and only then") {
  const auto a = load_config(minimal_channel, "a.yaml").config.channels.at(0);
  auto b = a;
  CHECK(channel_fingerprint(a) == channel_fingerprint(b));
  b.fit.window_pairs += 1;
  CHECK(channel_fingerprint(a) != channel_fingerprint(b));
  b = a;
  b.certificate.slope = std::nextafter(1.0, 2.0);
  CHECK(channel_fingerprint(a) != channel_fingerprint(b));
  b = a;
  b.description = "changed";
  CHECK(channel_fingerprint(a) != channel_fingerprint(b));
}

TEST_CASE("config/reference.md is the reference generated from the schema") {
  const std::string committed = read_file(std::string(RIGCAL_SOURCE_DIR) + "/config/reference.md");
  const std::string generated = config_reference_markdown();
  INFO("regenerate with: rigcald --config-reference > config/reference.md");
  CHECK(committed == generated);
  for (const char* key : {"`journal.fsync`", "`inputs.tcp[].port`", "`channels[].fit.window_pairs`",
                          "`channels[].detector.kind`", "`outputs.historian.listen.port`"})
    CHECK_THAT(generated, Catch::Contains(key));
}

TEST_CASE("the demo configuration's channels are the example's, apart from the forecast timing") {
  const auto example = load_config(read_file(std::string(RIGCAL_SOURCE_DIR) + "/config/rigcald.yaml"), "rigcald.yaml");
  const auto demo = load_config(read_file(std::string(RIGCAL_SOURCE_DIR) + "/config/demo.yaml"), "demo.yaml");
  INFO(all_errors(demo));
  REQUIRE(example.ok());
  REQUIRE(demo.ok());
  REQUIRE(demo.config.channels.size() == example.config.channels.size());
  for (std::size_t i = 0; i < demo.config.channels.size(); ++i) {
    ChannelConfig d = demo.config.channels[i];
    d.forecast = example.config.channels[i].forecast;
    INFO(d.id);
    CHECK(channel_fingerprint(d) == channel_fingerprint(example.config.channels[i]));
  }
  CHECK(demo.config.inputs.serial.empty());
}
