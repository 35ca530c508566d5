#include "pkarta/base/format.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>

namespace pkarta {

std::string fixed(double value, int decimals) {
  if (!std::isfinite(value)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, value);
  std::string s = buf;
  if (s.size() > 1 && s[0] == '-' && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
  return s;
}

std::string sig(double value, int digits) {
  if (!std::isfinite(value)) return "n/a";
  if (value == 0.0) return "0";
  char buf[64];
  const double a = std::fabs(value);
  if (a >= 1e-3 && a < 1e6) {
    const int mag = static_cast<int>(std::floor(std::log10(a)));
    const int decimals = std::max(0, digits - 1 - mag);
    std::snprintf(buf, sizeof buf, "%.*f", decimals, value);
  } else {
    std::snprintf(buf, sizeof buf, "%.*e", digits - 1, value);
  }
  return buf;
}

namespace {
// A plain decimal number: optional sign, digits with at most one point, optional exponent.
// Such a cell is data, not a formula, even when it starts with '-' or '+'.
bool plain_number(const std::string& s) {
  std::size_t i = 0;
  if (i < s.size() && (s[i] == '-' || s[i] == '+')) ++i;
  std::size_t digits = 0;
  while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) {
    ++i;
    ++digits;
  }
  if (i < s.size() && s[i] == '.') {
    ++i;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) {
      ++i;
      ++digits;
    }
  }
  if (digits == 0) return false;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    ++i;
    if (i < s.size() && (s[i] == '-' || s[i] == '+')) ++i;
    std::size_t exp_digits = 0;
    while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i]))) {
      ++i;
      ++exp_digits;
    }
    if (exp_digits == 0) return false;
  }
  return i == s.size();
}
}  // namespace

bool csv_formula_like(const std::string& text) {
  if (text.empty()) return false;
  const char c = text.front();
  if (c != '=' && c != '+' && c != '-' && c != '@' && c != '\t' && c != '\r') return false;
  return !plain_number(text);
}

std::string csv_field(const std::string& text_in) {
  // OWASP, "CSV Injection": a cell a spreadsheet would read as a formula gets a leading quote.
  std::string text = csv_formula_like(text_in) ? "'" + text_in : text_in;
  if (text.find_first_of(",\"\r\n") == std::string::npos) return text;
  std::string out = "\"";
  for (char c : text) {
    if (c == '"') out += "\"\"";
    else out += c;
  }
  out += "\"";
  return out;
}

void write_csv_row(std::ostream& out, const std::vector<std::string>& fields) {
  for (std::size_t i = 0; i < fields.size(); ++i) {
    if (i) out << ',';
    out << csv_field(fields[i]);
  }
  out << "\r\n";
}

namespace {
bool numeric_looking(const std::string& s) {
  if (s.empty()) return false;
  return s.find_first_not_of("0123456789.-+eE%") == std::string::npos || s == "n/a";
}
std::size_t display_width(const std::string& s) {
  std::size_t w = 0;
  for (unsigned char c : s) w += (c & 0xC0) != 0x80;  // count UTF-8 code points
  return w;
}
}  // namespace

void TextTable::write(std::ostream& out, const std::string& indent) const {
  std::vector<std::size_t> width(header_.size(), 0);
  for (std::size_t i = 0; i < header_.size(); ++i) width[i] = display_width(header_[i]);
  for (const auto& r : rows_) {
    for (std::size_t i = 0; i < r.size() && i < width.size(); ++i) {
      width[i] = std::max(width[i], display_width(r[i]));
    }
  }
  // A column is right-aligned when every cell of it looks numeric.
  std::vector<bool> numeric(width.size(), true);
  for (const auto& r : rows_) {
    for (std::size_t i = 0; i < width.size(); ++i) {
      const std::string cell = i < r.size() ? r[i] : "";
      if (!cell.empty() && !numeric_looking(cell)) numeric[i] = false;
    }
  }
  auto line = [&](const std::vector<std::string>& r, bool head) {
    out << indent;
    for (std::size_t i = 0; i < width.size(); ++i) {
      const std::string cell = i < r.size() ? r[i] : "";
      const std::size_t pad = width[i] - display_width(cell);
      const bool right = !head && numeric[i] && i > 0;
      if (i) out << "  ";
      if (right) out << std::string(pad, ' ') << cell;
      else out << cell << (i + 1 < width.size() ? std::string(pad, ' ') : "");
    }
    out << '\n';
  };
  line(header_, true);
  out << indent;
  for (std::size_t i = 0; i < width.size(); ++i) out << (i ? "  " : "") << std::string(width[i], '-');
  out << '\n';
  for (const auto& r : rows_) line(r, false);
}

const char* caution_text() {
  return "Caution: these are estimates from published models, to be confirmed by measurement. "
         "Parenteral and ophthalmic products must meet the applicable pharmacopeia, local "
         "regulatory requirements and licensed practice, which decide.";
}

}  // namespace pkarta
