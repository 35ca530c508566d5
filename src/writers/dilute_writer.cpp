#include "pkarta/writers/dilute_writer.h"

#include <nlohmann/json.hpp>

#include <cmath>

#include "pkarta/base/format.h"

namespace pkarta {

void write_dilute_text(const DilutionResult& result, std::ostream& out) {
  const DilutionResult& r = result;
  out << "Dilution into " << r.medium_name << " (" << r.medium_id << ") at " << fixed(r.temperature_C, 1)
      << " °C\n";
  if (!r.inputs.empty()) {
    out << "  formulation: ";
    for (std::size_t i = 0; i < r.inputs.size(); ++i) out << (i ? ", " : "") << r.inputs[i];
    out << "\n";
  }
  if (!r.blood_description.empty()) out << "  blood model: " << r.blood_description << "\n";
  out << "  ratio = total volume / formulation volume (ratio 10: 1 volume of formulation + 9 of medium)\n\n";
  const bool drug = !r.points.empty() && r.points.front().has_drug;
  if (drug) {
    TextTable t({"ratio", "pH", "drug (mg/mL as free form)", "drug (mol/L)", "solubility (mol/L)", "limited by",
                 "supersaturation", "risk"});
    for (const DilutionPoint& p : r.points) {
      t.add_row({sig(p.ratio, 4), fixed(p.pH, 3), sig(p.drug_mg_per_mL, 3), sig(p.drug_mol_per_L, 3),
                 std::isfinite(p.solubility_mol_per_L) ? sig(p.solubility_mol_per_L, 3) : "unlimited",
                 p.limiting_solid, sig(p.supersaturation_ratio, 3), p.risk ? "precipitation risk" : "none"});
    }
    t.write(out);
    bool any = false;
    for (const DilutionPoint& p : r.points) any = any || p.equilibrium_solid != "none";
    if (any) {
      out << "\nAt equilibrium, once the excess has precipitated\n";
      TextTable e({"ratio", "pH", "dissolved (mol/L)", "solid"});
      for (const DilutionPoint& p : r.points) {
        if (p.equilibrium_solid == "none") continue;
        e.add_row({sig(p.ratio, 4), fixed(p.equilibrium_pH, 3), sig(p.equilibrium_dissolved_mol_per_L, 3),
                   p.equilibrium_solid});
      }
      e.write(out);
    }
  } else {
    TextTable t({"ratio", "pH", "ionic strength (mol/L)", "osmolarity (mOsm/L)"});
    for (const DilutionPoint& p : r.points) {
      t.add_row({sig(p.ratio, 4), fixed(p.pH, 3), sig(p.ionic_strength_mol_per_L, 3),
                 fixed(p.osmolarity_mOsm_per_L, 1)});
    }
    t.write(out);
  }
  out << "\nNotes\n";
  for (const std::string& n : r.notes) out << "  - " << n << "\n";
  if (!r.warnings.empty()) {
    out << "\nWarnings\n";
    for (const std::string& w : r.warnings) out << "  - " << w << "\n";
  }
  out << "\n" << caution_text() << "\n";
}

void write_dilute_csv(const DilutionResult& result, std::ostream& out) {
  const DilutionResult& r = result;
  write_csv_row(out, {"ratio", "pH", "ionic_strength_mol_per_L", "osmolarity_mOsm_per_L", "drug_mol_per_L",
                      "drug_mg_per_mL", "solubility_mol_per_L", "limiting_solid", "supersaturation_ratio",
                      "risk", "equilibrium_pH", "equilibrium_dissolved_mol_per_L", "equilibrium_solid"});
  for (const DilutionPoint& p : r.points) {
    const bool d = p.has_drug;
    write_csv_row(out, {sig(p.ratio, 6), sig(p.pH, 6), sig(p.ionic_strength_mol_per_L, 6),
                        sig(p.osmolarity_mOsm_per_L, 6), d ? sig(p.drug_mol_per_L, 6) : "",
                        d ? sig(p.drug_mg_per_mL, 6) : "",
                        d && std::isfinite(p.solubility_mol_per_L) ? sig(p.solubility_mol_per_L, 6) : "",
                        d ? p.limiting_solid : "", d ? sig(p.supersaturation_ratio, 6) : "",
                        d ? (p.risk ? "true" : "false") : "", d ? sig(p.equilibrium_pH, 6) : "",
                        d ? sig(p.equilibrium_dissolved_mol_per_L, 6) : "", d ? p.equilibrium_solid : ""});
  }
}

void write_dilute_json(const DilutionResult& result, std::ostream& out) {
  const DilutionResult& r = result;
  using J = nlohmann::ordered_json;
  auto num = [](double v) { return std::isfinite(v) ? J(v) : J(nullptr); };
  J j;
  j["medium"] = r.medium_id;
  j["temperature_C"] = r.temperature_C;
  j["ratio_definition"] = "total volume / formulation volume";
  if (!r.blood_description.empty()) {
    j["blood"] = {{"kind", r.blood},
                  {"co2", r.blood_model},
                  {"non_bicarbonate_buffer_mmol_per_L_per_pH", r.non_bicarbonate_buffer_mM_per_pH},
                  {"medium_systems_buffer_mmol_per_L_per_pH", r.medium_explicit_buffer_mM_per_pH},
                  {"lumped_buffer_mmol_per_L_per_pH", r.lumped_buffer_mM_per_pH},
                  {"description", r.blood_description}};
  }
  J pts = J::array();
  for (const DilutionPoint& p : r.points) {
    J o;
    o["ratio"] = p.ratio;
    o["pH"] = p.pH;
    o["ionic_strength_mol_per_L"] = p.ionic_strength_mol_per_L;
    o["osmolarity_mOsm_per_L"] = p.osmolarity_mOsm_per_L;
    if (p.has_drug) {
      o["drug_mol_per_L"] = p.drug_mol_per_L;
      o["drug_mg_per_mL"] = p.drug_mg_per_mL;  // as free form (the key of earlier versions)
      o["drug_mg_per_mL_as_free_form"] = p.drug_mg_per_mL;
      o["solubility_mol_per_L"] = num(p.solubility_mol_per_L);
      o["limiting_solid"] = p.limiting_solid;
      o["supersaturation_ratio"] = p.supersaturation_ratio;
      o["risk"] = p.risk;
      o["equilibrium"] = {{"pH", p.equilibrium_pH},
                          {"dissolved_mol_per_L", p.equilibrium_dissolved_mol_per_L},
                          {"solid", p.equilibrium_solid}};
    } else {
      o["drug_mol_per_L"] = nullptr;
      o["solubility_mol_per_L"] = nullptr;
      o["supersaturation_ratio"] = nullptr;
      o["risk"] = false;
    }
    pts.push_back(o);
  }
  j["points"] = pts;
  j["notes"] = r.notes;
  j["warnings"] = r.warnings;
  j["caution"] = caution_text();
  out << j.dump(2) << "\n";
}

}  // namespace pkarta
