// Measured solubilities from CSV text, for the fit (analyses/fit.h).
#include "pkarta/io/solubility_csv.h"

#include <cctype>
#include <cmath>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/text_file.h"

namespace pkarta {

namespace {

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

std::string join(const std::vector<std::string>& v, const std::string& sep) {
  std::string s;
  for (std::size_t i = 0; i < v.size(); ++i) s += (i ? sep : "") + v[i];
  return s;
}

std::string shown_number(double v) {
  std::ostringstream ss;
  ss << v;
  return ss.str();
}

struct CsvField {
  std::string text;
  int column = 1;  // 1-based character column where the field starts
};

// Splits one CSV record (RFC 4180 quoting, no embedded line breaks).
std::vector<CsvField> split_csv_line(const std::string& line, const std::string& name, int line_no) {
  std::vector<CsvField> out;
  std::size_t i = 0;
  while (true) {
    CsvField f;
    f.column = static_cast<int>(i) + 1;
    std::size_t j = i;
    while (j < line.size() && (line[j] == ' ' || line[j] == '\t')) ++j;
    if (j < line.size() && line[j] == '"') {
      ++j;
      bool closed = false;
      while (j < line.size()) {
        if (line[j] == '"') {
          if (j + 1 < line.size() && line[j + 1] == '"') {
            f.text += '"';
            j += 2;
            continue;
          }
          closed = true;
          ++j;
          break;
        }
        f.text += line[j++];
      }
      if (!closed) {
        throw InputError(SourceLocation{name, line_no, f.column}, "unterminated quoted field");
      }
      while (j < line.size() && (line[j] == ' ' || line[j] == '\t' || line[j] == '\r')) ++j;
      if (j < line.size() && line[j] != ',') {
        throw InputError(SourceLocation{name, line_no, static_cast<int>(j) + 1},
                         "unexpected text after a quoted field");
      }
    } else {
      while (j < line.size() && line[j] != ',') f.text += line[j++];
      f.text = trim(f.text);
    }
    out.push_back(f);
    if (j >= line.size()) break;
    i = j + 1;  // past the comma
  }
  return out;
}

double cell_number(const CsvField& f, const std::string& column, const std::string& name, int line) {
  if (f.text.empty()) {
    throw InputError(SourceLocation{name, line, f.column}, "column '" + column + "' is not a number: \"\"");
  }
  try {
    // Says "is out of the range of numbers" for 1e400 or 1e-400, "is not a number" otherwise.
    return parse_number(f.text, "column '" + column + "'");
  } catch (const InputError& e) {
    throw InputError(SourceLocation{name, line, f.column}, e.message());
  }
}

}  // namespace

std::string measured_solubility_problem(double solubility_mol_per_L) {
  if (solubility_mol_per_L >= kMinMeasuredSolubility_mol_per_L && solubility_mol_per_L <= kMaxConc_mol_per_L) {
    return "";
  }
  std::ostringstream ss;
  if (solubility_mol_per_L == 0.0) ss << "underflows to 0 mol/L";
  else if (!std::isfinite(solubility_mol_per_L)) ss << "overflows in mol/L";
  else ss << "is " << sig(solubility_mol_per_L, 3) << " mol/L";
  ss << ", expected " << kMinMeasuredSolubility_mol_per_L << " to "
     << kMaxConc_mol_per_L << " mol/L";
  return ss.str();
}

std::vector<FitPoint> parse_solubility_csv(const std::string& text_in, const std::string& name,
                                           double molar_mass_g_per_mol,
                                           std::vector<std::string>* warnings) {
  std::string text = text_in;
  if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF &&
      static_cast<unsigned char>(text[1]) == 0xBB && static_cast<unsigned char>(text[2]) == 0xBF) {
    text.erase(0, 3);  // UTF-8 byte order mark
  }
  if (const std::size_t bad = invalid_utf8_offset(text); bad != std::string_view::npos) {
    int line = 1;
    std::size_t start = 0;
    for (std::size_t k = 0; k < bad; ++k) {
      if (text[k] == '\n') {
        ++line;
        start = k + 1;
      }
    }
    throw InputError(SourceLocation{name, line, static_cast<int>(bad - start) + 1},
                     "invalid UTF-8; save the file as UTF-8 text");
  }
  std::vector<FitPoint> out;
  std::istringstream in(text);
  std::string line;
  int line_no = 0;
  int col_ph = -1, col_value = -1, col_unit = -1, col_temp = -1, col_sd = -1;
  std::size_t ncols = 0;
  bool have_header = false;
  int header_line = 0;
  while (std::getline(in, line)) {
    ++line_no;
    if (!line.empty() && line.back() == '\r') line.pop_back();
    const std::string t = trim(line);
    if (t.empty() || t[0] == '#') continue;
    const std::vector<CsvField> fields = split_csv_line(line, name, line_no);
    if (!have_header) {
      have_header = true;
      header_line = line_no;
      ncols = fields.size();
      for (std::size_t k = 0; k < fields.size(); ++k) {
        const std::string h = lower(fields[k].text);
        int* slot = nullptr;
        if (h == "ph") slot = &col_ph;
        else if (h == "value" || h == "solubility") slot = &col_value;
        else if (h == "unit") slot = &col_unit;
        else if (h == "temperature" || h == "temperature_c") slot = &col_temp;
        else if (h == "log_sd" || h == "sd_log10") slot = &col_sd;
        if (!slot) {
          if (h.find_first_not_of("0123456789.-+eE ") == std::string::npos) {
            throw InputError(SourceLocation{name, line_no, fields[k].column},
                             "the first row must be a header naming the columns pH, value, unit "
                             "(optional: temperature, log_sd), got \"" + fields[k].text + "\"");
          }
          if (warnings) {
            warnings->push_back(SourceLocation{name, line_no, fields[k].column}.str() +
                                ": warning: unknown column '" + fields[k].text + "' ignored");
          }
          continue;
        }
        if (*slot >= 0) {
          throw InputError(SourceLocation{name, line_no, fields[k].column},
                           "column '" + fields[k].text + "' appears twice");
        }
        *slot = static_cast<int>(k);
      }
      std::vector<std::string> missing;
      if (col_ph < 0) missing.push_back("pH");
      if (col_value < 0) missing.push_back("value");
      if (col_unit < 0) missing.push_back("unit");
      if (!missing.empty()) {
        throw InputError(SourceLocation{name, line_no, 1},
                         "header lacks the column" + std::string(missing.size() > 1 ? "s " : " ") +
                             join(missing, ", ") + " (required: pH, value, unit; optional: "
                             "temperature, log_sd)");
      }
      continue;
    }
    if (fields.size() != ncols) {
      throw InputError(SourceLocation{name, line_no, 1},
                       "row has " + std::to_string(fields.size()) + " fields, the header (line " +
                           std::to_string(header_line) + ") has " + std::to_string(ncols));
    }
    FitPoint p;
    p.where = SourceLocation{name, line_no, 1};
    const CsvField& fph = fields[col_ph];
    p.pH = cell_number(fph, "pH", name, line_no);
    if (!(p.pH >= -1.0 && p.pH <= 15.0)) {
      throw InputError(SourceLocation{name, line_no, fph.column},
                       "column 'pH' is " + fph.text + ", expected -1 to 15");
    }
    const CsvField& fv = fields[col_value];
    const double v = cell_number(fv, "value", name, line_no);
    if (!(v > 0)) {
      throw InputError(SourceLocation{name, line_no, fv.column},
                       "solubility must be > 0, got " + fv.text);
    }
    if (col_temp >= 0 && !fields[col_temp].text.empty()) {
      p.temperature_C = cell_number(fields[col_temp], "temperature", name, line_no);
      if (!(p.temperature_C >= -10.0 && p.temperature_C <= 100.0)) {
        throw InputError(SourceLocation{name, line_no, fields[col_temp].column},
                         "column 'temperature' is " + fields[col_temp].text + " °C, expected -10 to 100");
      }
    }
    if (col_sd >= 0 && !fields[col_sd].text.empty()) {
      p.log10_sd = cell_number(fields[col_sd], "log_sd", name, line_no);
      if (!(p.log10_sd >= kMinFitLog10Sd && p.log10_sd <= 5.0)) {
        throw InputError(SourceLocation{name, line_no, fields[col_sd].column},
                         "column 'log_sd' is " + fields[col_sd].text + ", expected " + shown_number(kMinFitLog10Sd) +
                             " to 5 (log10 units; weights are 1/sd^2)");
      }
    }
    const CsvField& fu = fields[col_unit];
    Amount a;
    try {
      a.unit = parse_unit(fu.text, "column 'unit'");  // as a compound file's 'unit' attribute
    } catch (const InputError& e) {
      throw InputError(SourceLocation{name, line_no, fu.column}, e.message());
    }
    a.value = v;
    try {
      p.solubility_mol_per_L = a.to_mol_per_L(molar_mass_g_per_mol, p.temperature_C);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{name, line_no, fu.column}, e.message());
    }
    if (const std::string why = measured_solubility_problem(p.solubility_mol_per_L); !why.empty()) {
      throw InputError(SourceLocation{name, line_no, fv.column},
                       "solubility " + fv.text + " " + fu.text + " " + why);
    }
    out.push_back(p);
  }
  if (!have_header) {
    throw InputError(SourceLocation{name, line_no > 0 ? line_no : 1, 0},
                     "no header row: the file must start with a header naming pH, value, unit");
  }
  if (out.empty()) throw InputError(SourceLocation{name, line_no, 0}, "no data rows after the header");
  return out;
}

std::vector<FitPoint> read_solubility_csv(const std::string& path, double molar_mass_g_per_mol,
                                          std::vector<std::string>* warnings) {
  return parse_solubility_csv(read_text_file(path), path, molar_mass_g_per_mol, warnings);
}

}  // namespace pkarta
