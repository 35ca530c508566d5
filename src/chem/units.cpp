#include "pkarta/chem/units.h"

#include <cctype>
#include <charconv>
#include <cmath>

#include "pkarta/base/error.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {
constexpr double kMaxAmountValue = 1e9;

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}
}  // namespace

namespace {
// "2,5" is 2.5 written with a decimal comma: say so rather than only refusing it.
std::string decimal_comma_hint(std::string_view t) {
  const auto comma = t.find(',');
  if (comma == std::string_view::npos || t.find(',', comma + 1) != std::string_view::npos) return "";
  std::string dotted(t);
  dotted[comma] = '.';
  double v = 0.0;
  const auto [ptr, ec] = std::from_chars(dotted.data(), dotted.data() + dotted.size(), v);
  if (ec != std::errc() || ptr != dotted.data() + dotted.size()) return "";
  return " (pkarta reads a decimal point: write " + dotted + ")";
}
}  // namespace

double parse_number(std::string_view text, std::string_view what) {
  std::string_view t = trim(text);
  if (!t.empty() && t.front() == '+') t.remove_prefix(1);
  double v = 0.0;
  const char* first = t.data();
  const char* last = t.data() + t.size();
  auto [ptr, ec] = std::from_chars(first, last, v);
  if (!t.empty() && ec == std::errc::result_out_of_range && ptr == last) {
    throw InputError(std::string(what) + " is out of the range of numbers: \"" + shown(text) + "\"");
  }
  if (t.empty() || ec != std::errc() || ptr != last) {
    throw InputError(std::string(what) + " is not a number: \"" + shown(text) + "\"" +
                     decimal_comma_hint(t));
  }
  if (!std::isfinite(v)) {
    throw InputError(std::string(what) + " must be finite: \"" + shown(text) + "\"");
  }
  return v;
}

Amount parse_amount(std::string_view text) {
  std::string_view t = trim(text);
  std::size_t i = 0;
  while (i < t.size() && (std::isdigit(static_cast<unsigned char>(t[i])) || t[i] == '.' ||
                          t[i] == 'e' || t[i] == 'E' || t[i] == '-' || t[i] == '+')) {
    // An 'e' followed by something that is not a digit or sign starts no exponent.
    if ((t[i] == 'e' || t[i] == 'E') &&
        !(i + 1 < t.size() && (std::isdigit(static_cast<unsigned char>(t[i + 1])) ||
                               t[i + 1] == '-' || t[i + 1] == '+'))) {
      break;
    }
    ++i;
  }
  const std::string_view num = t.substr(0, i);
  const std::string_view unit = trim(t.substr(i));
  if (num.empty()) {
    throw InputError("amount \"" + shown(text) +
                     "\" has no number; expected e.g. 25mM, 0.1M, 10mg/mL");
  }
  Amount a;
  a.value = parse_number(num, "amount");
  if (a.value < 0) throw InputError("amount \"" + shown(text) + "\" is negative");
  // Beyond 1e9 in any accepted unit no amount is physical, and mol/L could overflow.
  if (a.value > kMaxAmountValue) {
    throw InputError("amount \"" + shown(text) + "\" is too large (at most 1e9 in any unit)");
  }
  if (unit.empty()) {
    throw InputError("amount \"" + shown(text) +
                     "\" has no unit; expected one of M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v");
  }
  if (unit == "M" || unit == "mol/L") a.unit = AmountUnit::kMolar;
  else if (unit == "mM" || unit == "mmol/L") a.unit = AmountUnit::kMillimolar;
  else if (unit == "uM" || unit == "\xC2\xB5M" || unit == "umol/L") a.unit = AmountUnit::kMicromolar;
  else if (unit == "mol/kg" || unit == "m") a.unit = AmountUnit::kMolal;
  else if (unit == "mg/mL" || unit == "mg/ml") a.unit = AmountUnit::kMgPerMl;
  else if (unit == "g/L" || unit == "g/l") a.unit = AmountUnit::kGPerL;
  else if (unit == "ug/mL" || unit == "ug/ml" || unit == "\xC2\xB5g/mL") a.unit = AmountUnit::kUgPerMl;
  else if (unit == "%w/v" || unit == "%") a.unit = AmountUnit::kPercentWv;
  else {
    if (unit.size() > 1 && unit[0] == ',' && std::isdigit(static_cast<unsigned char>(unit[1]))) {
      std::string dotted(t);
      dotted[dotted.find(',')] = '.';
      throw InputError("\"" + shown(text) + "\" has a decimal comma; pkarta reads a decimal point: write " +
                       dotted);
    }
    throw InputError("unknown unit \"" + std::string(unit) + "\" in \"" + shown(text) +
                     "\"; expected one of M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v");
  }
  return a;
}

AmountUnit parse_unit(std::string_view text, std::string_view what) {
  const std::string_view t = trim(text);
  const char c = t.empty() ? ' ' : t.front();
  if (std::isdigit(static_cast<unsigned char>(c)) || c == '.' || c == '+' || c == '-' || c == 'e' ||
      c == 'E') {
    throw InputError(std::string(what) + " is \"" + shown(text) +
                     "\", expected a unit alone such as mg/mL, ug/mL or mM");
  }
  if (t.empty()) {
    throw InputError(std::string(what) + " is empty; expected one of M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v");
  }
  try {
    return parse_amount("1" + std::string(t)).unit;
  } catch (const InputError&) {
    throw InputError(std::string(what) + ": unknown unit \"" + shown(text) +
                     "\"; expected one of M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v");
  }
}

bool Amount::is_mass_based() const {
  return unit == AmountUnit::kMgPerMl || unit == AmountUnit::kGPerL ||
         unit == AmountUnit::kUgPerMl || unit == AmountUnit::kPercentWv;
}

double Amount::to_mol_per_L(double molar_mass_g_per_mol, double temperature_C) const {
  if (is_mass_based() && !(molar_mass_g_per_mol > 0)) {
    throw InputError("a mass-based amount needs a molar mass");
  }
  switch (unit) {
    case AmountUnit::kMolar: return value;
    case AmountUnit::kMillimolar: return value * 1e-3;
    case AmountUnit::kMicromolar: return value * 1e-6;
    case AmountUnit::kMolal: return value * water_density_kg_per_L(temperature_C);
    case AmountUnit::kMgPerMl:  // mg/mL = g/L
    case AmountUnit::kGPerL: return value / molar_mass_g_per_mol;
    case AmountUnit::kUgPerMl: return value * 1e-3 / molar_mass_g_per_mol;
    case AmountUnit::kPercentWv: return value * 10.0 / molar_mass_g_per_mol;  // g/100 mL
  }
  return value;
}

std::string unit_symbol(AmountUnit unit) {
  switch (unit) {
    case AmountUnit::kMolar: return "M";
    case AmountUnit::kMillimolar: return "mM";
    case AmountUnit::kMicromolar: return "uM";
    case AmountUnit::kMolal: return "mol/kg";
    case AmountUnit::kMgPerMl: return "mg/mL";
    case AmountUnit::kGPerL: return "g/L";
    case AmountUnit::kUgPerMl: return "ug/mL";
    case AmountUnit::kPercentWv: return "%w/v";
  }
  return "?";
}

}  // namespace pkarta
