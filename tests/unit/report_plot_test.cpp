// The report's SVG plot builder: tick selection, coordinate mapping, and what the SVG states about
// the numbers it draws.
#include <catch2/catch.hpp>
#include <cmath>
#include <regex>
#include <string>

#include "report/scale.hpp"
#include "report/svg_plot.hpp"
#include "report/ticks.hpp"

using namespace rigcal::report;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

std::vector<double> values(const TickSet& t, bool major_only = true) {
  std::vector<double> v;
  for (const auto& k : t.ticks)
    if (k.major || !major_only) v.push_back(k.value);
  return v;
}

std::vector<std::string> labels(const TickSet& t) {
  std::vector<std::string> v;
  for (const auto& k : t.ticks)
    if (k.major) v.push_back(k.label);
  return v;
}

// Every match of `pattern`'s first group in `text`.
std::vector<std::string> all(const std::string& text, const std::string& pattern) {
  std::vector<std::string> out;
  const std::regex re(pattern);
  for (auto it = std::sregex_iterator(text.begin(), text.end(), re); it != std::sregex_iterator(); ++it)
    out.push_back((*it)[1].str());
  return out;
}

}  // namespace

TEST_CASE("nice steps are 1, 2 or 5 times a power of ten") {
  CHECK(nice_step(1000, 5) == 200);
  CHECK(nice_step(10, 5) == 2);
  CHECK(nice_step(7, 5) == 1);
  CHECK(nice_step(0.0035, 5) == Approx(0.0005).epsilon(1e-12));  // 0.0007 rounds to 5e-4
  CHECK(nice_step(3.3e6, 5) == 5e5);
  CHECK(nice_step(4.6e6, 5) == 1e6);
  CHECK(nice_step(1.8, 5) == Approx(0.5).epsilon(1e-12));
}

TEST_CASE("linear ticks widen the extent to whole steps and label with the step's decimals") {
  SECTION("a span of 0.3 to 987 gets ticks every 200 from 0 to 1000") {
    const TickSet t = linear_ticks(0.3, 987);
    CHECK(t.lo == 0);
    CHECK(t.hi == 1000);
    CHECK(values(t) == std::vector<double>{0, 200, 400, 600, 800, 1000});
    CHECK(labels(t) == std::vector<std::string>{"0", "200", "400", "600", "800", "1000"});
  }
  SECTION("a slope-sized span keeps the digits that tell ticks apart") {
    const TickSet t = linear_ticks(1.00124, 1.00299);
    CHECK(t.step == Approx(5e-4).epsilon(1e-9));
    CHECK(labels(t).front() == "1.0010");
    CHECK(labels(t).back() == "1.0030");
  }
  SECTION("negative values and zero print without a stray minus sign") {
    const TickSet t = linear_ticks(-2.4, 1.9);
    CHECK(labels(t) == std::vector<std::string>{"-3", "-2", "-1", "0", "1", "2"});
  }
  SECTION("one distinct value still gives an axis around it") {
    const TickSet t = linear_ticks(5, 5);
    CHECK(t.lo < 5);
    CHECK(t.hi > 5);
    CHECK(t.ticks.size() >= 2);
    const TickSet z = linear_ticks(0, 0);
    CHECK(z.lo < 0);
    CHECK(z.hi > 0);
  }
  SECTION("very large and very small magnitudes use exponents") {
    CHECK(tick_label(2e7, 1e6) == "2.0e+07");
    CHECK(tick_label(3e-6, 1e-6) == "3e-06");
    CHECK(tick_label(-1e-17, 0.5) == "0.0");
  }
}

TEST_CASE("log ticks are decades with unlabelled minor ticks at 2 and 5") {
  const TickSet t = log10_ticks(1, 1e4);
  CHECK(t.lo == 1);
  CHECK(t.hi == 1e4);
  CHECK(values(t) == std::vector<double>{1, 10, 100, 1000, 10000});
  CHECK(labels(t) == std::vector<std::string>{"1", "10", "10\u00b2", "10\u00b3", "10\u2074"});
  CHECK(values(t, false).size() == 5 + 2 * 4);
  const TickSet u = log10_ticks(3, 420);
  CHECK(u.lo == 1);
  CHECK(u.hi == 1000);
}

TEST_CASE("time ticks fall on whole UTC units and are labelled in UTC") {
  // 2026-03-02T06:00:00Z .. 2026-03-03T05:00:00Z: a span of 23 h gives 6-hour ticks.
  const double start = 1772431200, end = start + 23 * 3600;
  const TickSet t = time_ticks(start, end);
  CHECK(t.step == 21600);
  CHECK(labels(t).front() == "03-02 06:00");
  CHECK(labels(t).back() == "03-03 06:00");
  for (double v : values(t)) CHECK(std::fmod(v, 21600) == 0);
  const TickSet days = time_ticks(start, start + 40 * 86400);
  CHECK(days.step == 14 * 86400);  // 8 days wanted: the next whole step is two weeks
  CHECK(labels(days).front().size() == 10);  // YYYY-MM-DD
  const TickSet secs = time_ticks(start + 5, start + 50);
  CHECK(secs.step == 10);
  CHECK(labels(secs).front() == "06:00:00");
}

TEST_CASE("scales map data onto pixels and back") {
  SECTION("linear, with the pixel axis running downwards as SVG's y does") {
    const Scale s(ScaleKind::linear, 0, 1000, 400, 40);
    CHECK(s.to_pixel(0) == 400);
    CHECK(s.to_pixel(1000) == 40);
    CHECK_THAT(s.to_pixel(250), WithinAbs(310, 1e-12));
    CHECK_THAT(s.to_data(310), WithinAbs(250, 1e-9));
    CHECK_THAT(s.to_pixel(-100), WithinAbs(436, 1e-12));  // outside the domain maps outside the pixels
  }
  SECTION("log10: each decade takes the same length") {
    const Scale s(ScaleKind::log10, 1, 1e4, 100, 900);
    CHECK_THAT(s.to_pixel(10), WithinAbs(300, 1e-9));
    CHECK_THAT(s.to_pixel(100), WithinAbs(500, 1e-9));
    CHECK_THAT(s.to_pixel(std::sqrt(10.0)), WithinAbs(200, 1e-9));
    CHECK_THAT(s.to_data(700), WithinRel(1000.0, 1e-12));
  }
}

TEST_CASE("an SVG plot states its mapping and places every point by it") {
  SvgPlot p("plot-test", "test plot", AxisSpec{"x (mV)"}, AxisSpec{"y (degC)"});
  p.add_points("data-points", "pairs", {0.5, 2.0, 9.5}, {10, 20, 80}, Style{});
  p.add_line("fitted-line", "fit", {0, 10}, {5, 85}, Style{}, {{"data-b0", "5"}, {"data-b1", "8"}});
  const std::string svg = p.render();
  CHECK(svg.rfind("<svg xmlns=\"http://www.w3.org/2000/svg\"", 0) == 0);
  CHECK(svg.find("data-b0=\"5\"") != std::string::npos);
  CHECK(svg.find(">x (mV)</text>") != std::string::npos);

  const auto x_domain = all(svg, R"re(data-x-domain="([^"]*)")re").at(0);
  const auto x_pixels = all(svg, R"re(data-x-pixels="([^"]*)")re").at(0);
  const auto y_domain = all(svg, R"re(data-y-domain="([^"]*)")re").at(0);
  const auto y_pixels = all(svg, R"re(data-y-pixels="([^"]*)")re").at(0);
  CHECK(x_domain == "0 10");
  CHECK(y_domain == "0 100");
  double xp0 = 0, xp1 = 0, yp0 = 0, yp1 = 0;
  REQUIRE(std::sscanf(x_pixels.c_str(), "%lf %lf", &xp0, &xp1) == 2);
  REQUIRE(std::sscanf(y_pixels.c_str(), "%lf %lf", &yp0, &yp1) == 2);
  CHECK(yp0 > yp1);  // y grows upwards on the page
  const Scale sx(ScaleKind::linear, 0, 10, xp0, xp1), sy(ScaleKind::linear, 0, 100, yp0, yp1);

  // Data markers carry data-x; the legend's swatch circle does not.
  const auto cx = all(svg, R"re(<circle cx="([^"]*)" cy="[^"]*" r="[^"]*" data-x)re");
  const auto cy = all(svg, R"re(<circle cx="[^"]*" cy="([^"]*)" r="[^"]*" data-x)re");
  const auto dx = all(svg, R"re(<circle [^>]*data-x="([^"]*)")re");
  REQUIRE(cx.size() == 3);
  REQUIRE(dx == std::vector<std::string>{"0.5", "2", "9.5"});
  const double xs[] = {0.5, 2.0, 9.5}, ys[] = {10, 20, 80};
  for (std::size_t i = 0; i < 3; ++i) {
    CHECK_THAT(std::stod(cx[i]), WithinAbs(sx.to_pixel(xs[i]), 0.006));
    CHECK_THAT(std::stod(cy[i]), WithinAbs(sy.to_pixel(ys[i]), 0.006));
  }
}

TEST_CASE("an SVG plot escapes its labels and drops non-finite values") {
  SvgPlot p("plot-esc", "a <b> & \"c\"", AxisSpec{"x <&>"}, AxisSpec{"y"});
  p.add_line("l", "legend \"quoted\" <i>", {0, 1, 2}, {0, NAN, 2}, Style{});
  const std::string svg = p.render();
  CHECK(svg.find("a &lt;b&gt; &amp; &quot;c&quot;") != std::string::npos);
  CHECK(svg.find("x &lt;&amp;&gt;") != std::string::npos);
  CHECK(svg.find("legend &quot;quoted&quot; &lt;i&gt;") != std::string::npos);
  CHECK(svg.find("<i>") == std::string::npos);
  const auto points = all(svg, R"re(<polyline [^>]*points="([^"]*)")re").at(0);
  CHECK(std::count(points.begin(), points.end(), ',') == 2);  // the NaN vertex is left out
  CHECK(svg.find("data-y=\"0 nan 2\"") != std::string::npos);  // but stated as given
}

TEST_CASE("bands are closed outlines that keep both edges as data") {
  SvgPlot p("plot-band", "band", AxisSpec{"x"}, AxisSpec{"y"});
  p.add_band("confidence-band", "band", {0, 1, 2}, {-1, -0.5, -1}, {1, 0.5, 1}, Style{});
  const std::string svg = p.render();
  CHECK(svg.find("data-lo=\"-1 -0.5 -1\"") != std::string::npos);
  CHECK(svg.find("data-hi=\"1 0.5 1\"") != std::string::npos);
  const auto points = all(svg, R"re(<polygon [^>]*points="([^"]*)")re").at(0);
  CHECK(std::count(points.begin(), points.end(), ',') == 6);  // upper edge out, lower edge back
}
