// The study's SVG writer: decades, escaping and the document's shape.
#include <catch2/catch.hpp>
#include <string>

#include "svg_plot.hpp"

using namespace rigcal::study;

namespace {
std::size_t count(const std::string& text, const std::string& what) {
  std::size_t n = 0;
  for (auto p = text.find(what); p != std::string::npos; p = text.find(what, p + 1)) ++n;
  return n;
}
}  // namespace

TEST_CASE("log axes cover the data with whole decades") {
  CHECK(covering_decades({3, 250}).lo == Approx(1));
  CHECK(covering_decades({3, 250}).hi == Approx(1000));
  CHECK(covering_decades({10, 10}).hi == Approx(100));
  CHECK(covering_decades({-1, 0, INFINITY}).lo == 1);  // nothing usable: the default
}

TEST_CASE("text is escaped") { CHECK(svg_escape("a < b & \"c\" > d") == "a &lt; b &amp; &quot;c&quot; &gt; d"); }

TEST_CASE("a figure has one polyline per drawable series and one marker per usable point") {
  SvgFigure f;
  f.title = "delays <test>";
  f.y_label = "pairs";
  SvgPanel a{"gain", "%", true, {}};
  a.series.push_back({"cusum", "#d62728", {0.5, 1, 2}, {100, 30, 8}});
  a.series.push_back({"none", "#000", {0.5, 1}, {0, -1}});  // nothing finite and positive: not drawn
  SvgPanel b{"offset", "sigma", true, {}};
  b.series.push_back({"cusum", "#d62728", {0.5, 1}, {50, INFINITY}});
  f.panels = {a, b};
  const std::string svg = render_svg(f);
  CHECK(svg.rfind("<?xml", 0) == 0);
  CHECK(svg.find("</svg>") != std::string::npos);
  CHECK(svg.find("delays &lt;test&gt;") != std::string::npos);
  CHECK(count(svg, "<polyline") == 2);
  CHECK(count(svg, "<circle") == 4 + 2);  // 3 + 1 data markers, 2 legend markers (first panel's series)
  CHECK(count(svg, "<svg") == 1);
}
