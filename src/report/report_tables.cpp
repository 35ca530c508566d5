// The report's tables (HTML and CSV print the same strings) and the files of a report.
#include "pkarta/report/report.h"

#include <cmath>
#include <filesystem>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/io/atomic_file.h"
#include "report_internal.h"

namespace pkarta {

namespace fs = std::filesystem;
using report_internal::esc;
using report_internal::form_label;

namespace {

const std::vector<std::string> kRecipeColumns = {"reagent", "role", "formula", "conc (mM)", "amount (mmol)", "mass (g)",
                                                 "volume (mL)"};

// The rows of a recipe table: its reagents, then the drug (a formulation made with the pH
// adjusted after the dose: `drug_row` given, and the titrant goes in after it), the titrant and
// the water to volume.
void add_recipe_rows(const Recipe& r, const std::vector<std::string>* drug_row, ReportTable& t) {
  for (const RecipeReagent& g : r.reagents) {
    t.rows.push_back({g.id, g.role, g.formula, sig(g.conc_mol_per_L * 1e3, 4), sig(g.amount_mol * 1e3, 4), fixed(g.mass_g, 4), ""});
  }
  if (drug_row) t.rows.push_back(*drug_row);
  if (r.titrant) {
    t.rows.push_back({r.titrant->id,
                      "titrant " + sig(r.titrant->conc_mol_per_L, 3) + " mol/L" + (drug_row ? ", added after the drug" : ""),
                      "", "", sig(r.titrant->amount_mol * 1e3, 4), "", fixed(r.titrant->volume_mL, 3)});
  }
  t.rows.push_back({"water", "to volume", "H2O", "", "", "", sig(r.volume_L * 1e3, 4)});
}

}  // namespace

std::vector<ReportTable> report_tables(const ReportData& d) {
  std::vector<ReportTable> tables;
  const Compound& c = d.compound;
  const double T = d.request.temperature_C;
  const double mm = d.free_molar_mass_g_per_mol;

  ReportTable pk{"pka.csv", "Ionization constants", {"group", "type", "pKa", "at (°C)", "dH (kJ/mol)",
                                                     "dCp (J/K/mol)", "sd (pKa units)", "pKa at " + fixed(T, 1) + " °C"}, {}};
  for (std::size_t i = 0; i < c.system.pkas.size(); ++i) {
    const Pka& k = c.system.pkas[i];
    pk.rows.push_back({"pKa" + std::to_string(i + 1), k.type == GroupType::kAcid ? "acid" : "base", fixed(k.value, 2),
                       fixed(k.ref_temperature_C, 1), fixed(k.dH_kJ_per_mol, 1), fixed(k.dCp_J_per_K_mol, 1),
                       k.sd > 0 ? fixed(k.sd, 2) : "", fixed(k.at(T), 3)});
  }
  tables.push_back(pk);

  ReportTable props{"compound.csv", "Compound and free form", {"quantity", "value", "unit"}, {}};
  props.rows.push_back({"id", c.id, ""});
  props.rows.push_back({"name", c.name, ""});
  props.rows.push_back({"molar mass, free form", fixed(mm, 2), "g/mol"});
  props.rows.push_back({"net charge of the most protonated form", std::to_string(c.system.z0()), ""});
  if (c.has_intrinsic_solubility) {
    props.rows.push_back({"intrinsic solubility S0", sig(c.s0_mol_per_L, 4), "mol/L"});
    props.rows.push_back({"intrinsic solubility S0", sig(c.s0_mol_per_L * mm, 4), "mg/mL"});
    props.rows.push_back({"S0 measured at", fixed(c.s0_ref_temperature_C, 1), "°C"});
    props.rows.push_back({"enthalpy of solution", c.s0_dH_kJ_per_mol ? fixed(*c.s0_dH_kJ_per_mol, 1) : "not given", "kJ/mol"});
    props.rows.push_back({"S0 at " + fixed(T, 1) + " °C", sig(c.s0_at(T), 4), "mol/L"});
    if (c.s0_log_sd > 0) props.rows.push_back({"uncertainty of log10 S0", fixed(c.s0_log_sd, 2), "log10 units"});
  }
  tables.push_back(props);

  if (!c.salts.empty()) {
    ReportTable salts{"salts.csv", "Salt forms", {"salt", "counterion", "drug:counterion", "molar mass (g/mol)",
                                                  "solubility in water (given)", "Ksp ((mol/L)^(m+n))", "Ksp source",
                                                  "at (°C)", "dH of dissolution (kJ/mol)",
                                                  "Ksp at " + fixed(T, 1) + " °C ((mol/L)^(m+n))"}, {}};
    for (std::size_t i = 0; i < c.salts.size(); ++i) {
      const Salt& s = c.salts[i];
      const bool derived = s.solubility_in_water_mol_per_L.has_value() && !s.solubility_in_water_text.empty();
      // A weak counterion is named as its species ("maleate HA-").
      const std::string counterion = s.counterion_is_system ? s.counterion + " (charge " +
                                                                  std::to_string(s.counterion_charge) + ")"
                                                            : s.counterion;
      salts.rows.push_back({s.id, counterion, s.stoichiometry(),
                            s.molar_mass_g_per_mol > 0 ? fixed(s.molar_mass_g_per_mol, 2) : "",
                            s.solubility_in_water_text, sig(s.ksp.value_or(NAN), 4),
                            derived ? "derived from the solubility in water" : "given",
                            fixed(s.ref_temperature_C, 1), fixed(s.dH_kJ_per_mol, 1),
                            sig(d.salt_ksp_at_run_temperature[i], 4)});
    }
    tables.push_back(salts);
  }

  ReportTable prof{"profile.csv", "pH-solubility profile in water at " + fixed(T, 1) + " °C (pH held by HCl or NaOH)",
                   {"pH", "solubility (mol/L)", "solubility (mg/mL free form)", "Henderson-Hasselbalch, ideal (mol/L)",
                    "limiting solid", "ionic strength (mol/L)"}, {}};
  const int nsp = static_cast<int>(c.system.pkas.size()) + 1;
  for (int j = 0; j < nsp; ++j) prof.header.push_back("fraction " + c.system.species_label(j));
  for (const ProfilePoint& s : d.profile.points) {
    std::vector<std::string> r = {fixed(s.pH, 2), sig(s.solubility_mol_per_L, 4), sig(s.solubility_mol_per_L * mm, 4),
                                  (s.ideal_solubility_mol_per_L >= kSolubilityCap_mol_per_L ? ">" : "") +
                                      sig(s.ideal_solubility_mol_per_L, 4),
                                  s.limiting_solid, sig(s.ionic_strength_mol_per_L, 4)};
    for (int j = 0; j < nsp; ++j) r.push_back(j < static_cast<int>(s.fractions.size()) ? fixed(s.fractions[j], 4) : "");
    prof.rows.push_back(std::move(r));
  }
  tables.push_back(prof);

  ReportTable pm{"phmax.csv", "pHmax in water at " + fixed(T, 1) + " °C",
                 {"salt", "counterion", "pHmax", "solubility at pHmax (mol/L)", "solubility at pHmax (mg/mL free form)",
                  "limiting solid changes there"}, {}};
  for (const PhMax& x : d.profile.ph_max) {
    pm.rows.push_back({x.salt, x.counterion, fixed(x.pH, 2), sig(x.solubility_mol_per_L, 4),
                       sig(x.solubility_mol_per_L * mm, 4), x.on_profile ? "yes" : "no (a less soluble salt limits)"});
  }
  tables.push_back(pm);

  if (d.dose_in_water) {
    const Equilibrium& e = d.dose_in_water->equilibrium;
    ReportTable w{"dose-in-water.csv", "The dose in water alone at " + fixed(T, 1) + " °C", {"quantity", "value", "unit"}, {}};
    w.rows.push_back({"dose as given", d.request.dose_text + " " + form_label(d.request.form), ""});
    w.rows.push_back({"dose", sig(d.request.dose_mol_per_L, 4), "mol/L"});
    w.rows.push_back({"dose as free form", sig(d.request.dose_mol_per_L * mm, 4), "mg/mL"});
    w.rows.push_back({"pH", fixed(e.pH, 2), ""});
    if (e.drug) {
      w.rows.push_back({"dissolved", sig(e.drug->dissolved_mol_per_L, 4), "mol/L"});
      w.rows.push_back({"dissolved as free form", sig(e.drug->dissolved_mg_per_mL, 4), "mg/mL"});
      w.rows.push_back({"solid remaining", e.drug->solid, ""});
      w.rows.push_back({"saturation ratio (whole dose dissolved)", sig(e.drug->saturation_ratio, 4), ""});
    }
    w.rows.push_back({"ionic strength", sig(e.ionic_strength_mol_per_L, 4), "mol/L"});
    w.rows.push_back({"osmolarity, ideal", fixed(e.osmolarity_mOsm_per_L, 1), "mOsm/L"});
    tables.push_back(w);
  }

  if (d.classification) {
    const ClassifyResult& cr = *d.classification;
    ReportTable ct{"classification.csv",
                   "Solubility over pH " + fixed(cr.from_pH, 1) + "-" + fixed(cr.to_pH, 1) + " at " + fixed(cr.temperature_C, 0) +
                       " °C for " + sig(cr.dose_mg, 4) + " mg of " + form_label(cr.form) + " in " + fixed(cr.volume_mL, 0) + " mL",
                   {"point", "pH", "solubility (mol/L)", "solubility (mg/mL, as dosed form)", "dose number D0", "limiting solid"}, {}};
    for (const ClassifyPoint& p : cr.points) {
      ct.rows.push_back({p.label, fixed(p.pH, 2), sig(p.solubility_mol_per_L, 4), sig(p.solubility_mg_per_mL, 4),
                         sig(p.dose_number, 3), p.limiting_solid});
    }
    tables.push_back(ct);
    ReportTable cs{"classification-summary.csv", "Solubility class after " + cr.guideline, {"quantity", "value", "unit"}, {}};
    cs.rows.push_back({"verdict", cr.verdict, ""});
    cs.rows.push_back({"highest single dose", sig(cr.dose_mg, 4), "mg of " + form_label(cr.form)});
    cs.rows.push_back({"lowest solubility", sig(cr.min_solubility_mg_per_mL, 4), "mg/mL"});
    cs.rows.push_back({"at pH", fixed(cr.min_at_pH, 2), ""});
    cs.rows.push_back({"volume to dissolve the dose at the lowest solubility", sig(cr.dose_solubility_volume_mL, 4), "mL"});
    cs.rows.push_back({"volume of the guideline", fixed(cr.volume_mL, 0), "mL"});
    cs.rows.push_back({"temperature", fixed(cr.temperature_C, 1), "°C"});
    tables.push_back(cs);
    if (!cr.media.empty()) {
      ReportTable cm{"classification-media.csv", "The dose in " + fixed(cr.volume_mL, 0) + " mL of pharmacopeial media (closed system)",
                     {"medium", "nominal pH", "pH after the dose", "dissolved (%)", "solid left"}, {}};
      for (const MediumCheck& m : cr.media) {
        cm.rows.push_back({m.name, m.nominal_pH, m.usable ? fixed(m.pH_after, 2) : "n/a",
                           m.usable ? fixed(100.0 * m.dissolved_fraction, 1) : "n/a", m.usable ? m.solid : ""});
      }
      tables.push_back(cm);
    }
  }

  if (d.screen) {
    const ScreenReport& sr = *d.screen;
    ReportTable st{"screen.csv",
                   "Buffer screen: target pH " + fixed(sr.target_pH, 2) + " ± " + fixed(sr.tolerance_pH, 2) + " after the dose, " +
                       fixed(sr.temperature_C, 1) + " °C, " +
                       (sr.route == "any" ? std::string("every buffer of the library") : "buffers the library lists for " + sr.route + " use"),
                   {"buffer", "status",
                    "holds at " + fixed(sr.low_temperature_C, 0) + " and " + fixed(sr.high_temperature_C, 0) + " °C",
                    "min conc (mM)", "recommended (mM)", "set by", "titrant", "titrant (mM)", "nearest pKa", "pH after dose",
                    "capacity (mM per pH)", "osmolarity (mOsm/L)", "pH at " + fixed(sr.low_temperature_C, 0) + " °C",
                    "pH at " + fixed(sr.high_temperature_C, 0) + " °C", "solid left"}, {}};
    const bool diluted = !sr.dilution_medium.empty();
    if (diluted) st.header.push_back("highest supersaturation on dilution into " + sr.dilution_medium + " (as screened)");
    for (const ScreenResult& r : sr.results) {
      const bool computed = r.status == ScreenStatus::kOk || r.status == ScreenStatus::kNotAchievable;
      const double conc = r.min_conc_mol_per_L.value_or(r.conc_used_mol_per_L);
      std::string conc_text = r.min_conc_mol_per_L ? sig(*r.min_conc_mol_per_L * 1e3, 3) : "";
      if (r.status == ScreenStatus::kNotAchievable) conc_text = "> " + sig(r.max_conc_mol_per_L * 1e3, 3);
      if (r.min_conc_at_lower_bound) conc_text = "< " + sig(conc * 1e3, 3);
      const std::string rec_text = r.recommended_conc_mol_per_L ? sig(*r.recommended_conc_mol_per_L * 1e3, 3) : "";
      const std::string set_by = r.recommended_conc_mol_per_L ? r.binding : (r.binding.empty() ? "" : "fails " + r.binding);
      st.rows.push_back({r.buffer, screen_status_name(r.status),
                         r.status == ScreenStatus::kOk ? (r.holds_at_storage ? "yes" : "no") : "",
                         computed ? conc_text : "", computed ? rec_text : "",
                         computed ? set_by : "", computed ? r.titrant : "",
                         computed ? sig(r.titrant_mol_per_L * 1e3, 3) : "", fixed(r.nearest_pka, 2),
                         computed ? fixed(r.pH_after_drug, 2) : "",
                         computed ? sig(r.capacity_mol_per_L_per_pH * 1e3, 3) : "",
                         computed ? fixed(r.osmolarity_mOsm_per_L, 1) : "", computed ? fixed(r.pH_at_5C, 2) : "",
                         computed ? fixed(r.pH_at_40C, 2) : "", computed ? r.drug_solid : ""});
      if (diluted) {
        st.rows.back().push_back(std::isfinite(r.dilution_max_supersaturation) ? sig(r.dilution_max_supersaturation, 3) : "");
      }
    }
    tables.push_back(st);
  }
  if (d.recipe) {
    const Recipe& r = *d.recipe;
    ReportTable rt{"recipe.csv",
                   "Recipe: " + r.buffer_name + " " + sig(r.conc_mol_per_L * 1e3, 3) + " mM, pH " + fixed(r.target_pH, 2) + ", " +
                       sig(r.volume_L * 1e3, 4) + " mL at " + fixed(r.temperature_C, 1) + " °C",
                   kRecipeColumns, {}};
    add_recipe_rows(r, nullptr, rt);
    tables.push_back(rt);
    ReportTable rs{"recipe-solution.csv", "The buffer as made (computed)", {"quantity", "value", "unit"}, {}};
    rs.rows.push_back({"pH", fixed(r.pH, 3), ""});
    rs.rows.push_back({"ionic strength", sig(r.ionic_strength_mol_per_L, 4), "mol/L"});
    rs.rows.push_back({"buffer capacity", sig(r.capacity_mol_per_L_per_pH * 1e3, 4), "mM per pH"});
    rs.rows.push_back({"osmolarity, ideal", fixed(r.osmolarity_mOsm_per_L, 1), "mOsm/L"});
    rs.rows.push_back({"osmolality estimate (to be measured)", fixed(r.osmolality_estimate_mOsm_per_kg, 1), "mOsm/kg"});
    tables.push_back(rs);
  }
  if (d.adjusted_formulation) {
    const Formulation& f = *d.adjusted_formulation;
    const Recipe& r = f.recipe;
    const std::string form_words = f.drug.form == "free" ? "free form" : f.drug.form;
    ReportTable rt{"formulation.csv",
                   "Formulation: " + r.buffer_name + " " + sig(r.conc_mol_per_L * 1e3, 3) + " mM with " + d.compound.id + " " +
                       sig(f.drug.mass_g / r.volume_L, 4) + " mg/mL as " + form_words + ", pH adjusted to " +
                       fixed(r.target_pH, 2) + " after the dose, " + sig(r.volume_L * 1e3, 4) + " mL at " +
                       fixed(r.temperature_C, 1) + " °C",
                   kRecipeColumns, {}};
    const std::vector<std::string> drug_row = {d.compound.id, "drug, weighed as " + form_words, "",
                                               sig(f.drug.dose_mol_per_L * 1e3, 4), sig(f.drug.amount_mol * 1e3, 4),
                                               fixed(f.drug.mass_g, 4), ""};
    add_recipe_rows(r, &drug_row, rt);
    tables.push_back(rt);
    ReportTable rs{"formulation-solution.csv", "The formulation as made, with the drug in (computed)", {"quantity", "value", "unit"}, {}};
    rs.rows.push_back({"pH at " + fixed(r.temperature_C, 0) + " °C", fixed(f.pH, 2), ""});
    rs.rows.push_back({"pH at " + fixed(f.low_temperature_C, 0) + " °C (same totals)", fixed(f.pH_low, 2), ""});
    rs.rows.push_back({"pH at " + fixed(f.high_temperature_C, 0) + " °C (same totals)", fixed(f.pH_high, 2), ""});
    rs.rows.push_back({"ionic strength", sig(f.ionic_strength_mol_per_L, 4), "mol/L"});
    rs.rows.push_back({"buffer capacity", sig(f.capacity_mol_per_L_per_pH * 1e3, 4), "mM per pH"});
    rs.rows.push_back({"osmolarity, ideal", fixed(f.osmolarity_mOsm_per_L, 1), "mOsm/L"});
    rs.rows.push_back({"osmolality estimate (to be measured)", fixed(f.osmolality_estimate_mOsm_per_kg, 1), "mOsm/kg"});
    rs.rows.push_back({"dose / solubility in water at that pH", sig(f.solubility_margin, 3), ""});
    rs.rows.push_back({"solid expected", f.solid, ""});
    tables.push_back(rs);
  }
  if (d.dilution) {
    const DilutionResult& dl = *d.dilution;
    ReportTable t{"dilution.csv", "The formulation diluted into " + dilution_medium_label(dl, true) + " at " + fixed(dl.temperature_C, 1) + " °C",
                  {"dilution (total/formulation)", "pH", "drug (mg/mL free form)", "solubility (mg/mL free form)", "limiting solid",
                   "supersaturation ratio", "precipitation risk", "pH at equilibrium", "dissolved at equilibrium (mg/mL free form)"}, {}};
    for (const DilutionPoint& p : dl.points) {
      t.rows.push_back({sig(p.ratio, 3), fixed(p.pH, 2), sig(p.drug_mg_per_mL, 4),
                        std::isfinite(p.solubility_mol_per_L) ? sig(p.solubility_mol_per_L * mm, 4) : "no solid forms",
                        p.limiting_solid, sig(p.supersaturation_ratio, 3), p.risk ? "yes" : "no", fixed(p.equilibrium_pH, 2),
                        sig(p.equilibrium_dissolved_mol_per_L * mm, 4)});
    }
    tables.push_back(t);
  }
  if (d.uncertainty) {
    const ProfileBands& b = *d.uncertainty;
    ReportTable t{"uncertainty.csv",
                  "Solubility band from the pKa and S0 uncertainties (" + std::to_string(b.samples) + " Monte Carlo samples, seed " +
                      std::to_string(b.seed) + ")",
                  {"pH", "nominal (mol/L)", "5th percentile (mol/L)", "median (mol/L)", "95th percentile (mol/L)",
                   "95th/5th percentile"}, {}};
    for (std::size_t i = 0; i < b.pH.size(); ++i) {
      t.rows.push_back({fixed(b.pH[i], 2), sig(std::pow(10.0, b.nominal_log10_mol_per_L[i]), 4),
                        sig(std::pow(10.0, b.p05_log10_mol_per_L[i]), 4), sig(std::pow(10.0, b.p50_log10_mol_per_L[i]), 4),
                        sig(std::pow(10.0, b.p95_log10_mol_per_L[i]), 4),
                        sig(std::pow(10.0, b.p95_log10_mol_per_L[i] - b.p05_log10_mol_per_L[i]), 3)});
    }
    tables.push_back(t);
  }
  if (d.fit) {
    const FitResult& f = *d.fit;
    ReportTable t{"fit.csv", "Constants fitted to the measured points (" + f.message + ")",
                  {"parameter", "compound file", "estimate", "standard error"}, {}};
    for (const FitParameter& p : f.parameters) {
      t.rows.push_back({p.name, fixed(p.start, 3), fixed(p.estimate, 3), std::isfinite(p.std_error) ? fixed(p.std_error, 3) : "n/a"});
    }
    tables.push_back(t);
    ReportTable r{"fit-residuals.csv", "Measured and fitted log10 solubility (mol/L)",
                  {"pH", "temperature (°C)", "observed log10", "fitted log10", "residual", "limiting solid"}, {}};
    for (const FitResidual& x : f.residuals) {
      r.rows.push_back({fixed(x.pH, 2), fixed(x.temperature_C, 1), fixed(x.observed_log10, 3), fixed(x.fitted_log10, 3),
                        fixed(x.observed_log10 - x.fitted_log10, 3), x.limiting_solid});
    }
    tables.push_back(r);
  }
  if (!d.drift.empty()) {
    ReportTable dt{"drift.csv", "pH after the dose against buffer concentration (leading buffers)",
                   {"buffer", "conc (mM)", "pH after dose", "drift from target (pH)"}, {}};
    for (const DriftCurve& c : d.drift) {
      for (std::size_t i = 0; i < c.conc_mol_per_L.size(); ++i) {
        dt.rows.push_back({c.buffer, sig(c.conc_mol_per_L[i] * 1e3, 3), fixed(c.pH_after_drug[i], 3),
                           fixed(c.pH_after_drug[i] - *d.request.target_pH, 3)});
      }
    }
    tables.push_back(dt);
  }
  return tables;
}

namespace {

bool numeric_cell(const std::string& s) {
  if (s.empty()) return false;
  if (s == "n/a") return true;
  char* end = nullptr;
  std::strtod(s.c_str(), &end);
  return end && *end == '\0';
}

}  // namespace

std::string table_csv(const ReportTable& t) {
  std::ostringstream out;
  write_csv_row(out, t.header);
  for (const auto& r : t.rows) write_csv_row(out, r);
  return out.str();
}

namespace report_internal {

void write_table_html(const ReportTable& t, std::ostream& out, const std::string& csv_folder,
                      const std::vector<std::size_t>* rows, const std::string& note, int lead_row) {
  out << "<div class=\"table-wrap\"><table data-csv=\"" << esc(t.file) << "\">\n<caption>" << esc(t.caption);
  if (!csv_folder.empty()) {
    out << " <a class=\"csv-link\" href=\"" << esc(csv_folder + "/" + t.file) << "\">CSV: " << esc(t.file) << "</a>";
  }
  if (!note.empty()) out << " <span class=\"note\">" << esc(note) << "</span>";
  out << "</caption>\n<thead><tr>";
  for (const std::string& h : t.header) out << "<th scope=\"col\">" << esc(h) << "</th>";
  out << "</tr></thead>\n<tbody>\n";
  auto row = [&](const std::vector<std::string>& r) {
    const bool lead = lead_row >= 0 && &r == &t.rows[static_cast<std::size_t>(lead_row)];
    out << (lead ? "<tr class=\"lead\">" : "<tr>");
    for (std::size_t i = 0; i < r.size(); ++i) {
      const bool num = i > 0 && numeric_cell(r[i]);
      if (i == 0) out << "<th scope=\"row\">" << esc(r[i]) << "</th>";
      else out << "<td" << (num ? " class=\"num\"" : "") << ">" << esc(r[i]) << "</td>";
    }
    out << "</tr>\n";
  };
  if (rows) {
    for (std::size_t i : *rows) row(t.rows[i]);
  } else {
    for (const auto& r : t.rows) row(r);
  }
  out << "</tbody></table></div>\n";
}

const ReportTable* find_table(const std::vector<ReportTable>& tables, const std::string& file) {
  for (const ReportTable& t : tables) {
    if (t.file == file) return &t;
  }
  return nullptr;
}

}  // namespace report_internal

std::vector<std::string> write_report_files(const ReportData& data, const std::string& html_path,
                                            const std::vector<std::string>& inputs_to_protect) {
  const fs::path html(html_path);
  const std::string stem = html.stem().string();
  const fs::path folder = html.parent_path() / stem;
  std::vector<SetFile> tables;
  std::vector<std::string> written;
  for (const ReportTable& t : report_tables(data)) {
    tables.push_back({t.file, table_csv(t)});
    written.push_back((folder / t.file).string());
  }
  std::ostringstream out;
  write_report_html(data, stem, out);
  write_file_set(html_path, out.str(), folder.string(), tables, inputs_to_protect);
  written.push_back(html_path);
  return written;
}

}  // namespace pkarta
