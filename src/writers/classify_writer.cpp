// Text, CSV and JSON of a solubility classification (analyses/classify.h).
#include "pkarta/writers/classify_writer.h"
#include "pkarta/writers/tables.h"

#include <cstdio>
#include <nlohmann/json.hpp>

#include "pkarta/base/format.h"

namespace pkarta {

namespace {

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

}  // namespace

void write_classify_text(const ClassifyResult& r, std::ostream& out) {
  const std::string basis = r.form == "free" ? "free form" : r.form;
  out << "Solubility classification of " << r.compound_name << " (" << r.compound_id << "), ICH M9 (2019)\n";
  out << "  dose: " << num(r.dose_mg) << " mg of " << basis << " (" << fixed(r.form_molar_mass_g_per_mol, 2)
      << " g/mol) in " << num(r.volume_mL) << " mL = " << sig(r.dose_mg_per_mL, 4) << " mg/mL ("
      << sig(r.dose_mol_per_L, 4) << " mol/L); " << fixed(r.temperature_C, 1) << " °C, pH " << num(r.from_pH)
      << "-" << num(r.to_pH) << "\n";
  out << "  convention: " << r.convention << "\n";
  out << "  guideline: " << r.guideline << "\n\n";
  out << "Verdict: " << (r.verdict == "high" ? "HIGH" : "LOW") << " solubility: lowest solubility "
      << sig(r.min_solubility_mg_per_mL, 4) << " mg/mL (as " << basis << ") at pH " << fixed(r.min_at_pH, 2)
      << "; the dose needs " << sig(r.dose_solubility_volume_mL, 4) << " mL there ("
      << (r.verdict == "high" ? "<= " : "> ") << num(r.volume_mL) << " mL)\n\n";
  TextTable t({"point", "pH", "S (mol/L)", "S (mg/mL, as " + basis + ")", "D0 = (dose/" + num(r.volume_mL) + " mL)/S",
               "limiting solid"});
  for (const ClassifyPoint& p : r.points) {
    t.add_row({p.label, fixed(p.pH, 2), sig(p.solubility_mol_per_L, 4), sig(p.solubility_mg_per_mL, 4),
               sig(p.dose_number, 3), p.limiting_solid});
  }
  t.write(out);
  if (!r.media.empty()) {
    out << "\nThe dose in the pharmacopeial media (closed system, informative; the scan above decides)\n";
    TextTable m({"medium", "nominal pH", "pH after dose", "dissolved (%)", "solid remaining"});
    for (const MediumCheck& c : r.media) {
      m.add_row({c.medium, c.nominal_pH.empty() ? "-" : c.nominal_pH, c.usable ? fixed(c.pH_after, 2) : "n/a",
                 c.usable ? fixed(100.0 * c.dissolved_fraction, 1) : "n/a", c.usable ? c.solid : "n/a"});
    }
    m.write(out);
  }
  if (!r.notes.empty()) {
    out << "\nNotes\n";
    for (const std::string& s : r.notes) out << "  - " << s << "\n";
  }
  if (!r.warnings.empty()) {
    out << "\n";
    for (const std::string& w : r.warnings) out << "warning: " << w << "\n";
  }
  out << "\n" << caution_text() << "\n";
}

void write_classify_csv(const ClassifyResult& r, std::ostream& out) {
  write_table_csv(classify_tables(r).front(), out);
}

void write_classify_json(const ClassifyResult& r, std::ostream& out) {
  nlohmann::ordered_json j;
  j["verdict"] = r.verdict;
  j["guideline"] = r.guideline;
  j["convention"] = r.convention;
  j["compound"] = {{"id", r.compound_id}, {"name", r.compound_name}};
  j["form"] = r.form;
  j["form_molar_mass_g_per_mol"] = r.form_molar_mass_g_per_mol;
  j["dose_mg"] = r.dose_mg;
  j["temperature_C"] = r.temperature_C;
  j["volume_mL"] = r.volume_mL;
  j["pH_range"] = {r.from_pH, r.to_pH};
  j["dose_mg_per_mL"] = r.dose_mg_per_mL;
  j["dose_mol_per_L"] = r.dose_mol_per_L;
  j["min_solubility_mg_per_mL"] = r.min_solubility_mg_per_mL;
  j["min_solubility_mol_per_L"] = r.min_solubility_mol_per_L;
  j["min_at_pH"] = r.min_at_pH;
  j["dose_solubility_volume_mL"] = r.dose_solubility_volume_mL;
  j["solubility_basis"] = r.form;
  nlohmann::ordered_json pts = nlohmann::ordered_json::array();
  for (const ClassifyPoint& p : r.points) {
    pts.push_back({{"pH", p.pH},
                   {"solubility_mg_per_mL", p.solubility_mg_per_mL},
                   {"dose_number", p.dose_number},
                   {"label", p.label},
                   {"solubility_mol_per_L", p.solubility_mol_per_L},
                   {"limiting_solid", p.limiting_solid}});
  }
  j["points"] = pts;
  nlohmann::ordered_json media = nlohmann::ordered_json::array();
  for (const MediumCheck& c : r.media) {
    nlohmann::ordered_json m = {{"medium", c.medium}, {"name", c.name}, {"nominal_pH", c.nominal_pH}};
    if (c.usable) {
      m["pH_after_dose"] = c.pH_after;
      m["dissolved_fraction"] = c.dissolved_fraction;
      m["solid"] = c.solid;
    } else {
      m["pH_after_dose"] = nullptr;
      m["dissolved_fraction"] = nullptr;
      m["solid"] = nullptr;
    }
    media.push_back(m);
  }
  j["media"] = media;
  j["notes"] = r.notes;
  j["warnings"] = r.warnings;
  j["caution"] = caution_text();
  out << j.dump(2) << "\n";
}

}  // namespace pkarta
