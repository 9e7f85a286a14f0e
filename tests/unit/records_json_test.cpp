// The historian feed's directly written JSON line is the same text as the nlohmann object it
// replaced, and the CSV numbers are printf's %.10g.
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdio>
#include <limits>
#include <random>

#include "../../daemon/service/json_line.hpp"
#include "../../daemon/service/records_json.hpp"

using namespace rigcal;

namespace {

std::string nlohmann_text(double v) {
  return nlohmann::ordered_json(v).dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace);
}

engine::HistorianRecord sample_record() {
  engine::HistorianRecord r;
  r.channel = "TT-101";
  r.units = "degC";
  r.seq = 42;
  r.window_start = 1'764'576'930'125'000'000;
  r.window_end = 1'764'576'990'000'000'001;
  r.m = 100;
  r.raw_mean = 101.23456789;
  r.indication = 101.23456789;
  r.corrected = 101.2001;
  r.u = 0.0123;
  r.expanded = 0.0246;
  r.k = 2.0;
  r.nu_eff = std::numeric_limits<double>::infinity();
  r.coverage_probability = 0.95;
  r.u_repeatability = 1e-5;
  r.u_calibration = 3.5e-3;
  r.u_reference = 0.01;
  r.u_resolution = 2.886751345948129e-05;
  r.quality = engine::Quality::uncertain;
  r.quality_reason = "fit has fewer than min_pairs";
  r.calibration = {3, 1000, -0.0, 1.0000000000000002, 1e-300, 1.5e20, -2.5e-7, 0.03, 998, true};
  r.reference_id = "PRT-REF-07";
  r.certificate_id = "CAL \"quoted\" \\ tab\t ünïcode";
  r.drift_alert = true;
  return r;
}

}  // namespace

TEST_CASE("historian JSON line equals the nlohmann dump of historian_json") {
  engine::HistorianRecord r = sample_record();
  CHECK(service::historian_json_line(r) ==
        service::historian_json(r).dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace));
  SECTION("without a corrected value and with NaN") {
    r.corrected.reset();
    r.u = std::nan("");
    r.certificate_id = "";
    CHECK(service::historian_json_line(r) ==
          service::historian_json(r).dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace));
  }
}

TEST_CASE("JSON numbers are written in nlohmann's format") {
  for (double v : {1.0, 100.0, 0.5, 1e-5, 1e-4, 0.0001234, 123456789012345.0, 1234567890123456.0, 1e15, 1e16, 1.5e20,
                   -3.25, 5e-324, 1.7976931348623157e308, 0.1, 2.0 / 3.0, -0.0, 0.0})
    CHECK(([v] {
            std::string s;
            service::append_json_double(s, v);
            return s;
          }()) == nlohmann_text(v));
  // Random values over many magnitudes: the same double back, and nearly always the same text
  // (nlohmann's Grisu2 is not always the shortest form; std::to_chars is).
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> mantissa(-10, 10);
  std::uniform_int_distribution<int> exponent(-30, 30);
  int same = 0;
  const int n = 20000;
  for (int i = 0; i < n; ++i) {
    const double v = mantissa(rng) * std::pow(10.0, exponent(rng));
    std::string s;
    service::append_json_double(s, v);
    CHECK(nlohmann::json::parse(s).get<double>() == v);
    same += s == nlohmann_text(v) ? 1 : 0;
  }
  CHECK(same >= n * 99 / 100);  // measured: 99.5 % (the rest: Grisu2 gave 17 digits or another last one)
}

TEST_CASE("historian CSV numbers are printf's %.10g") {
  engine::HistorianRecord r = sample_record();
  const std::string row = service::historian_csv_row(r);
  char expected[32];
  std::snprintf(expected, sizeof expected, "%.10g", r.raw_mean);
  CHECK(row.find(std::string(",") + expected + ",") != std::string::npos);
  std::snprintf(expected, sizeof expected, "%.10g", r.calibration.var_b1);
  CHECK(row.find(std::string(",") + expected + ",") != std::string::npos);
}
