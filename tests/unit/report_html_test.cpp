// The report's HTML: escaping of user text, numbers that read back exactly, and a page that holds
// its sections whatever was or was not given.
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "report/html_text.hpp"
#include "report/report_html.hpp"
#include "report/report_model.hpp"
#include "report/report_text.hpp"

using namespace rigcal::report;

namespace {

std::size_t count(const std::string& text, const std::string& what) {
  std::size_t n = 0;
  for (auto pos = text.find(what); pos != std::string::npos; pos = text.find(what, pos + 1)) ++n;
  return n;
}

ReportData five_pairs() {
  ReportData d;
  d.x = {10, 20, 30, 40, 50};
  d.y = {10.2, 20.1, 29.8, 40.4, 50.1};
  return d;
}

}  // namespace

TEST_CASE("HTML escaping makes user text inert in content and attributes") {
  CHECK(escape_html("TT-101 <script>alert('x')</script> & \"co\"") ==
        "TT-101 &lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt; &amp; &quot;co&quot;");
  CHECK(escape_html("degC \u00b0 \u00b5m") == "degC \u00b0 \u00b5m");  // UTF-8 passes through
  CHECK(escape_html(std::string("a\x01" "b\x7f" "c\td\n", 8)) == "a\xEF\xBF\xBD" "b\xEF\xBF\xBD" "c\td\n");
  CHECK(escape_html("") == "");
}

TEST_CASE("exact numbers read back as the same double") {
  for (double v : {0.1, 1.0021168180204547, -0.26232307377414, 1e-300, 6.02214076e23, 0.0}) {
    const std::string s = exact_number(v);
    CHECK(std::stod(s) == v);
  }
  CHECK(exact_number(std::numeric_limits<double>::infinity()) == "inf");
  CHECK(exact_number(-std::numeric_limits<double>::infinity()) == "-inf");
  CHECK(exact_number(std::nan("")) == "nan");
  const double list[] = {1, 2.5, -3};
  CHECK(exact_number_list(list) == "1 2.5 -3");
}

TEST_CASE("the page escapes channel ids, descriptions and units everywhere they appear") {
  ReportLabels labels;
  labels.channel = "TT-<101>";
  labels.description = "jacket \"outlet\" & <b>return</b>";
  labels.units = "deg<C>";
  labels.source = "file <a href=x>.csv";
  labels.reference_id = "PRT'07";
  auto r = build_report(labels, five_pairs(), ReportOptions{});
  REQUIRE(r.ok());
  const std::string html = render_html(r.value());
  CHECK(count(html, "TT-&lt;101&gt;") >= 2);  // title and heading
  CHECK(html.find("TT-<101>") == std::string::npos);
  CHECK(html.find("jacket &quot;outlet&quot; &amp; &lt;b&gt;return&lt;/b&gt;") != std::string::npos);
  CHECK(html.find("<b>return</b>") == std::string::npos);
  CHECK(html.find("deg&lt;C&gt;") != std::string::npos);  // axis labels and text
  CHECK(html.find("deg<C>") == std::string::npos);
  CHECK(html.find("<a href") == std::string::npos);
  CHECK(html.find("PRT&#39;07") != std::string::npos);
  CHECK(html.find("<script") == std::string::npos);
}

TEST_CASE("a report with nothing optional says what was not given in every section") {
  auto r = build_report(ReportLabels{}, five_pairs(), ReportOptions{});
  REQUIRE(r.ok());
  const std::string html = render_html(r.value());
  CHECK(html.find("No certificate line was given") != std::string::npos);
  CHECK(html.find("No tolerance was given") != std::string::npos);
  CHECK(html.find("reference standard&#39;s uncertainty was not given") != std::string::npos);
  CHECK(html.find("resolution was not given") != std::string::npos);
  CHECK(html.find("carry no time stamps") != std::string::npos);
  CHECK(html.find("Tolerance: not judged") != std::string::npos);
  CHECK(html.find("id=\"plot-joint-region\"") == std::string::npos);  // nothing to draw without a certificate
  CHECK(count(html, "<svg ") == 4);  // calibration, two residual plots, averaging
  const std::string text = render_text(r.value());
  CHECK(text.find("No certificate line was given") != std::string::npos);
  CHECK(text.find("Cautions") != std::string::npos);
}

TEST_CASE("bad report options are errors, not silent corrections") {
  ReportOptions o;
  o.confidence = 1.2;
  CHECK_FALSE(build_report(ReportLabels{}, five_pairs(), o).ok());
  o = {};
  o.averaged_readings = 0.5;
  CHECK_FALSE(build_report(ReportLabels{}, five_pairs(), o).ok());
  o = {};
  o.errors_in_variables = ErrorsInVariablesInput{0.01, std::nullopt};
  const auto r = build_report(ReportLabels{}, five_pairs(), o);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().message.find("sensor uncertainty") != std::string::npos);
  o = {};
  o.tolerance = ToleranceInput{{-1, 0, 0}, rigcal::metrology::SensorRange{0, 100}, {}, {}};
  o.certificate = rigcal::stats::CertifiedLine{};
  CHECK_FALSE(build_report(ReportLabels{}, five_pairs(), o).ok());
}
