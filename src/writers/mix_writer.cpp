#include "pkarta/writers/mix_writer.h"
#include "pkarta/writers/tables.h"

#include <nlohmann/json.hpp>

#include "pkarta/base/format.h"

namespace pkarta {

void write_mix_text(const MixResult& r, std::ostream& out) {
  const Equilibrium& e = r.equilibrium;
  out << "Closed-system equilibrium at " << fixed(e.temperature_C, 1) << " °C\n";
  if (!r.inputs.empty()) {
    out << "  contents: ";
    for (std::size_t i = 0; i < r.inputs.size(); ++i) out << (i ? ", " : "") << r.inputs[i];
    out << "\n";
  }
  out << "\n";
  TextTable summary({"quantity", "value"});
  summary.add_row({"pH", fixed(e.pH, 3)});
  summary.add_row({"ionic strength (mol/L)", sig(e.ionic_strength_mol_per_L, 4)});
  summary.add_row({"buffer capacity (mol/L per pH)", sig(r.capacity_mol_per_L_per_pH, 4)});
  summary.add_row({"osmolarity, ideal (mOsm/L)", fixed(e.osmolarity_mOsm_per_L, 1)});
  summary.add_row({"osmolality estimate (mOsm/kg), to be measured", fixed(r.osmolality_estimate_mOsm_per_kg, 1)});
  summary.write(out);
  if (e.drug) {
    const DrugState& d = *e.drug;
    out << "\nDrug" << (r.drug_name.empty() ? "" : " (" + r.drug_name + ")") << "\n";
    TextTable dt({"quantity", "value"});
    dt.add_row({"dose (mol/L)", sig(d.dose_mol_per_L, 4)});
    // The same basis as the dissolved amount below, so that a salt's dose does not read as a loss.
    dt.add_row({"dose, as free form (mg/mL)", sig(d.dose_mg_per_mL, 4)});
    dt.add_row({"dissolved (mol/L)", sig(d.dissolved_mol_per_L, 4)});
    dt.add_row({"dissolved, as free form (mg/mL)", sig(d.dissolved_mg_per_mL, 4)});
    dt.add_row({"solid remaining", d.solid});
    dt.add_row({"saturation ratio (whole dose dissolved)", sig(d.saturation_ratio, 4)});
    dt.write(out);
  }
  out << "\nSpecies\n";
  TextTable st({"species", "charge", "conc (mol/L)", "activity coeff."});
  for (const Species& s : e.species) {
    st.add_row({s.name, std::to_string(s.charge), sig(s.conc_mol_per_L, 4), fixed(s.activity_coefficient, 4)});
  }
  st.write(out);
  if (!e.warnings.empty()) {
    out << "\n";
    for (const std::string& w : e.warnings) out << "warning: " << w << "\n";
  }
  out << "\nActivity model: " << activity_model_label(r.activity) << "; pH = -log10 a(H+). "
      << caution_text() << "\n";
}

void write_mix_csv(const MixResult& r, std::ostream& out) {
  write_table_csv(mix_tables({r}).front(), out);
}

namespace {

nlohmann::ordered_json mix_json(const MixResult& r) {
  const Equilibrium& e = r.equilibrium;
  nlohmann::ordered_json j;
  j["pH"] = e.pH;
  j["temperature_C"] = e.temperature_C;
  j["activity_model"] = activity_model_id(e.activity);
  j["ionic_strength_mol_per_L"] = e.ionic_strength_mol_per_L;
  j["osmolarity_mOsm_per_L"] = e.osmolarity_mOsm_per_L;
  j["osmolality_estimate_mOsm_per_kg"] = r.osmolality_estimate_mOsm_per_kg;
  j["capacity_mol_per_L_per_pH"] = r.capacity_mol_per_L_per_pH;
  nlohmann::ordered_json sp = nlohmann::ordered_json::array();
  for (const Species& s : e.species) {
    sp.push_back({{"name", s.name},
                  {"system", s.system},
                  {"charge", s.charge},
                  {"conc_mol_per_L", s.conc_mol_per_L},
                  {"activity_coefficient", s.activity_coefficient}});
  }
  j["species"] = sp;
  if (e.drug) {
    j["drug"] = {{"dose_mol_per_L", e.drug->dose_mol_per_L},
                 {"dissolved_mol_per_L", e.drug->dissolved_mol_per_L},
                 {"dissolved_mg_per_mL", e.drug->dissolved_mg_per_mL},
                 {"dissolved_mg_per_mL_as_free_form", e.drug->dissolved_mg_per_mL},
                 {"dose_mg_per_mL_as_free_form", e.drug->dose_mg_per_mL},
                 {"solid", e.drug->solid},
                 {"saturation_ratio", e.drug->saturation_ratio}};
  } else {
    j["drug"] = nullptr;
  }
  j["warnings"] = e.warnings;
  j["caution"] = caution_text();
  return j;
}

}  // namespace

void write_mix_json(const MixResult& r, std::ostream& out) { out << mix_json(r).dump(2) << "\n"; }

void write_mix_json_document(const std::vector<MixResult>& results, std::ostream& out) {
  nlohmann::ordered_json states = nlohmann::ordered_json::array();
  for (const MixResult& r : results) states.push_back(mix_json(r));
  nlohmann::ordered_json j;
  if (results.size() == 1) j = states.front();
  j["states"] = states;
  out << j.dump(2) << "\n";
}

}  // namespace pkarta
