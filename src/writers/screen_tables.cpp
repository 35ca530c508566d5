// Rectangular tables of screen and recipe (writers/tables.h).
#include <cmath>

#include "pkarta/chem/water.h"
#include "pkarta/writers/screen_writer.h"
#include "pkarta/writers/tables.h"

namespace pkarta {

namespace {

std::string join_words(const std::vector<std::string>& words, const char* sep = " ") {
  std::string s;
  for (const std::string& w : words) s += (s.empty() ? "" : sep) + w;
  return s;
}

}  // namespace

std::vector<TableInfo> screen_table_info() {
  return {{"results", "one row per compound and buffer: status, strengths, pH values, capacity, osmolality"},
          {"criteria", "one row per compound, buffer and criterion: value, limits, pass, strength meeting it"},
          {"bands", "one row per buffer: Monte Carlo 5/50/95 % of min conc (with --uncertainty)"},
          {"notes", "per-buffer and screen warnings, the method and the caution"}};
}

std::vector<DataTable> screen_tables(const std::vector<ScreenReport>& reports, const ScreenBands* bands) {
  DataTable t{"results",
              {"compound", "form", "dose_mol_per_L", "target_pH", "tolerance_pH", "temperature_C", "rank", "buffer",
               "status", "min_conc_mol_per_L", "min_conc_at_lower_bound", "recommended_conc_mol_per_L", "binding",
               "conc_used_mol_per_L", "max_conc_mol_per_L", "titrant", "titrant_mol_per_L", "pH_after_drug",
               "pH_drift", "pH_after_acid_challenge", "pH_after_base_challenge", "capacity_mol_per_L_per_pH",
               "ionic_strength_mol_per_L", "osmolarity_mOsm_per_L", "osmolality_estimate_mOsm_per_kg",
               "low_temperature_C", "pH_at_low_temperature", "high_temperature_C", "pH_at_high_temperature",
               "drug_solid", "worst_pH_in_dose_range", "routes", "preparation", "challenge_mol_per_L",
               "drug_solid_at_low_temperature", "drug_solid_at_high_temperature", "holds_at_storage_temperatures",
               "dilution_medium", "dilution_max_supersaturation", "dilution_worst_ratio"},
              {}};
  DataTable c{"criteria",
              {"compound", "buffer", "criterion", "quantity", "value", "limit_low", "limit_high", "pass",
               "min_conc_mol_per_L", "min_conc_at_lower_bound"},
              {}};
  std::vector<std::string> warnings;
  for (const ScreenReport& rep : reports) {
    int rank = 0;
    const double density = water_density_kg_per_L(rep.temperature_C);
    for (const ScreenResult& r : rep.results) {
      t.add({rep.compound_id, rep.form, full(rep.dose_mol_per_L), full(rep.target_pH), full(rep.tolerance_pH),
             full(rep.temperature_C), std::to_string(++rank), r.buffer, screen_status_name(r.status),
             full(r.min_conc_mol_per_L), boolean(r.min_conc_at_lower_bound), full(r.recommended_conc_mol_per_L),
             r.binding, full(r.conc_used_mol_per_L), full(r.max_conc_mol_per_L), r.titrant,
             full(r.titrant_mol_per_L), full(r.pH_after_drug), full(r.pH_drift), full(r.pH_after_acid_challenge),
             full(r.pH_after_base_challenge), full(r.capacity_mol_per_L_per_pH), full(r.ionic_strength_mol_per_L),
             full(r.osmolarity_mOsm_per_L), full(kOsmoticCoefficient * r.osmolarity_mOsm_per_L / density),
             full(rep.low_temperature_C), full(r.pH_at_5C), full(rep.high_temperature_C), full(r.pH_at_40C),
             r.drug_solid, full(r.worst_pH_in_dose_range), join_words(r.routes),
             screen_preparation_name(rep.preparation), full(rep.challenge_mol_per_L), r.drug_solid_at_5C,
             r.drug_solid_at_40C, boolean(r.holds_at_storage), rep.dilution_medium,
             full(r.dilution_max_supersaturation),
             std::isfinite(r.dilution_max_supersaturation) ? full(r.dilution_worst_ratio) : std::string()});
      for (const ScreenCriterion& k : r.criteria) {
        c.add({rep.compound_id, r.buffer, k.id, k.quantity, full(k.value), full(k.limit_low), full(k.limit_high),
               boolean(k.pass), full(k.min_conc_mol_per_L), boolean(k.min_conc_at_lower_bound)});
      }
      const std::string who = reports.size() > 1 ? rep.compound_id + ", " + r.buffer : r.buffer;
      for (const std::string& w : r.route_flags) warnings.push_back(who + ": " + w);
      for (const std::string& w : r.warnings) warnings.push_back(who + ": " + w);
    }
    for (const std::string& w : rep.warnings) {
      warnings.push_back(reports.size() > 1 ? rep.compound_id + ": " + w : w);
    }
  }
  DataTable b{"bands",
              {"buffer", "nominal_status", "nominal_min_conc_mol_per_L", "min_conc_p05_mol_per_L",
               "min_conc_p50_mol_per_L", "min_conc_p95_mol_per_L", "min_conc_p95_flag", "ok_fraction"},
              {}};
  std::vector<std::string> notes = {
      screen_method_note(reports.empty() ? kDefaultActivityModel : reports.front().activity),
      screen_osmolality_note()};
  if (bands) {
    for (const ScreenBand& x : bands->buffers) {
      b.add({x.buffer, x.nominal_status, full(x.nominal_min_conc_mol_per_L), full(x.p05_mol_per_L),
             full(x.p50_mol_per_L), full(x.p95_mol_per_L),
             std::isinf(x.p95_mol_per_L) ? "not held in more than 5 % of samples" : "", full(x.ok_fraction)});
    }
    notes.push_back("bands: " + std::to_string(bands->samples) + " samples, seed " + std::to_string(bands->seed));
  }
  return {t, c, b, notes_table(notes, warnings)};
}

std::vector<TableInfo> recipe_table_info() {
  return {{"reagents", "one row per reagent to weigh, and the titrant: amount, mass, volume"},
          {"solution", "one row: the solution as computed (pH, ionic strength, osmolality, capacity)"},
          {"formulation", "one row with --compound: the drug's mass and the formulation's predicted values"},
          {"steps", "one row per step of the order of addition (with --compound)"},
          {"notes", "notes, warnings and the caution"}};
}

std::vector<DataTable> recipe_tables(const Recipe& r, const Formulation* f) {
  DataTable rg{"reagents",
               {"item", "name", "formula", "role", "state", "molar_mass_g_per_mol", "conc_mol_per_L", "amount_mol",
                "mass_g", "volume_mL"},
               {}};
  for (const RecipeReagent& x : r.reagents) {
    rg.add({x.id, x.name, x.formula, x.role, x.state, full(x.molar_mass_g_per_mol), full(x.conc_mol_per_L),
            full(x.amount_mol), full(x.mass_g), ""});
  }
  if (r.titrant) {
    rg.add({r.titrant->id, r.titrant->name, "", "titrant", "solution", "", full(r.titrant->conc_mol_per_L),
            full(r.titrant->amount_mol), "", full(r.titrant->volume_mL)});
  }
  DataTable s{"solution",
              {"buffer", "system", "target_pH", "conc_mol_per_L", "volume_L", "temperature_C", "pH",
               "ionic_strength_mol_per_L", "osmolarity_mOsm_per_L", "osmolality_estimate_mOsm_per_kg",
               "capacity_mol_per_L_per_pH", "isotonic"},
              {}};
  s.add({r.buffer, r.system, full(r.target_pH), full(r.conc_mol_per_L), full(r.volume_L), full(r.temperature_C),
         full(r.pH), full(r.ionic_strength_mol_per_L), full(r.osmolarity_mOsm_per_L),
         full(r.osmolality_estimate_mOsm_per_kg), full(r.capacity_mol_per_L_per_pH), boolean(r.isotonic)});
  DataTable fm{"formulation",
               {"drug", "form", "mass_g", "amount_mol", "dose_mol_per_L", "molar_mass_g_per_mol", "preparation", "pH",
                "low_temperature_C", "pH_at_low_temperature", "high_temperature_C", "pH_at_high_temperature",
                "ionic_strength_mol_per_L", "osmolality_estimate_mOsm_per_kg", "capacity_mol_per_L_per_pH",
                "solubility_at_pH_mol_per_L", "solubility_margin", "saturation_ratio", "solid"},
               {}};
  DataTable st{"steps", {"step", "text"}, {}};
  std::vector<std::string> notes = r.notes;
  std::vector<std::string> warnings = r.warnings;
  if (r.isotonic) notes.push_back("tonicity: " + r.tonicity_method);
  if (f) {
    fm.add({f->drug.id, f->drug.form, full(f->drug.mass_g), full(f->drug.amount_mol), full(f->drug.dose_mol_per_L),
            full(f->drug.molar_mass_g_per_mol), screen_preparation_name(f->preparation), full(f->pH),
            full(f->low_temperature_C), full(f->pH_low), full(f->high_temperature_C), full(f->pH_high),
            full(f->ionic_strength_mol_per_L), full(f->osmolality_estimate_mOsm_per_kg),
            full(f->capacity_mol_per_L_per_pH), full(f->solubility_at_pH_mol_per_L), full(f->solubility_margin),
            full(f->saturation_ratio), f->solid});
    for (std::size_t i = 0; i < f->steps.size(); ++i) st.add({std::to_string(i + 1), f->steps[i]});
    if (!f->tonicity_note.empty()) notes.push_back("tonicity: " + f->tonicity_note);
    warnings.insert(warnings.end(), f->warnings.begin(), f->warnings.end());
  }
  return {rg, s, fm, st, notes_table(notes, warnings)};
}

}  // namespace pkarta
