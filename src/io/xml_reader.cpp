#include "xml_reader.h"

#include <cstddef>
#include <string>
#include <vector>

#include "pkarta/base/format.h"
#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/formula.h"

namespace pkarta::xml_detail {

std::string hex_byte(char c) {
  static const char* const kDigits = "0123456789ABCDEF";
  const auto u = static_cast<unsigned char>(c);
  return std::string("0x") + kDigits[u >> 4] + kDigits[u & 15];
}

Pka read_pka(Reader& r, const pugi::xml_node& n) {
  r.check_attributes(n, {"value", "type", "dH", "dCp", "temperature", "sd", "source", "ionic-strength",
                         "scale", "electrolyte"});
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
  p.stated_ionic_strength_mol_per_L = r.in_range(n, "ionic-strength", r.number_or(n, "ionic-strength", 0.0), 0.0, 0.5);
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
