#include "pkarta/report/svg_chart.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

namespace pkarta::svg {

namespace {

constexpr const char* kLineColours[kNumStyles] = {"#0072B2", "#D55E00", "#009E73", "#CC79A7",
                                                  "#B87F00", "#3D97CF", "#6E6E6E", "#1A1A1A"};
constexpr const char* kDashes[kNumStyles] = {"",         "9 4",     "2.5 3", "10 3 2.5 3",
                                             "5 2.5",    "14 3 3 3 3 3", "1.5 4", "18 4"};
constexpr const char* kBandColours[4] = {"#F0E442", "#56B4E9", "#E69F00", "#CC79A7"};

constexpr double kFont = 13.0;        // tick labels, legend, annotations
constexpr double kLabelFont = 14.0;   // axis labels
constexpr double kTitleFont = 16.0;
constexpr double kMarker = 4.5;       // marker half-size

// Fixed one-decimal coordinates: deterministic, compact, no "-0.0".
std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f", v);
  if (buf[0] == '-' && std::string(buf) == "-0.0") return "0.0";
  return buf;
}

std::string safe_id(const std::string& id) {
  std::string s = id.empty() ? "chart" : id;
  for (char& c : s) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                    c == '-' || c == '_';
    if (!ok) c = '_';
  }
  if (!((s[0] >= 'a' && s[0] <= 'z') || (s[0] >= 'A' && s[0] <= 'Z'))) s = "c" + s;
  return s;
}

// Approximate advance width of text in a sans-serif face (0.56 em per code point).
double text_width(const std::string& s, double font) {
  std::size_t n = 0;
  for (unsigned char c : s) n += (c & 0xC0) != 0x80;
  return 0.56 * font * static_cast<double>(n);
}

int style_of(int requested, std::size_t index) {
  const int s = requested >= 0 ? requested : static_cast<int>(index);
  return ((s % kNumStyles) + kNumStyles) % kNumStyles;
}

// Maps data values to pixels along one axis.
struct Mapper {
  double lo = 0, hi = 1;   // data range (log10 of it for log axes)
  double p0 = 0, p1 = 1;   // pixel positions of lo and hi
  bool log = false;
  bool valid(double v) const { return std::isfinite(v) && (!log || v > 0); }
  double t(double v) const { return log ? std::log10(v) : v; }
  double operator()(double v) const { return p0 + (t(v) - lo) / (hi - lo) * (p1 - p0); }
};

Mapper make_mapper(const Axis& a, double p0, double p1) {
  Mapper m;
  m.log = a.scale == Scale::kLog10;
  double lo = a.min, hi = a.max;
  if (m.log) {
    lo = std::log10(lo > 0 ? lo : 1e-12);
    hi = std::log10(hi > 0 ? hi : 1.0);
  }
  if (!(hi > lo)) hi = lo + 1.0;
  m.lo = lo;
  m.hi = hi;
  m.p0 = p0;
  m.p1 = p1;
  return m;
}

double nice_step(double range) {
  const double raw = range / 6.0;
  const double mag = std::pow(10.0, std::floor(std::log10(raw)));
  const double f = raw / mag;
  return (f < 1.5 ? 1.0 : f < 3.5 ? 2.0 : f < 7.5 ? 5.0 : 10.0) * mag;
}

std::string tick_text(double v, int decimals) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string s = buf;
  if (s.size() > 1 && s[0] == '-' && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
  if (!s.empty() && s[0] == '-') s = "\xE2\x88\x92" + s.substr(1);  // true minus sign
  return s;
}

struct Tick {
  double value;      // data value
  std::string text;  // empty: minor tick
};

std::vector<Tick> linear_ticks(const Axis& a) {
  std::vector<Tick> ticks;
  const double lo = std::min(a.min, a.max), hi = std::max(a.min, a.max);
  if (!(hi > lo)) return ticks;
  const double step = a.tick_step > 0 ? a.tick_step : nice_step(hi - lo);
  int decimals = a.decimals;
  if (decimals < 0) decimals = std::max(0, -static_cast<int>(std::floor(std::log10(step) + 1e-9)));
  const double first = std::ceil(lo / step - 1e-9);
  for (double k = first;; k += 1.0) {
    const double v = k * step;
    if (v > hi + step * 1e-9) break;
    ticks.push_back({v, tick_text(v, decimals)});
    if (ticks.size() > 200) break;
  }
  return ticks;
}

std::vector<Tick> log_ticks(double lo_value, double hi_value) {
  std::vector<Tick> ticks;
  if (!(lo_value > 0) || !(hi_value > lo_value)) return ticks;
  const double llo = std::log10(lo_value), lhi = std::log10(hi_value);
  const int e0 = static_cast<int>(std::floor(llo + 1e-9)), e1 = static_cast<int>(std::ceil(lhi - 1e-9));
  const int decades = e1 - e0;
  // Label every decade while they fit, else every second or third.
  const int every = decades <= 9 ? 1 : decades <= 18 ? 2 : 3;
  for (int e = e0; e <= e1; ++e) {
    const double v = std::pow(10.0, e);
    if (std::log10(v) >= llo - 1e-9 && std::log10(v) <= lhi + 1e-9) {
      ticks.push_back({v, (e % every == 0) ? decade_label(e) : std::string()});
    }
    if (decades <= 6) {
      for (int k = 2; k <= 9; ++k) {
        const double m = k * v;
        if (std::log10(m) > llo + 1e-9 && std::log10(m) < lhi - 1e-9) ticks.push_back({m, ""});
      }
    }
  }
  return ticks;
}

std::vector<Tick> axis_ticks(const Axis& a) {
  return a.scale == Scale::kLog10 ? log_ticks(a.min, a.max) : linear_ticks(a);
}

// One marker shape of a style, centred at (x, y).
void write_marker(std::ostream& out, int style, double x, double y, const char* colour) {
  const double r = kMarker;
  const std::string common = std::string(" fill=\"") + colour + "\" stroke=\"#ffffff\" stroke-width=\"0.8\"/>";
  switch (style % kNumStyles) {
    case 0:
      out << "<circle cx=\"" << num(x) << "\" cy=\"" << num(y) << "\" r=\"" << num(r) << "\"" << common;
      break;
    case 1:
      out << "<rect x=\"" << num(x - r) << "\" y=\"" << num(y - r) << "\" width=\"" << num(2 * r)
          << "\" height=\"" << num(2 * r) << "\"" << common;
      break;
    case 2:
      out << "<path d=\"M" << num(x) << " " << num(y - 1.2 * r) << "L" << num(x + 1.1 * r) << " "
          << num(y + 0.8 * r) << "L" << num(x - 1.1 * r) << " " << num(y + 0.8 * r) << "Z\"" << common;
      break;
    case 3:
      out << "<path d=\"M" << num(x) << " " << num(y - 1.3 * r) << "L" << num(x + 1.1 * r) << " " << num(y)
          << "L" << num(x) << " " << num(y + 1.3 * r) << "L" << num(x - 1.1 * r) << " " << num(y) << "Z\""
          << common;
      break;
    case 4:
      out << "<path d=\"M" << num(x) << " " << num(y + 1.2 * r) << "L" << num(x + 1.1 * r) << " "
          << num(y - 0.8 * r) << "L" << num(x - 1.1 * r) << " " << num(y - 0.8 * r) << "Z\"" << common;
      break;
    case 5:  // cross
      out << "<path d=\"M" << num(x - r) << " " << num(y - r) << "L" << num(x + r) << " " << num(y + r) << "M"
          << num(x - r) << " " << num(y + r) << "L" << num(x + r) << " " << num(y - r) << "\" stroke=\""
          << colour << "\" stroke-width=\"2.2\" fill=\"none\"/>";
      break;
    case 6:  // plus
      out << "<path d=\"M" << num(x - r) << " " << num(y) << "L" << num(x + r) << " " << num(y) << "M" << num(x)
          << " " << num(y - r) << "L" << num(x) << " " << num(y + r) << "\" stroke=\"" << colour
          << "\" stroke-width=\"2.2\" fill=\"none\"/>";
      break;
    default:  // open circle
      out << "<circle cx=\"" << num(x) << "\" cy=\"" << num(y) << "\" r=\"" << num(r) << "\" fill=\"#ffffff\" stroke=\""
          << colour << "\" stroke-width=\"2\"/>";
      break;
  }
}

bool has_line(SeriesKind k) { return k != SeriesKind::kMarkers; }
bool has_markers(SeriesKind k) { return k != SeriesKind::kLine; }

std::string dash_attr(const Series& s, int style) {
  const char* d = s.solid ? "" : kDashes[style];
  return *d ? std::string(" stroke-dasharray=\"") + d + "\"" : std::string();
}

}  // namespace

std::string xml_escape(std::string_view text) {
  std::string out;
  out.reserve(text.size() + 8);
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default:
        // Control characters other than tab, LF and CR are not allowed in XML 1.0.
        if (static_cast<unsigned char>(c) < 0x20 && c != '\t' && c != '\n' && c != '\r') out += ' ';
        else out += c;
    }
  }
  return out;
}

const char* style_colour(int style) { return kLineColours[((style % kNumStyles) + kNumStyles) % kNumStyles]; }
const char* style_dash(int style) { return kDashes[((style % kNumStyles) + kNumStyles) % kNumStyles]; }
const char* band_colour(int tint) { return kBandColours[((tint % 4) + 4) % 4]; }

std::string decade_label(int e) {
  switch (e) {
    case -3: return "0.001";
    case -2: return "0.01";
    case -1: return "0.1";
    case 0: return "1";
    case 1: return "10";
    case 2: return "100";
    case 3: return "1000";
    default: break;
  }
  static const char* const kSup[10] = {"\xE2\x81\xB0", "\xC2\xB9",     "\xC2\xB2",     "\xC2\xB3",
                                       "\xE2\x81\xB4", "\xE2\x81\xB5", "\xE2\x81\xB6", "\xE2\x81\xB7",
                                       "\xE2\x81\xB8", "\xE2\x81\xB9"};
  std::string s = "10";
  if (e < 0) s += "\xE2\x81\xBB";  // superscript minus
  const std::string digits = std::to_string(e < 0 ? -e : e);
  for (char d : digits) s += kSup[d - '0'];
  return s;
}

void write_svg(const Chart& c, std::ostream& out) {
  const std::string id = safe_id(c.id);
  const double left = 78.0;
  const double right = c.y2 ? 84.0 : 24.0;
  const double top = c.title.empty() ? 14.0 : 44.0;
  const double plot_w = std::max(120.0, c.width - left - right);
  const double plot_h = std::max(80.0, c.plot_height);
  const double x0 = left, x1 = left + plot_w, y0 = top + plot_h, y1 = top;  // y0 bottom

  // Legend layout: a grid of equal columns below the x-axis label (as many as fit).
  struct Item {
    std::size_t series;
    double x, y;
  };
  std::vector<Item> items;
  double item_w = 0.0;
  for (const Series& s : c.series) {
    if (!s.name.empty()) item_w = std::max(item_w, 40.0 + text_width(s.name, kFont) + 24.0);
  }
  const double legend_w = c.width - x0 - 8.0;
  const int columns = item_w > 0 ? std::max(1, static_cast<int>(legend_w / item_w)) : 1;
  const double col_w = item_w > 0 ? std::max(item_w, legend_w / columns) : 0.0;
  int rows = 0;
  for (std::size_t i = 0; i < c.series.size(); ++i) {
    if (c.series[i].name.empty()) continue;
    const int k = static_cast<int>(items.size());
    const int row = k / columns;  // whole rows: integer division intended
    items.push_back({i, x0 + (k % columns) * col_w, y0 + 66.0 + row * 21.0});
    rows = k / columns + 1;
  }
  const double height = y0 + 50.0 + (rows ? 10.0 + 21.0 * rows : 0.0) + 6.0;

  const Mapper mx = make_mapper(c.x, x0, x1);
  const Mapper my = make_mapper(c.y, y0, y1);

  out << "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart\" id=\"" << id << "\" viewBox=\"0 0 "
      << num(c.width) << " " << num(height) << "\" width=\"" << num(c.width) << "\" height=\"" << num(height)
      << "\" role=\"img\" aria-labelledby=\"" << id << "-title " << id << "-desc\" font-family=\"sans-serif\" font-size=\""
      << num(kFont) << "\">\n";
  out << "<title id=\"" << id << "-title\">" << xml_escape(c.title) << "</title>\n";
  out << "<desc id=\"" << id << "-desc\">" << xml_escape(c.description) << "</desc>\n";
  out << "<defs><clipPath id=\"" << id << "-clip\"><rect x=\"" << num(x0) << "\" y=\"" << num(y1)
      << "\" width=\"" << num(plot_w) << "\" height=\"" << num(plot_h) << "\"/></clipPath></defs>\n";
  out << "<rect x=\"0\" y=\"0\" width=\"" << num(c.width) << "\" height=\"" << num(height)
      << "\" fill=\"#ffffff\"/>\n";
  if (!c.title.empty()) {
    out << "<text class=\"chart-title\" x=\"" << num(x0) << "\" y=\"26.0\" font-size=\"" << num(kTitleFont)
        << "\" font-weight=\"bold\" fill=\"#1A1A1A\">" << xml_escape(c.title) << "</text>\n";
  }

  // Bands (under everything else).
  std::ostringstream band_labels;
  out << "<g class=\"bands\" clip-path=\"url(#" << id << "-clip)\">\n";
  for (const Band& b : c.bands) {
    const bool vertical = b.orientation == Band::Orientation::kVertical;
    const Mapper& m = vertical ? mx : my;
    if (!m.valid(b.from) || !m.valid(b.to)) continue;
    const double a = m(b.from), z = m(b.to);
    const double lo = std::min(a, z), hi = std::max(a, z);
    out << "<g class=\"band\" data-label=\"" << xml_escape(b.label) << "\">";
    if (vertical) {
      out << "<rect x=\"" << num(lo) << "\" y=\"" << num(y1) << "\" width=\"" << num(hi - lo) << "\" height=\""
          << num(plot_h) << "\"";
    } else {
      out << "<rect x=\"" << num(x0) << "\" y=\"" << num(lo) << "\" width=\"" << num(plot_w) << "\" height=\""
          << num(hi - lo) << "\"";
    }
    char opacity[16];
    std::snprintf(opacity, sizeof opacity, "%.2f", std::clamp(b.opacity, 0.0, 1.0));
    out << " fill=\"" << band_colour(b.style) << "\" fill-opacity=\"" << opacity << "\"/>";
    if (!b.label.empty()) {
      // Labels are written after the grid (below), so no grid line crosses them.
      const double tx = vertical ? lo + 5.0 : x0 + 6.0;
      const double ty = vertical ? y0 - 8.0 : lo + 15.0;
      band_labels << "<text x=\"" << num(tx) << "\" y=\"" << num(ty)
                  << "\" fill=\"#333333\" font-size=\"12.0\" stroke=\"#ffffff\" stroke-width=\"3\" "
                     "stroke-linejoin=\"round\" paint-order=\"stroke\">"
                  << xml_escape(b.label) << "</text>";
    }
    out << "</g>\n";
  }
  out << "</g>\n";

  // Grid and axes.
  const std::vector<Tick> xt = axis_ticks(c.x);
  const std::vector<Tick> yt = axis_ticks(c.y);
  out << "<g class=\"grid\" stroke=\"#d9d9d9\" stroke-width=\"1\">";
  for (const Tick& t : xt) {
    if (t.text.empty()) continue;
    out << "<line x1=\"" << num(mx(t.value)) << "\" y1=\"" << num(y0) << "\" x2=\"" << num(mx(t.value))
        << "\" y2=\"" << num(y1) << "\"/>";
  }
  for (const Tick& t : yt) {
    out << "<line x1=\"" << num(x0) << "\" y1=\"" << num(my(t.value)) << "\" x2=\"" << num(x1) << "\" y2=\""
        << num(my(t.value)) << "\"" << (t.text.empty() ? " stroke=\"#efefef\"" : "") << "/>";
  }
  out << "</g>\n";

  if (!band_labels.str().empty()) {
    out << "<g class=\"band-labels\" clip-path=\"url(#" << id << "-clip)\">" << band_labels.str() << "</g>\n";
  }
  out << "<g class=\"axis x-axis\" fill=\"#1A1A1A\">";
  out << "<line x1=\"" << num(x0) << "\" y1=\"" << num(y0) << "\" x2=\"" << num(x1) << "\" y2=\"" << num(y0)
      << "\" stroke=\"#1A1A1A\" stroke-width=\"1.2\"/>";
  for (const Tick& t : xt) {
    const double px = mx(t.value);
    out << "<line x1=\"" << num(px) << "\" y1=\"" << num(y0) << "\" x2=\"" << num(px) << "\" y2=\""
        << num(y0 + (t.text.empty() ? 3.0 : 6.0)) << "\" stroke=\"#1A1A1A\"/>";
    if (!t.text.empty()) {
      out << "<text class=\"tick\" x=\"" << num(px) << "\" y=\"" << num(y0 + 21.0) << "\" text-anchor=\"middle\">"
          << xml_escape(t.text) << "</text>";
    }
  }
  out << "<text class=\"axis-label\" x=\"" << num((x0 + x1) / 2) << "\" y=\"" << num(y0 + 45.0)
      << "\" text-anchor=\"middle\" font-size=\"" << num(kLabelFont) << "\">" << xml_escape(c.x.label)
      << "</text>";
  out << "</g>\n";

  out << "<g class=\"axis y-axis\" fill=\"#1A1A1A\">";
  out << "<line x1=\"" << num(x0) << "\" y1=\"" << num(y0) << "\" x2=\"" << num(x0) << "\" y2=\"" << num(y1)
      << "\" stroke=\"#1A1A1A\" stroke-width=\"1.2\"/>";
  for (const Tick& t : yt) {
    const double py = my(t.value);
    out << "<line x1=\"" << num(x0 - (t.text.empty() ? 3.0 : 6.0)) << "\" y1=\"" << num(py) << "\" x2=\""
        << num(x0) << "\" y2=\"" << num(py) << "\" stroke=\"#1A1A1A\"/>";
    if (!t.text.empty()) {
      out << "<text class=\"tick\" x=\"" << num(x0 - 9.0) << "\" y=\"" << num(py + 4.5)
          << "\" text-anchor=\"end\">" << xml_escape(t.text) << "</text>";
    }
  }
  const double ymid = (y0 + y1) / 2;
  out << "<text class=\"axis-label\" x=\"18.0\" y=\"" << num(ymid) << "\" text-anchor=\"middle\" font-size=\""
      << num(kLabelFont) << "\" transform=\"rotate(-90 18.0 " << num(ymid) << ")\">" << xml_escape(c.y.label)
      << "</text>";
  out << "</g>\n";

  if (c.y2) {
    const double f = c.y2->factor;
    out << "<g class=\"axis y2-axis\" fill=\"#1A1A1A\">";
    out << "<line x1=\"" << num(x1) << "\" y1=\"" << num(y0) << "\" x2=\"" << num(x1) << "\" y2=\"" << num(y1)
        << "\" stroke=\"#1A1A1A\" stroke-width=\"1.2\"/>";
    std::vector<Tick> t2;
    if (c.y.scale == Scale::kLog10) {
      t2 = log_ticks(c.y.min * f, c.y.max * f);
    } else {
      Axis a2 = c.y;
      a2.min *= f;
      a2.max *= f;
      a2.tick_step = 0;
      a2.decimals = -1;
      t2 = linear_ticks(a2);
    }
    for (const Tick& t : t2) {
      const double py = my(t.value / f);
      out << "<line x1=\"" << num(x1) << "\" y1=\"" << num(py) << "\" x2=\"" << num(x1 + (t.text.empty() ? 3.0 : 6.0))
          << "\" y2=\"" << num(py) << "\" stroke=\"#1A1A1A\"/>";
      if (!t.text.empty()) {
        out << "<text class=\"tick\" x=\"" << num(x1 + 9.0) << "\" y=\"" << num(py + 4.5)
            << "\" text-anchor=\"start\">" << xml_escape(t.text) << "</text>";
      }
    }
    const double xl = c.width - 16.0;
    out << "<text class=\"axis-label\" x=\"" << num(xl) << "\" y=\"" << num(ymid)
        << "\" text-anchor=\"middle\" font-size=\"" << num(kLabelFont) << "\" transform=\"rotate(90 " << num(xl)
        << " " << num(ymid) << ")\">" << xml_escape(c.y2->label) << "</text>";
    out << "</g>\n";
  }

  // Series.
  out << "<g class=\"plot\" clip-path=\"url(#" << id << "-clip)\">\n";
  for (std::size_t i = 0; i < c.series.size(); ++i) {
    const Series& s = c.series[i];
    const int st = style_of(s.style, i);
    const char* colour = kLineColours[st];
    out << "<g class=\"series\" data-series=\"" << xml_escape(s.name) << "\" data-points=\""
        << std::min(s.x.size(), s.y.size()) << "\">";
    const std::size_t n = std::min(s.x.size(), s.y.size());
    if (has_line(s.kind)) {
      std::string d;
      bool pen = false;
      for (std::size_t k = 0; k < n; ++k) {
        if (!mx.valid(s.x[k]) || !my.valid(s.y[k])) {
          pen = false;
          continue;
        }
        // Keep far-off points bounded so the path stays finite; the clip hides them.
        const double px = std::clamp(mx(s.x[k]), -1e4, 1e4), py = std::clamp(my(s.y[k]), -1e4, 1e4);
        d += (pen ? "L" : "M") + num(px) + " " + num(py);
        pen = true;
      }
      if (!d.empty()) {
        out << "<path d=\"" << d << "\" fill=\"none\" stroke=\"" << colour << "\" stroke-width=\""
            << num(s.line_width) << "\" stroke-linejoin=\"round\"" << dash_attr(s, st) << "/>";
      }
    }
    if (has_markers(s.kind)) {
      for (std::size_t k = 0; k < n; ++k) {
        if (!mx.valid(s.x[k]) || !my.valid(s.y[k])) continue;
        write_marker(out, st, mx(s.x[k]), my(s.y[k]), colour);
      }
    }
    out << "</g>\n";
  }
  out << "</g>\n";

  // Reference lines and their labels (not clipped, so labels may sit at the edge). Labels of
  // vertical lines that would overlap go one row lower each.
  std::vector<std::vector<std::pair<double, double>>> rows_spans;
  out << "<g class=\"reference-lines\">\n";
  for (const RefLine& l : c.lines) {
    const bool vertical = l.orientation == RefLine::Orientation::kVertical;
    const Mapper& m = vertical ? mx : my;
    if (!m.valid(l.value)) continue;
    const double p = m(l.value);
    if (p < std::min(m.p0, m.p1) - 0.5 || p > std::max(m.p0, m.p1) + 0.5) continue;
    const char* colour = kLineColours[style_of(l.style, 7)];
    out << "<g class=\"reference-line\" data-label=\"" << xml_escape(l.label) << "\">";
    out << "<line x1=\"" << num(vertical ? p : x0) << "\" y1=\"" << num(vertical ? y0 : p) << "\" x2=\""
        << num(vertical ? p : x1) << "\" y2=\"" << num(vertical ? y1 : p) << "\" stroke=\"" << colour
        << "\" stroke-width=\"" << (l.emphasised ? "2.5" : "1.5") << "\""
        << (l.dashed ? " stroke-dasharray=\"7 4\"" : "") << "/>";
    if (!l.label.empty()) {
      const double w = text_width(l.label, kFont);
      double tx, ty;
      std::string anchor = "start";
      if (vertical) {
        double a = p + 5.0, b = p + 5.0 + w;
        tx = p + 5.0;
        if (b > x1 - 2.0) {
          tx = p - 5.0;
          anchor = "end";
          a = p - 5.0 - w;
          b = p - 5.0;
        }
        std::size_t row = 0;
        for (;; ++row) {
          if (row == rows_spans.size()) rows_spans.emplace_back();
          bool clash = false;
          for (const auto& span : rows_spans[row]) clash = clash || (a < span.second + 6.0 && b > span.first - 6.0);
          if (!clash) break;
        }
        rows_spans[row].push_back({a, b});
        ty = y1 + 15.0 + 17.0 * static_cast<double>(row);
      } else {
        // Of four places (right or left end, above or below the line), take the one whose box
        // covers the fewest data points, so the label hides as little of the data as it can.
        struct Place {
          double x, y;
          const char* anchor;
        };
        const Place places[4] = {{x1 - 6.0, p - 6.0, "end"}, {x0 + 6.0, p - 6.0, "start"},
                                 {x1 - 6.0, p + 16.0, "end"}, {x0 + 6.0, p + 16.0, "start"}};
        int best = -1;
        std::size_t best_count = 0;
        for (int k = 0; k < 4; ++k) {
          const Place& pl = places[k];
          if (pl.y - 13.0 < y1 || pl.y + 3.0 > y0) continue;
          const double bx0 = std::string(pl.anchor) == "end" ? pl.x - w : pl.x, bx1 = bx0 + w;
          std::size_t count = 0;
          for (const Series& sr : c.series) {
            const std::size_t n = std::min(sr.x.size(), sr.y.size());
            for (std::size_t q = 0; q < n; ++q) {
              if (!mx.valid(sr.x[q]) || !my.valid(sr.y[q])) continue;
              const double qx = mx(sr.x[q]), qy = my(sr.y[q]);
              count += qx >= bx0 - 4.0 && qx <= bx1 + 4.0 && qy >= pl.y - 15.0 && qy <= pl.y + 5.0;
            }
          }
          if (best < 0 || count < best_count) {
            best = k;
            best_count = count;
          }
        }
        if (best < 0) best = 0;
        tx = places[best].x;
        ty = places[best].y;
        anchor = places[best].anchor;
      }
      out << "<text x=\"" << num(tx) << "\" y=\"" << num(ty) << "\" text-anchor=\"" << anchor << "\" fill=\""
          << colour << "\"" << (l.emphasised ? " font-weight=\"bold\"" : "")
          << " stroke=\"#ffffff\" stroke-width=\"4\" stroke-linejoin=\"round\" paint-order=\"stroke\">"
          << xml_escape(l.label) << "</text>";
    }
    out << "</g>\n";
  }
  out << "</g>\n";

  // Annotations.
  out << "<g class=\"annotations\">\n";
  for (const Annotation& a : c.annotations) {
    if (!mx.valid(a.x) || !my.valid(a.y)) continue;
    const double px = mx(a.x), py = my(a.y);
    out << "<g class=\"annotation\">";
    if (a.mark_point) {
      out << "<circle cx=\"" << num(px) << "\" cy=\"" << num(py)
          << "\" r=\"6.5\" fill=\"none\" stroke=\"#1A1A1A\" stroke-width=\"1.8\"/>";
    }
    double tx = px + 10.0, ty = py + 4.5;
    std::string anchor = "start";
    if (a.anchor == Annotation::Anchor::kLeft) {
      tx = px - 10.0;
      anchor = "end";
    } else if (a.anchor == Annotation::Anchor::kAbove) {
      tx = px;
      ty = py - 12.0;
      anchor = "middle";
    }
    out << "<text x=\"" << num(tx) << "\" y=\"" << num(ty) << "\" text-anchor=\"" << anchor
        << "\" fill=\"#1A1A1A\" font-weight=\"bold\" stroke=\"#ffffff\" stroke-width=\"4\" "
           "stroke-linejoin=\"round\" paint-order=\"stroke\">"
        << xml_escape(a.text) << "</text></g>\n";
  }
  out << "</g>\n";

  // Plot frame on top of the data.
  out << "<rect x=\"" << num(x0) << "\" y=\"" << num(y1) << "\" width=\"" << num(plot_w) << "\" height=\""
      << num(plot_h) << "\" fill=\"none\" stroke=\"#1A1A1A\" stroke-width=\"1.2\"/>\n";

  // Legend.
  if (!items.empty()) {
    out << "<g class=\"legend\">";
    for (const Item& it : items) {
      const Series& s = c.series[it.series];
      const int st = style_of(s.style, it.series);
      const char* colour = kLineColours[st];
      out << "<g class=\"legend-item\">";
      if (has_line(s.kind)) {
        out << "<line x1=\"" << num(it.x) << "\" y1=\"" << num(it.y) << "\" x2=\"" << num(it.x + 32.0)
            << "\" y2=\"" << num(it.y) << "\" stroke=\"" << colour << "\" stroke-width=\"" << num(s.line_width)
            << "\"" << dash_attr(s, st) << "/>";
      }
      if (has_markers(s.kind)) write_marker(out, st, it.x + 16.0, it.y, colour);
      out << "<text x=\"" << num(it.x + 40.0) << "\" y=\"" << num(it.y + 4.5) << "\">" << xml_escape(s.name)
          << "</text></g>";
    }
    out << "</g>\n";
  }
  out << "</svg>\n";
}

std::string render_svg(const Chart& chart) {
  std::ostringstream out;
  write_svg(chart, out);
  return out.str();
}

}  // namespace pkarta::svg
