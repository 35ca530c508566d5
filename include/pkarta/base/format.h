// Number formatting, text tables and CSV quoting shared by the writers.
#ifndef PKARTA_FORMAT_H_
#define PKARTA_FORMAT_H_

#include <cstddef>
#include <ostream>
#include <string>
#include <vector>

namespace pkarta {

/// Fixed-point with `decimals` digits ("7.412"). Never prints nan/inf: those become "n/a".
std::string fixed(double value, int decimals);
/// Significant digits in plain or scientific notation ("0.0250", "1.23e-05").
std::string sig(double value, int digits = 4);

/// True for a text cell a spreadsheet would take for a formula: it starts with '=', '+', '-',
/// '@', tab or CR and is not a plain number ("-0.25", "+3", "1e-3" are numbers).
bool csv_formula_like(const std::string& text);
/// RFC 4180 field: quoted when it holds a comma, quote, CR or LF; quotes doubled. A
/// formula-like text cell (csv_formula_like) is first prefixed with a single quote (OWASP,
/// "CSV Injection"), so "=HYPERLINK(...)" reaches a spreadsheet as text. Every CSV pkarta
/// writes goes through this function (write_csv_row).
std::string csv_field(const std::string& text_in);
/// Writes one CSV record (RFC 4180, CRLF line ending).
void write_csv_row(std::ostream& out, const std::vector<std::string>& fields);

/// Text lines are kept within this many columns (tables reflowed, paragraphs wrapped).
inline constexpr std::size_t kTextWidth = 100;

/// A plain-text table: header row, rule, rows; numeric-looking cells right-aligned. A table
/// wider than max_width (default kTextWidth; 0: no limit) is written as several blocks of
/// columns one below the other, each starting with the first column.
class TextTable {
 public:
  explicit TextTable(std::vector<std::string> header) : header_(std::move(header)) {}
  void add_row(std::vector<std::string> row) { rows_.push_back(std::move(row)); }
  void set_max_width(std::size_t max_width) { max_width_ = max_width; }
  void write(std::ostream& out, const std::string& indent = "  ") const;

 private:
  std::vector<std::string> header_;
  std::vector<std::vector<std::string>> rows_;
  std::size_t max_width_ = kTextWidth;
};

/// Wraps lines wider than max_width at spaces; a continuation is indented under the text of a
/// list item ("- ", "1. ") or two columns deeper than an indented line. Table rows (cells two
/// spaces apart) and single words are left as they are.
std::string fit_text_width(const std::string& text, std::size_t max_width = kTextWidth);

/// ASCII lower case of s (option and id matching).
std::string ascii_lower(std::string s);
/// s without leading and trailing spaces, tabs and carriage returns.
std::string trim_space(const std::string& s);
/// An amount as written, with one space between its number and its unit ("2mg/mL" and
/// " 2 mg/mL" give "2 mg/mL"); text that does not start with a number is returned trimmed.
std::string spaced_amount(const std::string& s);
/// The strings of v joined by sep.
std::string join_strings(const std::vector<std::string>& v, const std::string& sep);

/// The caution every result that could guide a product carries (docs/model.md, "Limits and cautions").
const char* caution_text();

}  // namespace pkarta

#endif  // PKARTA_FORMAT_H_
