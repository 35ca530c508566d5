// Text, CSV and JSON of a pH-solubility profile (analyses/profile.h), alone or with its
// Monte Carlo bands (analyses/uncertainty.h).
#include "pkarta/writers/profile_writer.h"
#include "pkarta/writers/tables.h"

#include <cmath>
#include <cstdio>
#include <nlohmann/json.hpp>

#include "pkarta/base/format.h"

namespace pkarta {

namespace {

std::string temp_text(double t) { return fixed(t, 1) + " °C"; }

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

std::string titrant_cell(const Profile& p, double tau) {
  if (tau == 0.0) return "-";
  return (tau > 0 ? p.base_titrant : p.acid_titrant) + " " + sig(std::fabs(tau), 3);
}

std::string activity_text(ActivityModel a) {
  return activity_model_label(a);
}

bool on_interval(double pH, double interval) {
  if (!(interval > 0)) return true;
  const double q = pH / interval;
  return std::fabs(q - std::round(q)) < 1e-6;
}

}  // namespace

void write_profile_text(const Profile& p, std::ostream& out, double row_interval_pH) {
  out << "pH-solubility profile of " << p.compound_name << " (" << p.compound_id << ") at "
      << temp_text(p.temperature_C) << "\n";
  out << "  contents: ";
  if (p.medium_contents.empty()) out << "water";
  for (std::size_t i = 0; i < p.medium_contents.size(); ++i) out << (i ? ", " : "") << p.medium_contents[i];
  out << "\n  pH held by " << p.acid_titrant << " (" << p.acid_ion << ") or " << p.base_titrant << " ("
      << p.base_ion << "); excess " << (p.s0_mol_per_L > 0 ? "free form" : "salt (no net-neutral form)")
      << "; activity: " << activity_text(p.activity)
      << "; pH = -log10 a(H+)\n";
  if (p.s0_mol_per_L > 0) {
    out << "  intrinsic solubility S0 at " << temp_text(p.temperature_C) << ": " << sig(p.s0_mol_per_L, 4)
        << " mol/L (" << sig(p.s0_mol_per_L * p.molar_mass_g_per_mol, 4) << " mg/mL); free-form molar mass "
        << fixed(p.molar_mass_g_per_mol, 2) << " g/mol\n";
  }
  if (!p.pka_at_temperature.empty()) {
    out << "  pKa at " << temp_text(p.temperature_C) << ":";
    for (double k : p.pka_at_temperature) out << " " << fixed(k, 3);
    out << "\n";
  }
  out << "\n";
  if (!p.ph_max.empty()) {
    out << "pHmax (free form and salt coexist; below it the salt limits for a base, above it for an acid)\n";
    TextTable t({"salt", "counterion", "pHmax", "S there (mol/L)", "(mg/mL free form)", "on the profile"});
    for (const PhMax& m : p.ph_max) {
      t.add_row({m.salt, m.counterion, fixed(m.pH, 3), sig(m.solubility_mol_per_L, 4),
                 sig(m.solubility_mol_per_L * p.molar_mass_g_per_mol, 4),
                 m.on_profile ? "yes" : "no (another salt limits)"});
    }
    t.write(out);
    out << "\n";
  }
  if (!p.salt_transitions.empty()) {
    out << "Salt transitions (two salts coexist; the first limits below, the second above)\n";
    TextTable t({"below", "above", "pH", "solubility there (mol/L)", "(mg/mL as free form)"});
    for (const SaltTransition& x : p.salt_transitions) {
      t.add_row({x.below, x.above, fixed(x.pH, 3), sig(x.solubility_mol_per_L, 4),
                 sig(x.solubility_mol_per_L * p.molar_mass_g_per_mol, 4)});
    }
    t.write(out);
    out << "\n";
  }
  if (!p.derived_ksp.empty()) {
    out << "Ksp derived from the salt's solubility in water (self-consistent; docs/model.md, \"Salts\")\n";
    TextTable t({"salt", "solubility in water", "(mol/L)", "at (°C)", "Ksp ((mol/L)^2)",
                 "Ksp at " + fixed(p.temperature_C, 1) + " °C ((mol/L)^2)"});
    for (const DerivedKsp& d : p.derived_ksp) {
      t.add_row({d.salt, d.solubility_in_water, sig(d.solubility_in_water_mol_per_L, 4),
                 fixed(d.reference_temperature_C, 1), sig(d.ksp, 4), sig(d.ksp_at_run_temperature, 4)});
    }
    t.write(out);
    out << "\n";
  }
  std::size_t shown = 0;
  for (const ProfilePoint& pt : p.points) shown += on_interval(pt.pH, row_interval_pH);
  out << "Profile";
  if (shown < p.points.size()) {
    out << " (every " << num(row_interval_pH) << " pH: " << shown << " of " << p.points.size()
        << " points; --format csv or json gives all, --step or --points prints every row)";
  }
  out << "\n";
  std::vector<std::string> head = {"pH", "S (mol/L)", "S (mg/mL free form)", "ideal HH S (mol/L)", "limiting solid",
                                   "I (mol/L)", "acid/base added (mol/L)"};
  for (const std::string& s : p.species) head.push_back("frac " + s);
  TextTable t(head);
  for (const ProfilePoint& pt : p.points) {
    if (!on_interval(pt.pH, row_interval_pH)) continue;
    std::vector<std::string> row = {fixed(pt.pH, 2),
                                    (pt.capped ? ">" : "") + sig(pt.solubility_mol_per_L, 4),
                                    (pt.capped ? ">" : "") + sig(pt.solubility_mg_per_mL, 4),
                                    (pt.ideal_solubility_mol_per_L >= kSolubilityCap_mol_per_L ? ">" : "") +
                                        sig(pt.ideal_solubility_mol_per_L, 4),
                                    pt.limiting_solid,
                                    sig(pt.ionic_strength_mol_per_L, 3),
                                    titrant_cell(p, pt.titrant_mol_per_L)};
    for (double f : pt.fractions) row.push_back(fixed(f, 4));
    t.add_row(row);
  }
  t.write(out);
  if (!p.notes.empty()) {
    out << "\nNotes\n";
    for (const std::string& s : p.notes) out << "  - " << s << "\n";
  }
  if (!p.warnings.empty()) {
    out << "\n";
    for (const std::string& w : p.warnings) out << "warning: " << w << "\n";
  }
  out << "\n" << caution_text() << "\n";
}

void write_profile_csv(const Profile& p, std::ostream& out) { write_table_csv(profile_tables(p, {}).front(), out); }

namespace {

nlohmann::ordered_json profile_json(const Profile& p) {
  nlohmann::ordered_json j;
  j["compound"] = {{"id", p.compound_id}, {"name", p.compound_name},
                   {"molar_mass_g_per_mol", p.molar_mass_g_per_mol}};
  j["temperature_C"] = p.temperature_C;
  j["activity_model"] = activity_model_id(p.activity);
  j["medium"] = p.medium_contents;
  j["acid_titrant"] = p.acid_titrant;
  j["base_titrant"] = p.base_titrant;
  if (p.s0_mol_per_L > 0) j["s0_mol_per_L"] = p.s0_mol_per_L;
  else j["s0_mol_per_L"] = nullptr;
  j["pKa_at_temperature"] = p.pka_at_temperature;
  j["species"] = p.species;
  nlohmann::ordered_json pts = nlohmann::ordered_json::array();
  for (const ProfilePoint& pt : p.points) {
    nlohmann::ordered_json by_species = nlohmann::ordered_json::object();
    for (std::size_t i = 0; i < p.species.size() && i < pt.fractions.size(); ++i) by_species[p.species[i]] = pt.fractions[i];
    pts.push_back({{"pH", pt.pH},
                   {"solubility_mol_per_L", pt.solubility_mol_per_L},
                   {"solubility_mg_per_mL", pt.solubility_mg_per_mL},
                   // The Henderson-Hasselbalch value itself, never held at the cap (null
                   // where it is infinite); the flag says it exceeds any real solution.
                   {"ideal_solubility_mol_per_L",
                    std::isfinite(pt.ideal_solubility_unbounded_mol_per_L)
                        ? nlohmann::ordered_json(pt.ideal_solubility_unbounded_mol_per_L)
                        : nlohmann::ordered_json(nullptr)},
                   {"ideal_solubility_above_cap", pt.ideal_above_cap},
                   {"limiting_solid", pt.limiting_solid},
                   {"ionic_strength_mol_per_L", pt.ionic_strength_mol_per_L},
                   {"fractions", pt.fractions},
                   {"titrant_mol_per_L", pt.titrant_mol_per_L},
                   {"capped", pt.capped},
                   {"fractions_by_species", by_species}});
  }
  j["points"] = pts;
  nlohmann::ordered_json mx = nlohmann::ordered_json::array();
  for (const PhMax& m : p.ph_max) {
    mx.push_back({{"salt", m.salt},
                  {"pH", m.pH},
                  {"counterion", m.counterion},
                  {"solubility_mol_per_L", m.solubility_mol_per_L},
                  {"on_profile", m.on_profile}});
  }
  j["pHmax"] = mx;
  nlohmann::ordered_json st = nlohmann::ordered_json::array();
  for (const SaltTransition& x : p.salt_transitions) {
    st.push_back({{"below", x.below},
                  {"above", x.above},
                  {"pH", x.pH},
                  {"solubility_mol_per_L", x.solubility_mol_per_L},
                  {"solubility_mg_per_mL_as_free_form", x.solubility_mol_per_L * p.molar_mass_g_per_mol}});
  }
  j["salt_transitions"] = st;
  nlohmann::ordered_json dk = nlohmann::ordered_json::array();
  for (const DerivedKsp& d : p.derived_ksp) {
    dk.push_back({{"salt", d.salt},
                  {"solubility_in_water", d.solubility_in_water},
                  {"solubility_in_water_mol_per_L", d.solubility_in_water_mol_per_L},
                  {"temperature_C", d.reference_temperature_C},
                  {"ksp_mol2_per_L2", d.ksp},
                  {"ksp_at_run_temperature_mol2_per_L2", d.ksp_at_run_temperature}});
  }
  j["derived_ksp"] = dk;
  j["notes"] = p.notes;
  j["warnings"] = p.warnings;
  j["caution"] = caution_text();
  return j;
}

}  // namespace

void write_profile_json(const Profile& p, std::ostream& out) { out << profile_json(p).dump(2) << "\n"; }

void write_profile_text(const Profile& p, const ProfileBands& bands, std::ostream& out, double row_interval_pH) {
  write_profile_text(p, out, row_interval_pH);
  if (bands.samples > 0) {
    out << "\n";
    write_profile_bands_text(bands, out);
  }
}

void write_profile_csv(const Profile& p, const ProfileBands& bands, std::ostream& out) {
  write_table_csv(profile_tables(p, bands).front(), out);
}

void write_profile_json(const Profile& p, const ProfileBands& bands, std::ostream& out) {
  nlohmann::ordered_json j = profile_json(p);
  if (bands.samples > 0) {
    nlohmann::ordered_json& pts = j["points"];
    for (std::size_t i = 0; i < pts.size() && i < bands.pH.size(); ++i) {
      pts[i]["solubility_p05_mol_per_L"] = std::pow(10.0, bands.p05_log10_mol_per_L[i]);
      pts[i]["solubility_p50_mol_per_L"] = std::pow(10.0, bands.p50_log10_mol_per_L[i]);
      pts[i]["solubility_p95_mol_per_L"] = std::pow(10.0, bands.p95_log10_mol_per_L[i]);
    }
    j["uncertainty"] = {{"samples", bands.samples}, {"seed", bands.seed}};
  }
  out << j.dump(2) << "\n";
}

}  // namespace pkarta
