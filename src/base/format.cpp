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
  // Column groups that fit max_width_: the first column (the row's key) starts every group.
  std::vector<std::vector<std::size_t>> groups(1);
  std::size_t used = indent.size();
  for (std::size_t i = 0; i < width.size(); ++i) {
    const std::size_t add = width[i] + (groups.back().empty() ? 0 : 2);
    if (max_width_ > 0 && i > 1 && groups.back().size() > 1 && used + add > max_width_) {
      groups.push_back({0});
      used = indent.size() + width[0];
    }
    groups.back().push_back(i);
    used += groups.back().size() == 1 ? width[i] : add;
  }
  auto line = [&](const std::vector<std::size_t>& cols, const std::vector<std::string>& r, bool head) {
    out << indent;
    for (std::size_t k = 0; k < cols.size(); ++k) {
      const std::size_t i = cols[k];
      const std::string cell = i < r.size() ? r[i] : "";
      const std::size_t pad = width[i] - display_width(cell);
      const bool right = !head && numeric[i] && i > 0;
      if (k) out << "  ";
      if (right) out << std::string(pad, ' ') << cell;
      else out << cell << (k + 1 < cols.size() ? std::string(pad, ' ') : "");
    }
    out << '\n';
  };
  for (std::size_t g = 0; g < groups.size(); ++g) {
    if (g) out << '\n';
    const std::vector<std::size_t>& cols = groups[g];
    line(cols, header_, true);
    out << indent;
    for (std::size_t k = 0; k < cols.size(); ++k) out << (k ? "  " : "") << std::string(width[cols[k]], '-');
    out << '\n';
    for (const auto& r : rows_) line(cols, r, false);
  }
}

namespace {
std::size_t leading_spaces(const std::string& line) {
  const std::size_t n = line.find_first_not_of(' ');
  return n == std::string::npos ? line.size() : n;
}
// Width of a list marker at `at` ("- ", "1. ", "12. "), or 0.
std::size_t marker_width(const std::string& line, std::size_t at) {
  if (line.compare(at, 2, "- ") == 0) return 2;
  std::size_t i = at;
  while (i < line.size() && std::isdigit(static_cast<unsigned char>(line[i]))) ++i;
  if (i > at && line.compare(i, 2, ". ") == 0) return i - at + 2;
  return 0;
}
}  // namespace

std::string fit_text_width(const std::string& text, std::size_t max_width) {
  std::string out;
  std::size_t start = 0;
  while (start < text.size()) {
    std::size_t end = text.find('\n', start);
    const bool newline = end != std::string::npos;
    if (!newline) end = text.size();
    const std::string line = text.substr(start, end - start);
    start = end + 1;
    const std::size_t lead = leading_spaces(line);
    // A row of a table (cells apart by two spaces) is laid out by TextTable, not wrapped.
    const bool table_row = line.find("  ", lead) != std::string::npos;
    if (display_width(line) <= max_width || table_row) {
      out += line;
      if (newline) out += '\n';
      continue;
    }
    const std::size_t marker = marker_width(line, lead);
    const std::string hang(lead + (marker ? marker : (lead ? 2 : 0)), ' ');
    std::string current = line.substr(0, lead);
    std::size_t current_width = lead;
    bool first_word = true;
    std::size_t i = lead;
    while (i < line.size()) {
      std::size_t j = line.find(' ', i);
      if (j == std::string::npos) j = line.size();
      const std::string word = line.substr(i, j - i);
      const std::size_t w = display_width(word);
      if (!first_word && current_width + 1 + w > max_width) {
        out += current + '\n';
        current = hang + word;
        current_width = hang.size() + w;
      } else {
        if (!first_word) {
          current += ' ';
          ++current_width;
        }
        current += word;
        current_width += w;
      }
      first_word = false;
      i = j + 1;
    }
    out += current;
    if (newline) out += '\n';
  }
  return out;
}

const char* caution_text() {
  return "Caution: these are estimates from published models, to be confirmed by measurement. "
         "Parenteral and ophthalmic products must meet the applicable pharmacopeia, local "
         "regulatory requirements and licensed practice, which decide.";
}

std::string ascii_lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

std::string trim_space(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

std::string spaced_amount(const std::string& s) {
  std::string t = trim_space(s);
  std::size_t i = 0;
  while (i < t.size() && (std::isdigit(static_cast<unsigned char>(t[i])) || t[i] == '.')) ++i;
  if (i == 0) return t;
  // An exponent belongs to the number: 1e-3M, 2.5E2 mM.
  if (i + 1 < t.size() && (t[i] == 'e' || t[i] == 'E')) {
    std::size_t j = i + 1;
    if (t[j] == '+' || t[j] == '-') ++j;
    if (j < t.size() && std::isdigit(static_cast<unsigned char>(t[j]))) {
      while (j < t.size() && std::isdigit(static_cast<unsigned char>(t[j]))) ++j;
      i = j;
    }
  }
  if (i >= t.size()) return t;
  return t.substr(0, i) + " " + trim_space(t.substr(i));
}

std::string join_strings(const std::vector<std::string>& v, const std::string& sep) {
  std::string s;
  for (std::size_t i = 0; i < v.size(); ++i) s += (i ? sep : "") + v[i];
  return s;
}

}  // namespace pkarta
