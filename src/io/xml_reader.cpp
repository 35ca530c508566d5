#include "xml_reader.h"

#include <cstddef>
#include <string>
#include <vector>

#include "pkarta/base/format.h"
#include "pkarta/base/limits.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/formula.h"

namespace pkarta::xml_detail {

std::string hex_byte(char c) {
  static const char* const kDigits = "0123456789ABCDEF";
  const auto u = static_cast<unsigned char>(c);
  return std::string("0x") + kDigits[u >> 4] + kDigits[u & 15];
}

Pka read_pka(Reader& r, const pugi::xml_node& n) {
  r.check_attributes(n, {"value", "type", "dH", "dCp", "temperature", "sd", {"source", Text::kNonEmpty},
                         "ionic-strength", "scale", {"electrolyte", Text::kNonEmpty}});
  r.check_children(n, {});
  Pka p;
  p.where = r.at(n);
  p.value = r.in_range(n, "value", r.number(n, "value"), -5.0, 20.0);
  const std::string type = r.required(n, "type");
  if (type == "acid") p.type = GroupType::kAcid;
  else if (type == "base") p.type = GroupType::kBase;
  else r.fail(n, "attribute 'type' of <pka> is \"" + type + "\", expected acid or base");
  p.dH_kJ_per_mol = r.in_range(n, "dH", r.number_or(n, "dH", 0.0), -200.0, 200.0);
  p.dCp_J_per_K_mol = r.in_range(n, "dCp", r.number_or(n, "dCp", 0.0), -2000.0, 2000.0);
  p.ref_temperature_C = r.temperature(n, "temperature", 25.0);
  p.sd = r.in_range(n, "sd", r.number_or(n, "sd", 0.0), 0.0, 5.0);
  // Apparent constants: converted to thermodynamic by AcidBaseSystem::to_thermodynamic() once
  // every group's type (hence every species' charge) is known.
  p.stated_value = p.value;
  const std::string scale = r.optional(n, "scale", "thermodynamic");
  if (scale == "concentration") p.stated_scale = PkaScale::kConcentration;
  else if (scale == "mixed") p.stated_scale = PkaScale::kMixed;
  else if (scale != "thermodynamic") {
    r.fail(n, "attribute 'scale' of <pka> is \"" + scale + "\", expected thermodynamic, concentration or mixed");
  }
  // Davies is a fair activity model to about I = 0.5 mol/L (Davies 1962).
  p.stated_ionic_strength_mol_per_L = r.in_range(n, "ionic-strength", r.number_or(n, "ionic-strength", 0.0), 0.0, kDaviesMaxIonicStrength);
  p.stated_electrolyte = r.optional(n, "electrolyte", "");
  if (p.is_apparent() && !(p.stated_ionic_strength_mol_per_L > 0)) {
    r.fail(n, "<pka> with scale=\"" + scale + "\" needs ionic-strength (mol/L, > 0) of the measurement");
  }
  if (!p.is_apparent() && (p.stated_ionic_strength_mol_per_L > 0 || !p.stated_electrolyte.empty())) {
    r.fail(n, "<pka> states an ionic strength or electrolyte but no scale: give scale=\"concentration\" "
              "or scale=\"mixed\" (an apparent constant), or remove them (a thermodynamic constant)");
  }
  return p;
}

void check_ascending(Reader& r, const std::vector<Pka>& pkas, const std::vector<pugi::xml_node>& nodes) {
  // Each pair out of order is an error of its own; the crossing warnings need them in order.
  bool ordered = true;
  for (std::size_t i = 1; i < pkas.size(); ++i) {
    if (!(pkas[i].value > pkas[i - 1].value)) {
      std::ostringstream ss;
      // The values as the file writes them (an apparent constant: as converted, the order compared).
      auto value = [&](std::size_t k) {
        std::ostringstream v;
        if (pkas[k].is_apparent()) {
          v << pkas[k].value;
        } else {
          v << shown(nodes[k].attribute("value").value());
        }
        return v.str();
      };
      ss << "pKa values must be in ascending order (" << value(i) << " follows " << value(i - 1) << ")";
      ordered = r.attempt([&] { r.fail(nodes[i], ss.str()); }) && ordered;
    }
  }
  if (!ordered) throw Skip{};
  // Ascending at their reference temperature, two constants may still cross within the 0-60 °C
  // the pKa(T) data cover (different dH and dCp): warn, giving where they are out of order.
  for (std::size_t i = 1; i < pkas.size() && i < nodes.size(); ++i) {
    double first = -1.0, last = -1.0, at_first_lower = 0.0, at_first_upper = 0.0;
    for (int step = 0; step <= 120; ++step) {
      const double t = 0.5 * step;
      const double lower = pkas[i - 1].at(t), upper = pkas[i].at(t);
      if (upper > lower) continue;
      if (first < 0) {
        first = t;
        at_first_lower = lower;
        at_first_upper = upper;
      }
      last = t;
    }
    if (first < 0) continue;
    std::ostringstream ss;
    ss << "pKa " << i + 1 << " (" << pkas[i].value << ") and pKa " << i << " (" << pkas[i - 1].value
       << ") cross by their temperature dependence: out of order from " << first << " to " << last
       << " °C (at " << first << " °C " << fixed(at_first_upper, 2) << " and " << fixed(at_first_lower, 2)
       << "); the macroscopic model, its constants in ascending order, no longer holds there";
    r.warn(nodes[i], ss.str());
  }
  if (pkas.size() > static_cast<std::size_t>(kMaxPka)) {
    r.fail(nodes[kMaxPka], "at most " + std::to_string(kMaxPka) + " pKa values are supported");
  }
}

// The 'unit' attribute alone (the value is in 'value'); the solubility CSV reads its 'unit'
// column with the same parse_unit, so both accept and refuse the same texts.
Amount unit_attribute(Reader& r, const pugi::xml_node& n) {
  const std::string unit = r.required(n, "unit");
  Amount a;
  a.value = 1.0;
  try {
    a.unit = parse_unit(unit, "attribute 'unit'");
  } catch (const InputError& e) {
    r.fail(n, e.message());
  }
  if (unit != unit_symbol(a.unit)) {
    r.fail(n, "attribute 'unit' is \"" + unit + "\": write it as the schema spells it, " +
                  unit_symbol(a.unit) + " (units: M, mM, uM, mol/kg, mg/mL, g/L, ug/mL, %w/v)");
  }
  return a;
}

double formula_mass(Reader& r, const pugi::xml_node& n, const std::string& formula) {
  try {
    return molar_mass_g_per_mol(formula);
  } catch (const InputError& e) {
    r.fail(n, e.message());
  }
}

}  // namespace pkarta::xml_detail

namespace pkarta::xml_detail {

namespace {
bool id_char(char c, bool first) {
  const bool alnum = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9');
  return alnum || (!first && (c == '_' || c == '.' || c == '+' || c == '-'));
}
bool digits(const std::string& s, std::size_t from) {
  return from < s.size() && s.find_first_not_of("0123456789", from) == std::string::npos;
}
}  // namespace

std::string trimmed(const std::string& t) {
  const std::size_t b = t.find_first_not_of(" \t\r\n");
  if (b == std::string::npos) return "";
  return t.substr(b, t.find_last_not_of(" \t\r\n") + 1 - b);
}

// The schema's simple types (compound.xsd, library.xsd), the same patterns.
std::string text_problem(Text t, const std::string& v) {
  switch (t) {
    case Text::kAny:
      return "";
    case Text::kOptionalId:
      if (v.empty()) return "";
      [[fallthrough]];
    case Text::kId: {
      bool ok = !v.empty();
      for (std::size_t i = 0; ok && i < v.size(); ++i) ok = id_char(v[i], i == 0);
      return ok ? "" : "an id is letters and digits, then also _ . + - (no spaces)";
    }
    case Text::kNonEmpty:
      return trimmed(v).empty() ? "write some text, or leave the attribute out" : "";
    case Text::kInteger: {
      const std::string w = trimmed(v);  // the schema collapses white space around a number
      return digits(w, !w.empty() && (w[0] == '+' || w[0] == '-') ? 1 : 0) ? "" : "expected a whole number such as -1, 0 or 2";
    }
    case Text::kPositiveInteger: {
      const std::string w = trimmed(v);
      const bool ok = digits(w, !w.empty() && w[0] == '+' ? 1 : 0) && w.find_first_not_of("+0") != std::string::npos;
      return ok ? "" : "expected a whole number of 1 or more";
    }
    case Text::kOptionalPH: {
      if (v.empty()) return "";
      const std::size_t s = v[0] == '+' || v[0] == '-' ? 1 : 0;
      const std::size_t dot = v.find('.', s);
      const std::string whole = v.substr(s, dot == std::string::npos ? std::string::npos : dot - s);
      const std::string frac = dot == std::string::npos ? "" : v.substr(dot + 1);
      const bool ok = (whole.empty() || digits(whole, 0)) && (frac.empty() || digits(frac, 0)) &&
                      (!whole.empty() || !frac.empty());
      return ok ? "" : "expected a pH such as 7.4, or nothing";
    }
  }
  return "";
}

bool is_namespace_attribute(const pugi::xml_node& n, const char* name) {
  const std::string a = name;
  if (a.compare(0, 6, "xmlns:") == 0) return true;
  const std::size_t colon = a.find(':');
  if (colon == std::string::npos) return false;
  const std::string local = a.substr(colon + 1);
  if (local != "noNamespaceSchemaLocation" && local != "schemaLocation") return false;
  const std::string decl = "xmlns:" + a.substr(0, colon);
  for (pugi::xml_node p = n; p; p = p.parent()) {
    if (const pugi::xml_attribute d = p.attribute(decl.c_str())) {
      return std::strcmp(d.value(), "http://www.w3.org/2001/XMLSchema-instance") == 0;
    }
  }
  return false;
}

}  // namespace pkarta::xml_detail
