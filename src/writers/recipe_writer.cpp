// Text, CSV and JSON of a buffer recipe (`pkarta recipe`), and of a formulation (the recipe
// with the drug).
#include "pkarta/writers/recipe_writer.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include <nlohmann/json.hpp>

#include "pkarta/analyses/mix.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/units.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

// Word-wraps `text` at `width` columns, continuation lines indented by `hang` spaces.
void write_wrapped(std::ostream& out, const std::string& text, std::size_t hang = 0, std::size_t width = 100) {
  std::size_t i = text.find_first_not_of(' ');
  if (i == std::string::npos) {
    out << "\n";
    return;
  }
  out << text.substr(0, i);  // the leading indent
  std::size_t col = i;
  bool first = true;
  while (i < text.size()) {
    std::size_t j = text.find(' ', i);
    if (j == std::string::npos) j = text.size();
    const std::string word = text.substr(i, j - i);
    if (!word.empty()) {
      if (!first && col + 1 + word.size() > width) {
        out << "\n" << std::string(hang, ' ');
        col = hang;
      } else if (!first) {
        out << ' ';
        ++col;
      }
      out << word;
      col += word.size();
      first = false;
    }
    i = j + 1;
  }
  out << "\n";
}

std::string volume_text(double volume_L) {
  return volume_L >= 1.0 ? sig(volume_L, 4) + " L" : sig(1000.0 * volume_L, 4) + " mL";
}

const char* kModelNote =
    "Computed with Davies activities and thermodynamic pKa corrected to the temperature "
    "(van 't Hoff); the split is solved so that the equilibrium gives exactly the "
    "target pH. Osmolarity is ideal; the osmolality estimate (0.93 x osmolarity / density of "
    "water) must be measured.";

/// The model note with the recipe's activity model.
std::string model_note(ActivityModel activity) {
  std::string s = kModelNote;
  const std::string davies = "Davies activities";
  const std::size_t at = s.find(davies);
  if (at != std::string::npos) s.replace(at, davies.size(), activity_words(activity));
  return s;
}

std::string tonicity_id(const Recipe& r) {
  for (const RecipeReagent& x : r.reagents) {
    if (x.role == "tonicity") return x.id;
  }
  return "NaCl";
}

// The recipe's text; `buffer_alone` false (a formulation made with the pH adjusted after the
// dose): the reagents and titrant only, without the buffer's own procedure and computed
// solution, which the formulation's order of addition and values replace.
void write_recipe_text_body(const Recipe& r, std::ostream& out, bool buffer_alone) {
  out << "Recipe: " << r.buffer_name << " buffer, pH " << fixed(r.target_pH, 2) << ", "
      << sig(1000.0 * r.conc_mol_per_L, 4) << " mM " << r.system << ", " << volume_text(r.volume_L) << " at "
      << fixed(r.temperature_C, 1) << " °C" << (r.isotonic ? ", made isotonic with " + tonicity_id(r) : std::string()) << "\n\n";
  TextTable t({"reagent", "formula", "role", "M (g/mol)", "amount (mmol)", "mass (g)"});
  for (const RecipeReagent& x : r.reagents) {
    t.add_row({x.id, x.formula, x.role, fixed(x.molar_mass_g_per_mol, 3), sig(1000.0 * x.amount_mol, 5),
               fixed(x.mass_g, x.mass_g < 1 ? 4 : 3)});
  }
  t.write(out);
  if (r.titrant) {
    out << "\n  titrant: " << sig(r.titrant->volume_mL, 4) << " mL of " << sig(r.titrant->conc_mol_per_L, 3)
        << " M " << r.titrant->id << " (" << sig(1000.0 * r.titrant->amount_mol, 5) << " mmol)\n";
  }
  if (!buffer_alone) {
    out << "\n";
    if (r.isotonic) write_wrapped(out, "  tonicity: " + r.tonicity_method, 4);
    for (const std::string& w : r.warnings) write_wrapped(out, "  warning: " + w, 4);
    out << "\n";
    write_wrapped(out, model_note(r.activity));
    out << "\n";
    write_wrapped(out, caution_text());
    return;
  }
  out << "\nProcedure\n";
  int step = 0;
  out << "  " << ++step << ". Weigh the reagents and dissolve them in about 80 % of the final volume of\n"
      << "     water (carbon dioxide-free for pH work).\n";
  if (r.titrant) {
    out << "  " << ++step << ". Add " << sig(r.titrant->volume_mL, 4) << " mL of " << sig(r.titrant->conc_mol_per_L, 3)
        << " M " << r.titrant->id << ".\n";
  }
  out << "  " << ++step << ". Make up to " << volume_text(r.volume_L) << " with water at " << fixed(r.temperature_C, 1)
      << " °C and mix.\n";
  out << "  " << ++step << ". Check the pH at " << fixed(r.temperature_C, 1)
      << " °C with a calibrated pH meter; adjust if needed.\n";
  out << "\nThe solution as computed\n";
  TextTable s({"quantity", "value"});
  s.add_row({"pH", fixed(r.pH, 3)});
  s.add_row({"ionic strength (mol/L)", sig(r.ionic_strength_mol_per_L, 4)});
  s.add_row({"buffer capacity (mol/L per pH)", sig(r.capacity_mol_per_L_per_pH, 4)});
  s.add_row({"osmolarity, ideal (mOsm/L)", fixed(r.osmolarity_mOsm_per_L, 1)});
  s.add_row({"osmolality estimate (mOsm/kg), to be measured", fixed(r.osmolality_estimate_mOsm_per_kg, 1)});
  s.write(out);
  if (!r.notes.empty() || !r.warnings.empty() || r.isotonic) out << "\n";
  if (r.isotonic) write_wrapped(out, "  tonicity: " + r.tonicity_method, 4);
  for (const std::string& n : r.notes) write_wrapped(out, "  note: " + n, 4);
  for (const std::string& w : r.warnings) write_wrapped(out, "  warning: " + w, 4);
  out << "\n";
  write_wrapped(out, model_note(r.activity));
  out << "\n";
  write_wrapped(out, caution_text());
}

}  // namespace

void write_recipe_text(const Recipe& r, std::ostream& out) { write_recipe_text_body(r, out, true); }

void write_recipe_csv(const Recipe& r, std::ostream& out) {
  write_csv_row(out, {"item", "formula", "role", "molar mass (g/mol)", "conc (mol/L)", "amount (mol)", "mass (g)",
                      "volume (mL)"});
  for (const RecipeReagent& x : r.reagents) {
    write_csv_row(out, {x.id, x.formula, x.role, fixed(x.molar_mass_g_per_mol, 4), sig(x.conc_mol_per_L, 8),
                        sig(x.amount_mol, 8), sig(x.mass_g, 8), ""});
  }
  if (r.titrant) {
    write_csv_row(out, {r.titrant->id + " " + sig(r.titrant->conc_mol_per_L, 3) + " M", "", "titrant", "",
                        sig(r.titrant->conc_mol_per_L, 6), sig(r.titrant->amount_mol, 8), "",
                        sig(r.titrant->volume_mL, 8)});
  }
  out << "\r\n";
  write_csv_row(out, {"quantity", "value", "unit"});
  write_csv_row(out, {"pH", fixed(r.pH, 4), ""});
  write_csv_row(out, {"temperature", fixed(r.temperature_C, 2), "C"});
  write_csv_row(out, {"volume", sig(r.volume_L, 6), "L"});
  write_csv_row(out, {"ionic_strength", sig(r.ionic_strength_mol_per_L, 6), "mol/L"});
  write_csv_row(out, {"osmolarity", fixed(r.osmolarity_mOsm_per_L, 2), "mOsm/L"});
  write_csv_row(out, {"osmolality_estimate", fixed(r.osmolality_estimate_mOsm_per_kg, 2), "mOsm/kg (estimate, to be measured)"});
  write_csv_row(out, {"capacity", sig(r.capacity_mol_per_L_per_pH, 6), "mol/L per pH"});
  out << "\r\n";
  write_csv_row(out, {"caution", caution_text()});
}

void write_recipe_json(const Recipe& r, std::ostream& out) {
  nlohmann::ordered_json j;
  j["buffer"] = r.buffer;
  j["system"] = r.system;
  j["target_pH"] = r.target_pH;
  j["conc_mol_per_L"] = r.conc_mol_per_L;
  j["volume_L"] = r.volume_L;
  j["temperature_C"] = r.temperature_C;
  nlohmann::ordered_json reagents = nlohmann::ordered_json::array();
  for (const RecipeReagent& x : r.reagents) {
    reagents.push_back({{"id", x.id},
                        {"name", x.name},
                        {"formula", x.formula},
                        {"role", x.role},
                        {"state", x.state},
                        {"molar_mass_g_per_mol", x.molar_mass_g_per_mol},
                        {"conc_mol_per_L", x.conc_mol_per_L},
                        {"mass_g", x.mass_g},
                        {"amount_mol", x.amount_mol}});
  }
  j["reagents"] = reagents;
  if (r.titrant) {
    j["titrant"] = {{"id", r.titrant->id},
                    {"volume_mL", r.titrant->volume_mL},
                    {"conc_mol_per_L", r.titrant->conc_mol_per_L},
                    {"amount_mol", r.titrant->amount_mol}};
  } else {
    j["titrant"] = nullptr;
  }
  j["pH"] = r.pH;
  j["ionic_strength_mol_per_L"] = r.ionic_strength_mol_per_L;
  j["osmolarity_mOsm_per_L"] = r.osmolarity_mOsm_per_L;
  j["osmolality_estimate_mOsm_per_kg"] = r.osmolality_estimate_mOsm_per_kg;
  j["capacity_mol_per_L_per_pH"] = r.capacity_mol_per_L_per_pH;
  if (r.isotonic) {
    j["isotonic"] = {{"target_mOsm_per_kg", kIsotonicTarget_mOsm_per_kg},
                     {"osmotic_coefficient", kOsmoticCoefficient},
                     {"method", r.tonicity_method}};
  } else {
    j["isotonic"] = nullptr;
  }
  j["notes"] = r.notes;
  j["warnings"] = r.warnings;
  j["model"] = model_note(r.activity);
  j["caution"] = caution_text();
  out << j.dump(2) << "\n";
}

void write_formulation_text(const Formulation& f, std::ostream& out) {
  std::ostringstream rec;
  write_recipe_text_body(f.recipe, rec, f.preparation != ScreenPreparation::kAdjusted);
  std::string text = rec.str();
  // The buffer recipe first (without its closing caution), then the formulation.
  const std::size_t caution = text.rfind("\nCaution:");
  const std::string tail = caution == std::string::npos ? std::string() : text.substr(caution);
  if (caution != std::string::npos) text.erase(caution);
  out << text << "\n";
  out << "Formulation: " << f.drug.id << " " << (f.drug.form == "free" ? "free form" : f.drug.form) << ", "
      << sig(f.drug.dose_mol_per_L * f.drug.molar_mass_g_per_mol, 4) << " mg/mL (" << sig(f.drug.dose_mol_per_L, 4)
      << " mol/L); preparation " << screen_preparation_name(f.preparation) << "\n";
  out << "  drug to weigh: " << sig(f.drug.mass_g, 4) << " g (" << sig(f.drug.amount_mol * 1e3, 4) << " mmol, "
      << sig(f.drug.molar_mass_g_per_mol, 6) << " g/mol as weighed)\n";
  if (f.recipe.titrant) {
    out << "  titrant: " << sig(f.recipe.titrant->volume_mL, 4) << " mL of " << sig(f.recipe.titrant->conc_mol_per_L, 3)
        << " M " << f.recipe.titrant->id << "\n";
  }
  out << "  order of addition:\n";
  for (std::size_t i = 0; i < f.steps.size(); ++i) out << "    " << i + 1 << ". " << f.steps[i] << "\n";
  out << "  predicted pH: " << fixed(f.pH_low, 2) << " at " << fixed(f.low_temperature_C, 0) << " °C, " << fixed(f.pH, 2)
      << " at " << fixed(f.recipe.temperature_C, 0) << " °C, " << fixed(f.pH_high, 2) << " at "
      << fixed(f.high_temperature_C, 0) << " °C\n";
  out << "  osmolality estimate: " << fixed(f.osmolality_estimate_mOsm_per_kg, 0) << " mOsm/kg (to be measured)\n";
  out << "  buffer capacity: " << sig(f.capacity_mol_per_L_per_pH * 1e3, 3) << " mM per pH\n";
  out << "  solubility margin: dose / solubility in water at pH " << fixed(f.pH, 2) << " = "
      << sig(f.solubility_margin, 3) << " (solubility " << sig(f.solubility_at_pH_mol_per_L, 3) << " mol/L)\n";
  out << "  solid expected: " << f.solid << "\n";
  if (!f.tonicity_note.empty()) out << "  tonicity: " << f.tonicity_note << "\n";
  for (const std::string& w : f.warnings) out << "  warning: " << w << "\n";
  out << tail;
}

void write_formulation_json(const Formulation& f, std::ostream& out) {
  std::ostringstream rec;
  write_recipe_json(f.recipe, rec);
  nlohmann::ordered_json j = nlohmann::ordered_json::parse(rec.str());
  nlohmann::ordered_json d;
  d["id"] = f.drug.id;
  d["form"] = f.drug.form;
  d["mass_g"] = f.drug.mass_g;
  d["amount_mol"] = f.drug.amount_mol;
  d["dose_mol_per_L"] = f.drug.dose_mol_per_L;
  d["molar_mass_g_per_mol"] = f.drug.molar_mass_g_per_mol;
  j["drug"] = d;
  j["preparation"] = screen_preparation_name(f.preparation);
  auto num = [](double v) { return std::isfinite(v) ? nlohmann::ordered_json(v) : nlohmann::ordered_json(); };
  j["formulation"] = {{"pH", num(f.pH)},
                      {"pH_low", num(f.pH_low)},
                      {"pH_high", num(f.pH_high)},
                      {"low_temperature_C", f.low_temperature_C},
                      {"high_temperature_C", f.high_temperature_C},
                      {"ionic_strength_mol_per_L", num(f.ionic_strength_mol_per_L)},
                      {"osmolality_estimate_mOsm_per_kg", num(f.osmolality_estimate_mOsm_per_kg)},
                      {"capacity_mol_per_L_per_pH", num(f.capacity_mol_per_L_per_pH)},
                      {"solubility_at_pH_mol_per_L", num(f.solubility_at_pH_mol_per_L)},
                      {"solubility_margin", num(f.solubility_margin)},
                      {"saturation_ratio", num(f.saturation_ratio)},
                      {"solid", f.solid},
                      {"tonicity_note", f.tonicity_note},
                      {"steps", f.steps},
                      {"warnings", f.warnings}};
  out << j.dump(2) << "\n";
}

void write_formulation_csv(const Formulation& f, std::ostream& out) {
  write_recipe_csv(f.recipe, out);
  out << "\r\n";
  write_csv_row(out, {"drug", "form", "mass (g)", "amount (mol)", "preparation", "pH", "pH low T", "pH high T",
                      "osmolality estimate (mOsm/kg)", "solubility margin", "solid"});
  write_csv_row(out, {f.drug.id, f.drug.form, sig(f.drug.mass_g, 6), sig(f.drug.amount_mol, 6),
                      screen_preparation_name(f.preparation), fixed(f.pH, 4), fixed(f.pH_low, 4), fixed(f.pH_high, 4),
                      fixed(f.osmolality_estimate_mOsm_per_kg, 2), sig(f.solubility_margin, 4), f.solid});
}

}  // namespace pkarta
