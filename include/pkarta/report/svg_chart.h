// Inline SVG charts for the HTML report: axes with ticks (linear or log10 with decade ticks),
// an optional secondary y axis in other units, line and marker series, shaded bands,
// reference lines with labels, annotations, a legend, a title and a text alternative.
//
// The output is well-formed XML (it can sit inside XHTML-compatible HTML5 and be parsed by
// any XML parser) and deterministic: coordinates are printed with a fixed number of decimals,
// so the same chart always gives the same bytes and reports diff cleanly.
//
// Visual design (the project's own):
// - Palette: line colours built on the hues of the colour-universal-design set of Okabe and
//   Ito (2008), which stay apart under the three common colour-vision deficiencies (Wong 2011,
//   Nature Methods 8, 441). Orange and sky blue are darkened and yellow is left out of lines
//   so that every line colour has at least 3:1 contrast on white (WCAG 2.1, 1.4.11); the
//   light tints (yellow, sky, orange, pink) are used only for shaded bands.
// - Every series also has its own dash pattern and marker shape, so series differ without
//   colour (greyscale print, monochrome copy).
// - Fonts: the generic sans-serif family (no font is fetched); 13 px text at the default
//   760 px width is about 9 pt on an A4 page, the smallest size we print.
#ifndef PKARTA_SVG_CHART_H_
#define PKARTA_SVG_CHART_H_

#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

namespace pkarta::svg {

/// Escapes text for XML character data and attribute values (& < > " ').
std::string xml_escape(std::string_view text);

/// Number of distinct styles (colour + dash + marker) before they repeat.
inline constexpr int kNumStyles = 8;

/// The colour of style i (modulo kNumStyles), as "#rrggbb".
const char* style_colour(int style);
/// The SVG stroke-dasharray of style i ("" for solid).
const char* style_dash(int style);
/// The fill of band tint i (modulo 4), as "#rrggbb".
const char* band_colour(int tint);

enum class Scale { kLinear, kLog10 };

/// One axis. Values outside [min, max] are clipped at the plot area.
struct Axis {
  std::string label;            ///< with units, e.g. "solubility (mol/L)"
  double min = 0.0;
  double max = 1.0;
  Scale scale = Scale::kLinear;
  /// Linear axes: distance between labelled ticks (0 = chosen automatically). Log axes always
  /// tick every decade and draw unlabelled minor ticks at 2..9 when few decades are shown.
  double tick_step = 0.0;
  int decimals = -1;            ///< tick-label decimals for linear axes (-1 = from tick_step)
};

/// A secondary y axis on the right: the same positions, labelled in other units
/// (value2 = factor * value). With a log10 primary axis it gets its own decade ticks.
struct SecondaryAxis {
  std::string label;
  double factor = 1.0;
};

enum class SeriesKind { kLine, kMarkers, kLineAndMarkers };

/// A data series. Points with a non-finite coordinate (or y <= 0 on a log axis) break the
/// line. `style` picks colour, dash pattern and marker; -1 = its index among the series.
struct Series {
  std::string name;             ///< legend text
  std::vector<double> x;
  std::vector<double> y;
  SeriesKind kind = SeriesKind::kLine;
  int style = -1;
  double line_width = 2.25;
  bool solid = false;           ///< true: solid line whatever the style's dash pattern
};

/// A shaded range. A vertical band spans x0..x1 over the full height; a horizontal band
/// spans y0..y1 over the full width. The label is written inside, at the top (left).
struct Band {
  enum class Orientation { kVertical, kHorizontal };
  Orientation orientation = Orientation::kVertical;
  double from = 0.0;
  double to = 0.0;
  std::string label;
  int style = 0;                ///< band tint: 0 yellow, 1 sky, 2 orange, 3 pink
  double opacity = 0.35;
};

/// A straight reference line across the plot with a label (e.g. "dose 2 mg/mL").
struct RefLine {
  enum class Orientation { kVertical, kHorizontal };
  Orientation orientation = Orientation::kVertical;
  double value = 0.0;
  std::string label;
  int style = 7;                ///< 7 = near-black
  bool dashed = true;
  bool emphasised = false;      ///< thicker line and bold label
};

/// A short text at a data point, with a small ring marking the point.
struct Annotation {
  double x = 0.0;
  double y = 0.0;
  std::string text;
  bool mark_point = true;
  enum class Anchor { kRight, kLeft, kAbove } anchor = Anchor::kRight;
};

/// A whole chart. Sizes are in CSS pixels of the SVG's own coordinate system; the SVG scales
/// to the width of its container (viewBox) and keeps its proportions.
struct Chart {
  std::string id;               ///< unique in the document; [A-Za-z0-9_-] (others are replaced)
  std::string title;
  std::string description;      ///< text alternative: what the chart shows, in words
  Axis x;
  Axis y;
  std::optional<SecondaryAxis> y2;
  std::vector<Series> series;
  std::vector<Band> bands;
  std::vector<RefLine> lines;
  std::vector<Annotation> annotations;
  double width = 760.0;
  double plot_height = 360.0;   ///< height of the plot area; title, axes and legend add to it
};

/// Writes the chart as one <svg> element (no XML declaration, no namespace prefix needed
/// inside HTML5; the xmlns attribute is present so the element is also valid standalone).
/// Example: write_svg(chart, out);  // <svg xmlns="http://www.w3.org/2000/svg" ...>...</svg>
void write_svg(const Chart& chart, std::ostream& out);

/// The same as a string.
std::string render_svg(const Chart& chart);

/// Text of a tick label on a log10 axis for 10^exponent: decades 10^-3..10^3 written out
/// ("0.001", "1", "100"), others as 10 with a superscript exponent ("10⁻⁶", UTF-8).
std::string decade_label(int exponent);

}  // namespace pkarta::svg

#endif  // PKARTA_SVG_CHART_H_
