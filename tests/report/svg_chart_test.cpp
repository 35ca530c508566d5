// The SVG chart module: well-formed XML, axes, ticks, series, bands, lines, escaping.
#include "pkarta/report/svg_chart.h"

#include <gtest/gtest.h>

#include <pugixml.hpp>

#include <cmath>
#include <set>
#include <string>

namespace {

using namespace pkarta::svg;

Chart sample_chart() {
  Chart c;
  c.id = "solubility";
  c.title = "pH-solubility";
  c.description = "Solubility falls from 10 to 0.001 mol/L between pH 2 and 10.";
  c.x = {"pH", 1.0, 13.0, Scale::kLinear, 1.0, 0};
  c.y = {"solubility (mol/L)", 1e-6, 1.0, Scale::kLog10};
  c.y2 = SecondaryAxis{"solubility (mg/mL)", 311.4};
  Series model{"model", {}, {}, SeriesKind::kLine};
  for (int i = 0; i <= 120; ++i) {
    const double pH = 1.0 + 0.1 * i;
    model.x.push_back(pH);
    model.y.push_back(1e-5 * (1.0 + std::pow(10.0, 8.4 - pH)));
  }
  c.series.push_back(model);
  c.series.push_back(Series{"measured", {2.0, 5.0, 8.0}, {0.04, 3e-3, 3e-5}, SeriesKind::kMarkers});
  c.bands.push_back(Band{Band::Orientation::kVertical, 1.0, 6.2, "salt limits", 0});
  c.lines.push_back(RefLine{RefLine::Orientation::kHorizontal, 6.4e-3, "dose 2 mg/mL", 7, true, true});
  c.lines.push_back(RefLine{RefLine::Orientation::kVertical, 6.2, "pHmax 6.2", 1});
  c.annotations.push_back(Annotation{6.2, 6.4e-3, "pHmax"});
  return c;
}

pugi::xml_node parse(const std::string& svg, pugi::xml_document& doc) {
  const pugi::xml_parse_result r = doc.load_string(svg.c_str());
  EXPECT_TRUE(r) << r.description() << " at offset " << r.offset << "\n" << svg.substr(0, 400);
  return doc.child("svg");
}

std::size_t count(pugi::xml_node root, const char* xpath) { return root.select_nodes(xpath).size(); }

TEST(SvgChart, IsWellFormedXmlWithTextAlternative) {
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(sample_chart()), doc);
  ASSERT_TRUE(svg);
  EXPECT_STREQ(svg.attribute("xmlns").value(), "http://www.w3.org/2000/svg");
  EXPECT_STREQ(svg.attribute("role").value(), "img");
  EXPECT_STREQ(svg.child("title").child_value(), "pH-solubility");
  EXPECT_NE(std::string(svg.child("desc").child_value()).find("between pH 2 and 10"), std::string::npos);
  EXPECT_STREQ(svg.attribute("aria-labelledby").value(), "solubility-title solubility-desc");
}

TEST(SvgChart, DrawsEverySeriesWithItsPoints) {
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(sample_chart()), doc);
  const auto series = svg.select_nodes("//g[@class='series']");
  ASSERT_EQ(series.size(), 2u);
  EXPECT_STREQ(series[0].node().attribute("data-series").value(), "model");
  EXPECT_EQ(series[0].node().attribute("data-points").as_int(), 121);
  EXPECT_TRUE(series[0].node().child("path"));
  // Markers only: three shapes, no line.
  EXPECT_FALSE(series[1].node().child("path") && series[1].node().child("path").attribute("fill").value() ==
                                                       std::string("none"));
  EXPECT_EQ(std::distance(series[1].node().children().begin(), series[1].node().children().end()), 3);
  EXPECT_EQ(count(svg, "//g[@class='legend-item']"), 2u);
}

TEST(SvgChart, AxisLabelsAndDecadeTicks) {
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(sample_chart()), doc);
  std::set<std::string> labels;
  for (const auto& n : svg.select_nodes("//text[@class='axis-label']")) labels.insert(n.node().child_value());
  EXPECT_EQ(labels, (std::set<std::string>{"pH", "solubility (mol/L)", "solubility (mg/mL)"}));
  // y from 1e-6 to 1: seven decades labelled 10⁻⁶, 10⁻⁵, 10⁻⁴, 0.001, 0.01, 0.1, 1.
  std::set<std::string> y_ticks;
  for (const auto& n : svg.select_nodes("//g[@class='axis y-axis']/text[@class='tick']")) {
    y_ticks.insert(n.node().child_value());
  }
  EXPECT_EQ(y_ticks, (std::set<std::string>{"10\u207B\u2076", "10\u207B\u2075", "10\u207B\u2074", "0.001", "0.01",
                                            "0.1", "1"}));
  // x from 1 to 13 by 1: 13 labels.
  EXPECT_EQ(count(svg, "//g[@class='axis x-axis']/text[@class='tick']"), 13u);
  // Secondary axis: 311.4 x (1e-6..1) = 3.1e-4..311 mg/mL: decades 0.001..100.
  std::set<std::string> y2_ticks;
  for (const auto& n : svg.select_nodes("//g[@class='axis y2-axis']/text[@class='tick']")) {
    y2_ticks.insert(n.node().child_value());
  }
  EXPECT_EQ(y2_ticks, (std::set<std::string>{"0.001", "0.01", "0.1", "1", "10", "100"}));
}

TEST(SvgChart, DecadeLabels) {
  EXPECT_EQ(decade_label(0), "1");
  EXPECT_EQ(decade_label(-3), "0.001");
  EXPECT_EQ(decade_label(3), "1000");
  EXPECT_EQ(decade_label(-12), "10\u207B\u00B9\u00B2");
  EXPECT_EQ(decade_label(5), "10\u2075");
}

TEST(SvgChart, BandsLinesAndAnnotations) {
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(sample_chart()), doc);
  EXPECT_EQ(count(svg, "//g[@class='band']"), 1u);
  EXPECT_STREQ(svg.select_node("//g[@class='band']").node().attribute("data-label").value(), "salt limits");
  const auto lines = svg.select_nodes("//g[@class='reference-line']");
  ASSERT_EQ(lines.size(), 2u);
  EXPECT_STREQ(lines[0].node().child("text").child_value(), "dose 2 mg/mL");
  EXPECT_STREQ(lines[0].node().child("text").attribute("font-weight").value(), "bold");
  EXPECT_STREQ(lines[1].node().child("text").child_value(), "pHmax 6.2");
  EXPECT_EQ(count(svg, "//g[@class='annotation']"), 1u);
}

TEST(SvgChart, ReferenceLineOutsideTheAxisIsLeftOut) {
  Chart c = sample_chart();
  c.lines.push_back(RefLine{RefLine::Orientation::kHorizontal, 50.0, "far above"});
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(c), doc);
  EXPECT_EQ(count(svg, "//g[@class='reference-line']"), 2u);
}

TEST(SvgChart, EscapesMarkupEverywhere) {
  Chart c = sample_chart();
  const std::string evil = "<script>alert(\"x\")</script> & 'quoted'";
  c.id = "id\"><script>";
  c.title = evil;
  c.description = evil;
  c.x.label = evil;
  c.series[0].name = evil;
  c.bands[0].label = evil;
  c.lines[0].label = evil;
  c.annotations[0].text = evil;
  const std::string svg_text = render_svg(c);
  EXPECT_EQ(svg_text.find("<script"), std::string::npos);
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(svg_text, doc);
  ASSERT_TRUE(svg);
  EXPECT_EQ(std::string(svg.child("title").child_value()), evil);
  EXPECT_EQ(std::string(svg.select_node("//g[@class='series']").node().attribute("data-series").value()), evil);
  EXPECT_EQ(std::string(svg.attribute("id").value()).find_first_not_of(
                "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_-"),
            std::string::npos);
  EXPECT_EQ(count(svg, "//script"), 0u);
}

TEST(SvgChart, HorizontalLineLabelAvoidsTheData) {
  // Points just above the line at the right end: the label moves away from them.
  Chart c;
  c.id = "place";
  c.x = {"x", 0, 10};
  c.y = {"y", 0, 10};
  Series s{"data", {}, {}, SeriesKind::kMarkers};
  for (double x = 5.0; x <= 10.0; x += 0.25) {
    s.x.push_back(x);
    s.y.push_back(5.3);
  }
  c.series.push_back(s);
  c.lines.push_back(RefLine{RefLine::Orientation::kHorizontal, 5.0, "limit"});
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(c), doc);
  const pugi::xml_node text = svg.select_node("//g[@class='reference-line']/text").node();
  ASSERT_TRUE(text);
  // The plot spans x 78..736 px: a label at the left end starts near 84 px.
  EXPECT_STREQ(text.attribute("text-anchor").value(), "start");
  EXPECT_LT(text.attribute("x").as_double(), 100.0);
  // Without data the label sits at the right end, above the line.
  c.series.clear();
  pugi::xml_document doc2;
  const pugi::xml_node svg2 = parse(render_svg(c), doc2);
  const pugi::xml_node text2 = svg2.select_node("//g[@class='reference-line']/text").node();
  EXPECT_STREQ(text2.attribute("text-anchor").value(), "end");
  EXPECT_LT(text2.attribute("y").as_double(),
            svg2.select_node("//g[@class='reference-line']/line").node().attribute("y1").as_double());
}

TEST(SvgChart, SameChartSameBytes) {
  EXPECT_EQ(render_svg(sample_chart()), render_svg(sample_chart()));
}

TEST(SvgChart, NonPositiveValuesOnALogAxisBreakTheLine) {
  Chart c;
  c.id = "gap";
  c.x = {"x", 0, 4};
  c.y = {"y", 0.1, 10, Scale::kLog10};
  c.series.push_back(Series{"s", {0, 1, 2, 3, 4}, {1, 2, 0, 3, NAN}});
  pugi::xml_document doc;
  const pugi::xml_node svg = parse(render_svg(c), doc);
  const std::string d = svg.select_node("//g[@class='series']/path").node().attribute("d").value();
  // Two pieces: M..L.. then M.. (the zero and the NaN are skipped).
  EXPECT_EQ(std::count(d.begin(), d.end(), 'M'), 2);
  EXPECT_EQ(std::count(d.begin(), d.end(), 'L'), 1);
  EXPECT_EQ(d.find("nan"), std::string::npos);
}

TEST(SvgChart, StylesDifferWithoutColour) {
  std::set<std::string> dashes, colours;
  for (int i = 0; i < kNumStyles; ++i) {
    dashes.insert(style_dash(i));
    colours.insert(style_colour(i));
  }
  EXPECT_EQ(dashes.size(), static_cast<std::size_t>(kNumStyles));
  EXPECT_EQ(colours.size(), static_cast<std::size_t>(kNumStyles));
}

// WCAG 2.1 relative luminance and contrast: every line colour >= 3:1 on white.
double channel(int v) {
  const double c = v / 255.0;
  return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}
double contrast_on_white(const std::string& hex) {
  const int r = std::stoi(hex.substr(1, 2), nullptr, 16), g = std::stoi(hex.substr(3, 2), nullptr, 16),
            b = std::stoi(hex.substr(5, 2), nullptr, 16);
  const double l = 0.2126 * channel(r) + 0.7152 * channel(g) + 0.0722 * channel(b);
  return 1.05 / (l + 0.05);
}

TEST(SvgChart, LineColoursHaveContrastOnWhite) {
  for (int i = 0; i < kNumStyles; ++i) EXPECT_GE(contrast_on_white(style_colour(i)), 3.0) << style_colour(i);
}

TEST(SvgChart, XmlEscape) {
  EXPECT_EQ(xml_escape("a<b>&\"c'"), "a&lt;b&gt;&amp;&quot;c&#39;");
  EXPECT_EQ(xml_escape(std::string("x\x01y")), "x y");
  EXPECT_EQ(xml_escape("µg/mL °C"), "µg/mL °C");
}

}  // namespace
