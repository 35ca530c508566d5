#include "pkarta/report/report.h"

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <ctime>
#include <filesystem>
#include <map>
#include <sstream>

#include "pkarta/io/atomic_file.h"
#include "pkarta/base/error.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/report/svg_chart.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {

namespace {

namespace fs = std::filesystem;
using svg::xml_escape;

// ---------------------------------------------------------------------------------------------
// Analysis helpers

// ---------------------------------------------------------------------------------------------
// Formatting helpers (writers)

std::string esc(const std::string& s) { return xml_escape(s); }

// "H2A2+" -> "H₂A²⁺" for display.
std::string pretty_species(const std::string& label) {
  static const char* const kSub[10] = {"\u2080", "\u2081", "\u2082", "\u2083", "\u2084",
                                       "\u2085", "\u2086", "\u2087", "\u2088", "\u2089"};
  static const char* const kSup[10] = {"\u2070", "\u00B9", "\u00B2", "\u00B3", "\u2074",
                                       "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
  std::string out;
  const std::size_t a = label.find('A');
  for (std::size_t i = 0; i < label.size(); ++i) {
    const char ch = label[i];
    if (ch >= '0' && ch <= '9') out += (a != std::string::npos && i > a) ? kSup[ch - '0'] : kSub[ch - '0'];
    else if (ch == '+' && i > a) out += "\u207A";
    else if (ch == '-' && i > a) out += "\u207B";
    else out += ch;
  }
  return out;
}

std::string form_label(const std::string& form) { return form == "free" ? "free form" : form; }

// "1:10", "1:2.5": a dilution ratio.
std::string ratio_text(double ratio) {
  if (std::fabs(ratio - std::round(ratio)) < 1e-9) return "1:" + fixed(ratio, 0);
  return "1:" + sig(ratio, 3);
}

std::string mg_per_mL(double mol_per_L, double molar_mass) { return sig(mol_per_L * molar_mass, 3); }

bool numeric_cell(const std::string& s) {
  if (s.empty()) return false;
  if (s == "n/a") return true;
  char* end = nullptr;
  std::strtod(s.c_str(), &end);
  return end && *end == '\0';
}

void write_table_html(const ReportTable& t, std::ostream& out, const std::string& csv_folder,
                      const std::vector<std::size_t>* rows = nullptr, const std::string& note = "",
                      int lead_row = -1) {
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

// Salt runs along the profile: contiguous pH ranges where a salt limits.
struct Run {
  std::string solid;
  double from, to;
};
std::vector<Run> salt_runs(const std::vector<ProfilePoint>& profile) {
  std::vector<Run> runs;
  for (std::size_t i = 0; i < profile.size(); ++i) {
    const std::string& s = profile[i].limiting_solid;
    if (s == "free" || s == "none") continue;
    const double lo = i > 0 ? 0.5 * (profile[i - 1].pH + profile[i].pH) : profile[i].pH;
    const double hi = i + 1 < profile.size() ? 0.5 * (profile[i].pH + profile[i + 1].pH) : profile[i].pH;
    if (!runs.empty() && runs.back().solid == s && std::fabs(runs.back().to - lo) < 1e-9) runs.back().to = hi;
    else runs.push_back({s, lo, hi});
  }
  return runs;
}

const char* kCss = R"css(
:root { --ink: #1a1a1a; --muted: #555; --rule: #c8c8c8; --accent: #0072b2; --warn-bg: #fff4cc; --warn-ink: #5c4400; }
* { box-sizing: border-box; }
html { background: #f3f3f1; }
body { margin: 0 auto; max-width: 1000px; padding: 0 28px 40px; background: #ffffff; color: var(--ink);
       font-family: sans-serif; font-size: 15px; line-height: 1.45; }
header.report-head { border-bottom: 4px solid var(--accent); padding: 26px 0 14px; }
header.report-head h1 { font-size: 27px; margin: 0 0 4px; }
header.report-head p { margin: 0; color: var(--muted); }
h2 { font-size: 20px; margin: 34px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); }
h2 .num { color: var(--accent); margin-right: 8px; }
h3 { font-size: 16px; margin: 20px 0 6px; }
section { break-inside: auto; }
.key-numbers { display: grid; grid-template-columns: repeat(3, 1fr); gap: 12px; margin: 18px 0 8px; }
.key { border: 1px solid var(--rule); border-top: 5px solid var(--accent); padding: 10px 12px 12px; border-radius: 3px; }
.key.lead { border-top-color: #d55e00; }
.key .label { font-size: 13px; letter-spacing: 0.02em; color: var(--muted); font-weight: bold; }
.key .value { font-size: 23px; font-weight: bold; margin: 2px 0; }
.key .detail { font-size: 13px; color: var(--ink); }
.key .where { font-size: 12px; color: var(--muted); margin-top: 4px; }
.caution { display: flex; gap: 14px; align-items: flex-start; background: var(--warn-bg); color: var(--warn-ink);
           border: 2px solid #8a6d00; border-radius: 4px; padding: 12px 16px; margin: 16px 0; }
.caution .sign { flex: 0 0 34px; height: 34px; border-radius: 50%; background: #8a6d00; color: #ffffff;
                 font-weight: bold; font-size: 22px; text-align: center; line-height: 34px; }
.caution p { margin: 0; }
.caution strong { color: #3d2d00; }
nav.contents { font-size: 14px; margin: 10px 0; }
nav.contents ol { margin: 4px 0; padding-left: 22px; columns: 2; }
figure { margin: 14px 0 18px; break-inside: avoid; }
figure svg { width: 100%; height: auto; display: block; }
figcaption { font-size: 13.5px; color: var(--muted); margin-top: 4px; }
figcaption strong { color: var(--ink); }
.table-wrap { overflow-x: auto; margin: 10px 0 16px; }
table { border-collapse: collapse; font-size: 13.5px; min-width: 50%; }
caption { text-align: left; font-weight: bold; padding: 4px 0 6px; caption-side: top; }
caption .csv-link { font-weight: normal; font-size: 12px; margin-left: 8px; }
caption .note { display: block; font-weight: normal; font-size: 12.5px; color: var(--muted); }
th, td { padding: 4px 10px; border-bottom: 1px solid #e2e2e2; text-align: left; vertical-align: top; }
thead th { border-bottom: 2px solid var(--ink); background: #f4f6f8; }
tbody tr:nth-child(even) { background: #fafafa; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.lead th, tr.lead td { background: #fde9dc; font-weight: bold; }
.muted { color: var(--muted); }
.absent { border: 1px dashed var(--rule); padding: 8px 12px; color: var(--muted); font-size: 14px; }
ul.warnings li { color: #7a3a00; }
ol.refs li { margin-bottom: 3px; }
dl.trace { display: grid; grid-template-columns: max-content 1fr; gap: 3px 16px; font-size: 13.5px; }
dl.trace dt { font-weight: bold; }
dl.trace dd { margin: 0; }
code, .hash { font-family: monospace; font-size: 12.5px; overflow-wrap: anywhere; }
.hash { word-break: break-all; }
footer { margin-top: 36px; border-top: 1px solid var(--rule); padding-top: 8px; font-size: 12.5px; color: var(--muted); }
@media (max-width: 760px) { .key-numbers { grid-template-columns: 1fr; } nav.contents ol { columns: 1; } }
@media print {
  @page { size: A4; margin: 14mm 14mm 16mm; }
  html, body { background: #ffffff; }
  body { max-width: none; padding: 0; font-size: 10pt; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  nav.contents, .csv-link { display: none; }
  h2 { break-after: avoid; }
  figure, .key-numbers, .caution, table { break-inside: avoid; }
  .table-wrap { overflow: visible; }
  .key-numbers { grid-template-columns: repeat(3, 1fr); }
}
)css";

}  // namespace

// ---------------------------------------------------------------------------------------------
// Request and analysis

bool ReportRequest::is_valid(std::string* error) const {
  auto bad = [&](const std::string& m) {
    if (error) *error = "ReportRequest::" + m;
    return false;
  };
  if (!(dose_mol_per_L >= 0.0) || !std::isfinite(dose_mol_per_L)) return bad("dose_mol_per_L must be >= 0");
  if (target_pH && !(*target_pH >= 0.0 && *target_pH <= 14.0)) return bad("target_pH must lie in 0-14");
  if (!(tolerance_pH > 0.0)) return bad("tolerance_pH = " + sig(tolerance_pH) + ", must be > 0");
  if (!(profile_step_pH > 0.0)) return bad("profile_step_pH = " + sig(profile_step_pH) + ", must be > 0");
  if (!(profile_to_pH > profile_from_pH)) return bad("profile_to_pH must be above profile_from_pH");
  if ((profile_to_pH - profile_from_pH) / profile_step_pH > 10000) return bad("profile has more than 10000 points");
  if (!(temperature_C >= -10.0 && temperature_C <= 100.0)) return bad("temperature_C must lie in -10..100");
  return true;
}

double round_up_125(double x) {
  if (!(x > 0) || !std::isfinite(x)) return x;
  const double mag = std::pow(10.0, std::floor(std::log10(x)));
  for (double m : {1.0, 2.0, 5.0, 10.0}) {
    if (m * mag >= x * (1.0 - 1e-12)) return m * mag;
  }
  return 10.0 * mag;
}

std::string report_date_utc() {
  std::time_t t = std::time(nullptr);
  if (const char* e = std::getenv("SOURCE_DATE_EPOCH"); e && *e) {
    const std::string s = e;
    if (s.find_first_not_of("0123456789") != std::string::npos || s.size() > 15) {
      throw InputError(SourceLocation{"SOURCE_DATE_EPOCH", 0, 0},
                       "expected a number of seconds since 1970-01-01 UTC, got \"" + s + "\"");
    }
    t = static_cast<std::time_t>(std::stoll(s));
  }
  std::tm tm{};
  gmtime_r(&t, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%d", &tm);
  return buf;
}

ReportData analyse_report(const Compound& compound, const Library& library, const ReportRequest& request,
                          const RunRecord& run) {
  std::string why;
  if (!request.is_valid(&why)) throw InputError(why);
  ReportData d;
  d.compound = compound;
  d.request = request;
  d.free_molar_mass_g_per_mol = compound.molar_mass_g_per_mol;
  d.form_molar_mass_g_per_mol = form_molar_mass(compound, request.form, library);
  for (const Salt& s : compound.salts) d.salt_ksp_at_run_temperature.push_back(salt_ksp_at(s, request.temperature_C));

  // Provenance.
  Provenance& p = d.provenance;
  p.library_id = library.id;
  p.library_version = library.version;
  p.date_utc = run.date_utc;
  p.command_line = run.command_line;
  p.inputs = run.inputs;

  // pH-solubility profile in water, pH held by HCl or NaOH, with pHmax.
  ProfileConditions cond;
  cond.temperature_C = request.temperature_C;
  cond.activity = request.activity;
  ProfileGrid grid;
  grid.from_pH = request.profile_from_pH;
  grid.to_pH = request.profile_to_pH;
  grid.step_pH = request.profile_step_pH;
  d.profile = compute_profile(compound, library, cond, grid);

  // Solubility classification at 37 °C (ICH M9).
  if (request.classify_dose_mg) {
    ClassifyOptions co;
    co.dose_mg = *request.classify_dose_mg;
    co.form = request.form;
    co.activity = request.activity;
    d.classification = classify(compound, library, co);
  }

  // Buffer screen at the target pH, and the drift curves of its leading buffers.
  if (request.target_pH && request.dose_mol_per_L > 0.0) {
    ScreenOptions so;
    so.target_pH = *request.target_pH;
    so.tolerance_pH = request.tolerance_pH;
    so.temperature_C = request.temperature_C;
    so.buffers = request.buffers;
    so.route = request.route;
    so.activity = request.activity;
    ScreenJob job{compound, request.dose_mol_per_L, request.form};
    d.screen = screen(library, job, so);
    for (const ScreenResult& r : d.screen->results) {
      if (r.status == ScreenStatus::kOutsideRange) continue;
      const AcidBaseSystem& sys = library.system(library.buffer(r.buffer).system);
      d.provenance.buffer_sources.emplace_back(r.buffer, sys.source.empty() ? std::string("not given") : sys.source);
    }
    for (const ScreenResult& r : d.screen->results) {
      if (static_cast<int>(d.drift.size()) >= request.drift_buffers) break;
      if (r.status != ScreenStatus::kOk && r.status != ScreenStatus::kNotAchievable) continue;
      const Buffer& buffer = library.buffer(r.buffer);
      DriftCurve curve{r.buffer, r.name, {}, {}, r.min_conc_mol_per_L};
      const double top = buffer.max_conc_mol_per_L, bottom = std::min(1e-4, top / 100.0);
      const int points = 25;
      for (int i = 0; i < points; ++i) {
        const double c = bottom * std::pow(top / bottom, static_cast<double>(i) / (points - 1));
        curve.conc_mol_per_L.push_back(c);
        curve.pH_after_drug.push_back(ph_after_drug(library, buffer, c, compound, request.dose_mol_per_L, request.form, so));
      }
      d.drift.push_back(std::move(curve));
    }
  }

  // Recipe of the leading buffer, and the formulation diluted into a medium.
  const ScreenResult* lead = nullptr;
  if (d.screen) {
    for (const ScreenResult& r : d.screen->results) {
      if (r.status == ScreenStatus::kOk) {
        lead = &r;
        break;
      }
    }
  }
  if (lead && lead->recommended_conc_mol_per_L) {
    RecipeOptions ro;
    ro.buffer = lead->buffer;
    ro.pH = *request.target_pH;
    ro.conc_mol_per_L = *lead->recommended_conc_mol_per_L;  // the screen's one recommended strength
    ro.volume_L = request.recipe_volume_L;
    ro.temperature_C = request.temperature_C;
    ro.isotonic = request.route == "parenteral" || request.route == "ophthalmic";
    ro.activity = request.activity;
    // Sodium chloride would bring the counterion of a Cl- or Na+ salt (common-ion effect):
    // make such a recipe isotonic with dextrose when the library has it.
    if (ro.isotonic && library.reagents.count("dextrose")) {
      for (const Salt& salt : compound.salts) {
        if (salt.counterion == "Cl-" || salt.counterion == "Na+") {
          ro.tonicity_reagent = "dextrose";
          d.recipe_tonicity_note = "Made isotonic with dextrose, not sodium chloride: NaCl brings " + salt.counterion +
                                   ", the counterion of the " + salt.id + ", whose solubility it would lower (common-ion effect). "
                                   "Dextrose is added until the osmolality estimate (osmotic coefficient " +
                                   fixed(kOsmoticCoefficient, 2) + ") reaches " + fixed(kIsotonicTarget_mOsm_per_kg, 0) +
                                   " mOsm/kg; the osmolality must be measured.";
          break;
        }
      }
    }
    d.recipe = make_recipe(library, ro);
    std::string medium = request.dilution_medium;
    if (medium.empty()) {
      medium = request.route == "parenteral" ? "plasma-7.4" : request.route == "oral" ? "sif-6.8" : "saline-0.9";
      if (!library.media.count(medium)) medium = "none";
    }
    if (medium != "none") {
      Mixture formulation = recipe_mixture(library, *d.recipe, request.activity);
      add_drug(formulation, library, compound, request.dose_mol_per_L, request.form);
      DilutionOptions dl;
      dl.medium_id = medium;
      DilutionResult r = analyse_dilution(formulation, library, dl,
                                          {d.recipe->buffer_name + " " + sig(d.recipe->conc_mol_per_L * 1e3, 3) + " mM",
                                           compound.id + " " + request.dose_text});
      if (r.usable()) d.dilution = std::move(r);
      else d.warnings.push_back("dilution: " + r.message);
    }
  }

  // Uncertainty band of the profile (Monte Carlo over the pKa and S0 uncertainties).
  bool has_sd = compound.s0_log_sd > 0;
  for (const Pka& k : compound.system.pkas) has_sd = has_sd || k.sd > 0;
  if (request.uncertainty_samples > 0 && has_sd) {
    std::vector<double> grid;
    // An integer counter: the grid points do not accumulate rounding.
    const int n = static_cast<int>(std::floor((request.profile_to_pH - request.profile_from_pH) /
                                              request.uncertainty_step_pH + 1e-9));
    for (int i = 0; i <= n; ++i) grid.push_back(request.profile_from_pH + i * request.uncertainty_step_pH);
    MonteCarloRun run;
    run.threads = 0;
    if (request.progress) {
      run.progress = [&request](int done, int total) {
        request.progress(static_cast<std::size_t>(done), static_cast<std::size_t>(total));
      };
    }
    d.uncertainty = profile_bands(compound, library, grid, cond, request.uncertainty_samples, request.uncertainty_seed, run);
  }

  // Fit of the constants to the measured points of the compound file.
  if (request.fit_measured && !compound.measured.empty()) {
    const std::vector<FitPoint> points = fit_points_from_compound(compound);
    FitOptions fo;
    fo.conditions = cond;
    std::vector<FitParameter> params = default_fit_parameters(compound, library, points, fo);
    if (!params.empty() && points.size() > params.size()) {
      d.fit = fit_solubility(compound, library, points, params, fo);
    }
  }

  // The dose in water alone.
  if (request.dose_mol_per_L > 0.0) {
    Mixture m;
    m.temperature_C = request.temperature_C;
    m.activity = request.activity;
    add_drug(m, library, compound, request.dose_mol_per_L, request.form);
    MixResult r = analyse_mix(m, {compound.id + " " + request.dose_text});
    if (r.equilibrium.usable()) d.dose_in_water = std::move(r);
    else d.warnings.push_back("the dose in water did not converge: " + r.equilibrium.message);
  }
  for (const std::string& w : d.profile.warnings) d.warnings.push_back(w);
  if (d.classification) {
    for (const std::string& w : d.classification->warnings) d.warnings.push_back("classification: " + w);
  }
  if (d.screen) {
    for (const std::string& w : d.screen->warnings) d.warnings.push_back(w);
  }
  return d;
}

// ---------------------------------------------------------------------------------------------
// Tables

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
                   {"buffer", "status", "min conc (mM)", "recommended (mM)", "set by", "titrant", "titrant (mM)", "nearest pKa", "pH after dose",
                    "capacity (mM per pH)", "osmolarity (mOsm/L)", "pH at " + fixed(sr.low_temperature_C, 0) + " °C",
                    "pH at " + fixed(sr.high_temperature_C, 0) + " °C", "solid left"}, {}};
    for (const ScreenResult& r : sr.results) {
      const bool computed = r.status == ScreenStatus::kOk || r.status == ScreenStatus::kNotAchievable;
      const double conc = r.min_conc_mol_per_L.value_or(r.conc_used_mol_per_L);
      std::string conc_text = r.min_conc_mol_per_L ? sig(*r.min_conc_mol_per_L * 1e3, 3) : "";
      if (r.status == ScreenStatus::kNotAchievable) conc_text = "> " + sig(r.max_conc_mol_per_L * 1e3, 3);
      if (r.min_conc_at_lower_bound) conc_text = "< " + sig(conc * 1e3, 3);
      const std::string rec_text = r.recommended_conc_mol_per_L ? sig(*r.recommended_conc_mol_per_L * 1e3, 3) : "";
      const std::string set_by = r.recommended_conc_mol_per_L ? r.binding : (r.binding.empty() ? "" : "fails " + r.binding);
      st.rows.push_back({r.buffer, screen_status_name(r.status), computed ? conc_text : "", computed ? rec_text : "",
                         computed ? set_by : "", computed ? r.titrant : "",
                         computed ? sig(r.titrant_mol_per_L * 1e3, 3) : "", fixed(r.nearest_pka, 2),
                         computed ? fixed(r.pH_after_drug, 2) : "",
                         computed ? sig(r.capacity_mol_per_L_per_pH * 1e3, 3) : "",
                         computed ? fixed(r.osmolarity_mOsm_per_L, 1) : "", computed ? fixed(r.pH_at_5C, 2) : "",
                         computed ? fixed(r.pH_at_40C, 2) : "", computed ? r.drug_solid : ""});
    }
    tables.push_back(st);
  }
  if (d.recipe) {
    const Recipe& r = *d.recipe;
    ReportTable rt{"recipe.csv",
                   "Recipe: " + r.buffer_name + " " + sig(r.conc_mol_per_L * 1e3, 3) + " mM, pH " + fixed(r.target_pH, 2) + ", " +
                       sig(r.volume_L * 1e3, 4) + " mL at " + fixed(r.temperature_C, 1) + " °C",
                   {"reagent", "role", "formula", "conc (mM)", "amount (mmol)", "mass (g)", "volume (mL)"}, {}};
    for (const RecipeReagent& g : r.reagents) {
      rt.rows.push_back({g.id, g.role, g.formula, sig(g.conc_mol_per_L * 1e3, 4), sig(g.amount_mol * 1e3, 4), fixed(g.mass_g, 4), ""});
    }
    if (r.titrant) {
      rt.rows.push_back({r.titrant->id, "titrant " + sig(r.titrant->conc_mol_per_L, 3) + " mol/L", "", "",
                         sig(r.titrant->amount_mol * 1e3, 4), "", fixed(r.titrant->volume_mL, 3)});
    }
    rt.rows.push_back({"water", "to volume", "H2O", "", "", "", sig(r.volume_L * 1e3, 4)});
    tables.push_back(rt);
    ReportTable rs{"recipe-solution.csv", "The buffer as made (computed)", {"quantity", "value", "unit"}, {}};
    rs.rows.push_back({"pH", fixed(r.pH, 3), ""});
    rs.rows.push_back({"ionic strength", sig(r.ionic_strength_mol_per_L, 4), "mol/L"});
    rs.rows.push_back({"buffer capacity", sig(r.capacity_mol_per_L_per_pH * 1e3, 4), "mM per pH"});
    rs.rows.push_back({"osmolarity, ideal", fixed(r.osmolarity_mOsm_per_L, 1), "mOsm/L"});
    rs.rows.push_back({"osmolality estimate (to be measured)", fixed(r.osmolality_estimate_mOsm_per_kg, 1), "mOsm/kg"});
    tables.push_back(rs);
  }
  if (d.dilution) {
    const DilutionResult& dl = *d.dilution;
    ReportTable t{"dilution.csv", "The formulation diluted into " + dl.medium_name + " at " + fixed(dl.temperature_C, 1) + " °C",
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

std::string table_csv(const ReportTable& t) {
  std::ostringstream out;
  write_csv_row(out, t.header);
  for (const auto& r : t.rows) write_csv_row(out, r);
  return out.str();
}

// ---------------------------------------------------------------------------------------------
// HTML

namespace {

// The caution text without its leading "Caution: ", first letter capitalised (the box has
// its own heading).
std::string caution_sentences() {
  std::string s = caution_text();
  const std::string prefix = "Caution: ";
  if (s.rfind(prefix, 0) == 0) s = s.substr(prefix.size());
  if (!s.empty() && s[0] >= 'a' && s[0] <= 'z') s[0] = static_cast<char>(s[0] - 'a' + 'A');
  return s;
}

struct Section {
  std::string id;
  std::string title;
};

svg::Chart profile_chart(const ReportData& d) {
  const Compound& c = d.compound;
  const double mm = d.free_molar_mass_g_per_mol;
  svg::Chart ch;
  ch.id = "chart-profile";
  ch.title = "pH-solubility of " + c.name + " in water at " + fixed(d.request.temperature_C, 1) + " °C";
  ch.x = {"pH", d.request.profile_from_pH, d.request.profile_to_pH, svg::Scale::kLinear, 1.0, 0};
  double lo = 1e300, hi = 0;
  svg::Series model{"model (Davies activities, salt limits)", {}, {}, svg::SeriesKind::kLine, 0, 3.0, true};
  svg::Series ideal{"Henderson-Hasselbalch, ideal (no salt limit)", {}, {}, svg::SeriesKind::kLine, 6, 2.0};
  for (const ProfilePoint& s : d.profile.points) {
    model.x.push_back(s.pH);
    model.y.push_back(s.solubility_mol_per_L);
    ideal.x.push_back(s.pH);
    ideal.y.push_back(s.ideal_solubility_mol_per_L);
    if (s.solubility_mol_per_L > 0) {
      lo = std::min(lo, s.solubility_mol_per_L);
      hi = std::max(hi, s.solubility_mol_per_L);
    }
  }
  ch.series.push_back(model);
  ch.series.push_back(ideal);
  if (!c.measured.empty()) {
    svg::Series meas{"measured (compound file)", {}, {}, svg::SeriesKind::kMarkers, 1};
    for (const MeasuredPoint& m : c.measured) {
      meas.x.push_back(m.pH);
      meas.y.push_back(m.solubility_mol_per_L);
      lo = std::min(lo, m.solubility_mol_per_L);
      hi = std::max(hi, m.solubility_mol_per_L);
    }
    ch.series.push_back(meas);
  }
  if (d.uncertainty) {
    const ProfileBands& b = *d.uncertainty;
    svg::Series p05{"5th and 95th percentiles (Monte Carlo, " + std::to_string(b.samples) + " samples)", {}, {},
                    svg::SeriesKind::kLine, 5, 1.5};
    svg::Series p95{"", {}, {}, svg::SeriesKind::kLine, 5, 1.5};
    for (std::size_t i = 0; i < b.pH.size(); ++i) {
      p05.x.push_back(b.pH[i]);
      p05.y.push_back(std::pow(10.0, b.p05_log10_mol_per_L[i]));
      p95.x.push_back(b.pH[i]);
      p95.y.push_back(std::pow(10.0, b.p95_log10_mol_per_L[i]));
    }
    ch.series.push_back(p05);
    ch.series.push_back(p95);
  }
  const double dose = d.request.dose_mol_per_L;
  if (dose > 0) {
    lo = std::min(lo, dose);
    hi = std::max(hi, dose);
  }
  if (!(hi > 0)) {
    lo = 1e-6;
    hi = 1;
  }
  const double ylo = std::pow(10.0, std::floor(std::log10(lo) - 0.3));
  const double yhi = std::min(std::pow(10.0, std::ceil(std::log10(hi) + 0.3)), 100.0);
  ch.y = {"solubility (mol/L)", ylo, std::max(yhi, ylo * 100), svg::Scale::kLog10};
  ch.y2 = svg::SecondaryAxis{"solubility (mg/mL, as free form)", mm};
  int tint = 0;
  std::map<std::string, int> tints;
  for (const Run& r : salt_runs(d.profile.points)) {
    if (!tints.count(r.solid)) tints[r.solid] = tint++;
    ch.bands.push_back(svg::Band{svg::Band::Orientation::kVertical, r.from, r.to, r.solid + " limits", tints[r.solid]});
  }
  // The target first, so a pHmax line at the same pH is drawn over it.
  if (d.request.target_pH) {
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, *d.request.target_pH,
                                    "target pH " + fixed(*d.request.target_pH, 2), 2, false, false});
  }
  for (const PhMax& p : d.profile.ph_max) {
    if (!p.on_profile) continue;
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, p.pH, "pHmax " + fixed(p.pH, 2) + " (" + p.salt + ")",
                                    1, true, false});
  }
  if (dose > 0) {
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kHorizontal, dose,
                                    "dose " + d.request.dose_text + " (" + form_label(d.request.form) + ") = " +
                                        mg_per_mL(dose, mm) + " mg/mL free form",
                                    7, true, true});
  }
  std::ostringstream desc;
  desc << "Log-scale chart of the solubility of " << c.name << " against pH from " << fixed(d.request.profile_from_pH, 1)
       << " to " << fixed(d.request.profile_to_pH, 1) << ". The model solubility ranges from " << sig(lo, 3) << " to "
       << sig(hi, 3) << " mol/L.";
  for (const PhMax& p : d.profile.ph_max) {
    if (p.on_profile) desc << " pHmax of the " << p.salt << " is " << fixed(p.pH, 2) << ".";
  }
  for (const SaltTransition& t : d.profile.salt_transitions) {
    desc << " Below pH " << fixed(t.pH, 2) << " the " << t.below << " limits instead of the " << t.above << ".";
  }
  if (dose > 0) desc << " The dose, " << sig(dose, 3) << " mol/L, is drawn as a horizontal line.";
  ch.description = desc.str();
  return ch;
}

svg::Chart species_chart(const ReportData& d) {
  const Compound& c = d.compound;
  svg::Chart ch;
  ch.id = "chart-species";
  ch.title = "Species of " + c.name + " against pH at " + fixed(d.request.temperature_C, 1) + " °C";
  ch.x = {"pH", d.request.profile_from_pH, d.request.profile_to_pH, svg::Scale::kLinear, 1.0, 0};
  ch.y = {"fraction of dissolved drug", 0.0, 1.0, svg::Scale::kLinear, 0.2, 1};
  ch.plot_height = 260;
  const int nsp = static_cast<int>(c.system.pkas.size()) + 1;
  const int neutral = c.system.neutral_index();
  for (int j = 0; j < nsp; ++j) {
    const int z = c.system.charge_of(j);
    std::string name = pretty_species(c.system.species_label(j)) + " (charge " + (z > 0 ? "+" : "") + std::to_string(z) +
                       (j == neutral ? ", neutral form" : "") + ")";
    svg::Series s{name, {}, {}, svg::SeriesKind::kLine, j, 2.5};
    for (const ProfilePoint& p : d.profile.points) {
      s.x.push_back(p.pH);
      s.y.push_back(j < static_cast<int>(p.fractions.size()) ? p.fractions[j] : NAN);
    }
    ch.series.push_back(s);
  }
  for (std::size_t i = 0; i < c.system.pkas.size(); ++i) {
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, c.system.pkas[i].at(d.request.temperature_C),
                                    "pKa" + std::to_string(i + 1) + " " + fixed(c.system.pkas[i].at(d.request.temperature_C), 2),
                                    6, true, false});
  }
  ch.description = "Fractions of the " + std::to_string(nsp) + " protonation states of " + c.name +
                   " in its saturated solution against pH; curves cross at the pKa values.";
  return ch;
}

const ScreenResult* leading_buffer(const ReportData& d) {
  if (!d.screen) return nullptr;
  for (const ScreenResult& r : d.screen->results) {
    if (r.status == ScreenStatus::kOk) return &r;
  }
  return nullptr;
}

svg::Chart drift_chart(const ReportData& d) {
  svg::Chart ch;
  ch.id = "chart-drift";
  const double target = *d.request.target_pH, tol = d.request.tolerance_pH;
  ch.title = "pH after the dose against buffer strength (target pH " + fixed(target, 2) + ")";
  double cmin = 1e300, cmax = 0, plo = target - 3 * tol, phi = target + 3 * tol;
  for (const DriftCurve& c : d.drift) {
    svg::Series s{c.name, {}, {}, svg::SeriesKind::kLineAndMarkers, -1, 2.25};
    for (std::size_t i = 0; i < c.conc_mol_per_L.size(); ++i) {
      s.x.push_back(c.conc_mol_per_L[i] * 1e3);
      s.y.push_back(c.pH_after_drug[i]);
      cmin = std::min(cmin, c.conc_mol_per_L[i] * 1e3);
      cmax = std::max(cmax, c.conc_mol_per_L[i] * 1e3);
      if (std::isfinite(c.pH_after_drug[i])) {
        plo = std::min(plo, c.pH_after_drug[i]);
        phi = std::max(phi, c.pH_after_drug[i]);
      }
    }
    ch.series.push_back(s);
  }
  plo = std::max(plo, target - 2.0);
  phi = std::min(phi, target + 2.0);
  const double span = phi - plo;
  const double step = span > 2.0 ? 0.5 : span > 1.0 ? 0.2 : span > 0.4 ? 0.1 : 0.05;
  ch.x = {"buffer concentration (mM, log scale)", std::pow(10.0, std::floor(std::log10(cmin))),
          std::pow(10.0, std::ceil(std::log10(cmax) - 1e-9)), svg::Scale::kLog10};
  ch.y = {"pH after the dose", std::floor(plo / step) * step, std::ceil(phi / step) * step, svg::Scale::kLinear, step};
  ch.plot_height = 280;
  ch.bands.push_back(svg::Band{svg::Band::Orientation::kHorizontal, target - tol, target + tol,
                               "target pH " + fixed(target, 2) + " ± " + fixed(tol, 2), 1, 0.30});
  if (const ScreenResult* lead = leading_buffer(d)) {
    if (lead->recommended_conc_mol_per_L) {
      ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kVertical, *lead->recommended_conc_mol_per_L * 1e3,
                                      lead->name + " " + sig(*lead->recommended_conc_mol_per_L * 1e3, 3) +
                                          " mM (set by " + lead->binding + ")",
                                      7, true, true});
    }
  }
  ch.description = "pH reached after adding the dose to each leading buffer prepared at the target pH, against the "
                   "buffer concentration; the shaded band is the accepted tolerance.";
  return ch;
}

void key(std::ostream& out, const std::string& cls, const std::string& label, const std::string& value,
         const std::string& detail, const std::string& where) {
  out << "<div class=\"key" << (cls.empty() ? "" : " " + cls) << "\"><div class=\"label\">" << esc(label)
      << "</div><div class=\"value\">" << esc(value) << "</div><div class=\"detail\">" << esc(detail) << "</div>";
  if (!where.empty()) out << "<div class=\"where\">" << esc(where) << "</div>";
  out << "</div>\n";
}

}  // namespace

void write_report_html(const ReportData& d, const std::string& csv_folder, std::ostream& out) {
  const Compound& c = d.compound;
  const double T = d.request.temperature_C;
  const double mm = d.free_molar_mass_g_per_mol;
  const std::vector<ReportTable> tables = report_tables(d);

  std::vector<Section> sections = {{"summary", "Summary"}, {"compound", "Compound data"},
                                   {"profile", "pH-solubility"}, {"species", "Species distribution"}};
  if (d.dose_in_water) sections.push_back({"dose-in-water", "The dose in water"});
  if (d.classification) sections.push_back({"classification", "Solubility classification (ICH M9)"});
  if (d.screen) sections.push_back({"screen", "Buffer screen"});
  if (d.recipe) sections.push_back({"recipe", "Recipe of the leading buffer"});
  if (d.dilution) sections.push_back({"dilution", "Dilution"});
  if (d.uncertainty) sections.push_back({"uncertainty", "Uncertainty"});
  if (d.fit) sections.push_back({"fit", "Fit to the measured solubilities"});
  sections.push_back({"methods", "Methods, assumptions and references"});
  sections.push_back({"traceability", "Traceability"});
  auto number = [&](const std::string& id) {
    for (std::size_t i = 0; i < sections.size(); ++i) {
      if (sections[i].id == id) return "section " + std::to_string(i + 1);
    }
    return std::string("below");
  };
  auto heading = [&](const std::string& id) {
    for (std::size_t i = 0; i < sections.size(); ++i) {
      if (sections[i].id == id) {
        out << "<h2><span class=\"num\">" << i + 1 << "</span>" << esc(sections[i].title) << "</h2>\n";
        return;
      }
    }
  };

  out << "<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\" xml:lang=\"en\">\n<head>\n"
      << "<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n"
      << "<meta name=\"generator\" content=\"pkarta " << esc(d.provenance.tool_version) << "\"/>\n"
      << "<title>Preformulation report: " << esc(c.name) << " (" << esc(c.id) << ")</title>\n<style>" << kCss
      << "</style>\n</head>\n<body>\n";

  out << "<header class=\"report-head\"><h1>Preformulation report: " << esc(c.name) << "</h1>\n<p>Compound id <code>"
      << esc(c.id) << "</code> · " << fixed(T, 1) << " °C · " << esc(d.provenance.date_utc) << " · pkarta "
      << esc(d.provenance.tool_version) << "</p></header>\n";

  // Summary: the key numbers first, each saying where to find it.
  out << "<section id=\"summary\">\n";
  heading("summary");
  out << "<div class=\"key-numbers\">\n";
  if (d.request.dose_mol_per_L > 0) {
    key(out, "lead", "Dose", d.request.dose_text + " " + form_label(d.request.form),
        sig(d.request.dose_mol_per_L, 3) + " mol/L = " + mg_per_mL(d.request.dose_mol_per_L, mm) + " mg/mL as free form",
        "Bold dashed black line across the pH-solubility chart (" + number("profile") + ").");
  } else {
    key(out, "", "Dose", "not given", "Give --dose to draw the dose line and judge the dose in water.", "");
  }
  std::vector<const PhMax*> shown_ph_max;  // the pHmax values where the profile's solid changes
  for (const PhMax& m : d.profile.ph_max) {
    if (m.on_profile) shown_ph_max.push_back(&m);
  }
  if (!shown_ph_max.empty()) {
    std::string v, det;
    for (std::size_t i = 0; i < shown_ph_max.size(); ++i) {
      v += (i ? " / " : "") + fixed(shown_ph_max[i]->pH, 2);
      det += (i ? "; " : "") + shown_ph_max[i]->salt;
    }
    det += " in water, pH held by HCl or NaOH";
    for (const SaltTransition& t : d.profile.salt_transitions) {
      det += "; the " + t.below + " limits below pH " + fixed(t.pH, 2);
    }
    key(out, "lead", "pHmax", v, det,
        "Vermillion dashed vertical line on the pH-solubility chart (" + number("profile") + ").");
  } else {
    key(out, "", "pHmax", "none", "No salt limits the solubility in water with HCl or NaOH over the pH range shown.", "");
  }
  if (!d.screen) {
    key(out, "", "Recommended buffer", "not screened",
        "Give a dose (--dose) and a target pH (--target-ph) to screen the buffers of the library.", "");
  }
  if (d.screen) {
    const ScreenReport& sr = *d.screen;
    const ScreenResult* lead = leading_buffer(d);
    if (lead && lead->recommended_conc_mol_per_L) {
      key(out, "lead", "Recommended buffer", lead->name + " " + sig(*lead->recommended_conc_mol_per_L * 1e3, 3) + " mM",
          "Strength set by the " + lead->binding + " criterion (minimum " + sig(*lead->min_conc_mol_per_L * 1e3, 3) +
              " mM, rounded up); holds pH " + fixed(sr.target_pH, 2) + " ± " + fixed(sr.tolerance_pH, 2) +
              " with the dose: pH " + fixed(lead->pH_after_drug, 2) + " (" + fixed(lead->pH_at_5C, 2) + " at " +
              fixed(sr.low_temperature_C, 0) + " °C, " + fixed(lead->pH_at_40C, 2) + " at " +
              fixed(sr.high_temperature_C, 0) + " °C)",
          "Highlighted first row of the buffer screen (" + number("screen") + ").");
    } else {
      key(out, "lead", "Recommended buffer", "none",
          "No screened buffer holds pH " + fixed(sr.target_pH, 2) + " ± " + fixed(sr.tolerance_pH, 2) + " with this dose.",
          "Buffer screen (" + number("screen") + ").");
    }
    key(out, "", "Solubility at target pH", sig(sr.solubility_at_target_mol_per_L * mm, 3) + " mg/mL",
        sig(sr.solubility_at_target_mol_per_L, 3) + " mol/L in water at pH " + fixed(sr.target_pH, 2) +
            (sr.solubility_at_target_mol_per_L >= sr.dose_mol_per_L ? ": the dose dissolves" : ": below the dose"),
        "Green vertical line on the pH-solubility chart.");
  }
  if (d.dilution) {
    const DilutionResult& dl = *d.dilution;
    std::string first;
    double worst = 0.0;
    for (const DilutionPoint& p : dl.points) {
      if (p.risk && first.empty()) first = ratio_text(p.ratio);
      worst = std::max(worst, p.supersaturation_ratio);
    }
    key(out, first.empty() ? "" : "lead", "Dilution into " + dl.medium_name, first.empty() ? "no precipitation risk" : first == "1:1" ? "risk undiluted" : "risk from " + first,
        "Highest supersaturation ratio " + sig(worst, 3) + " (above 1: may precipitate)", "Dilution (" + number("dilution") + ").");
  }
  if (d.classification) {
    const ClassifyResult& cr = *d.classification;
    key(out, "", "Solubility class (ICH M9)", cr.verdict == "high" ? "highly soluble" : "not highly soluble",
        sig(cr.dose_mg, 4) + " mg needs " + sig(cr.dose_solubility_volume_mL, 3) + " mL at the lowest solubility (pH " +
            fixed(cr.min_at_pH, 2) + ", " + fixed(cr.temperature_C, 0) + " °C); the limit is " + fixed(cr.volume_mL, 0) + " mL",
        "Classification (" + number("classification") + ").");
  }
  if (c.has_intrinsic_solubility) {
    key(out, "", "Intrinsic solubility", sig(c.s0_at(T) * mm, 3) + " mg/mL",
        sig(c.s0_at(T), 3) + " mol/L, free form at " + fixed(T, 1) + " °C", "Compound data (" + number("compound") + ").");
  }
  if (d.dose_in_water && d.dose_in_water->equilibrium.drug) {
    const Equilibrium& e = d.dose_in_water->equilibrium;
    const bool solid = e.drug->solid != "none";
    key(out, solid ? "lead" : "", "Dose in water alone", "pH " + fixed(e.pH, 2),
        solid ? "Not all dissolves: " + e.drug->solid + " remains (" + sig(e.drug->dissolved_mg_per_mL, 3) +
                    " mg/mL dissolved)"
              : "All of the dose dissolves (saturation ratio " + sig(e.drug->saturation_ratio, 3) + ")",
        "The dose in water (" + number("dose-in-water") + ").");
  }
  out << "</div>\n";
  out << "</section>\n";

  // Caution.
  out << "<div class=\"caution\" id=\"caution\" role=\"note\"><div class=\"sign\" aria-hidden=\"true\">!</div><p><strong>"
         "Caution.</strong> "
      << esc(caution_sentences()) << "</p></div>\n";
  if (!d.warnings.empty()) {
    out << "<ul class=\"warnings\">";
    for (const std::string& w : d.warnings) out << "<li>" << esc(w) << "</li>";
    out << "</ul>\n";
  }

  out << "<nav class=\"contents\" aria-label=\"contents\"><strong>Contents</strong><ol>";
  for (const Section& s : sections) out << "<li><a href=\"#" << s.id << "\">" << esc(s.title) << "</a></li>";
  out << "</ol></nav>\n";

  // Compound data.
  out << "<section id=\"compound\">\n";
  heading("compound");
  if (!c.description.empty()) out << "<p>" << esc(c.description) << "</p>\n";
  for (const char* f : {"compound.csv", "pka.csv", "salts.csv"}) {
    if (const ReportTable* t = find_table(tables, f)) write_table_html(*t, out, csv_folder);
  }
  out << "<p class=\"muted\">A salt given by its solubility in water has its Ksp (activity product) derived from the salt "
         "dissolved in pure water at the pH it sets itself, at the salt's temperature.</p>\n";
  out << "</section>\n";

  // Profile.
  out << "<section id=\"profile\">\n";
  heading("profile");
  out << "<figure>\n";
  svg::write_svg(profile_chart(d), out);
  out << "<figcaption><strong>How to read it.</strong> Solubility on a log scale: mol/L on the left axis, mg/mL of free "
         "form on the right. The thick blue line is the model; the grey dotted line the ideal Henderson-Hasselbalch "
         "curve without salt limits. Shaded pH ranges are limited by a salt (its name is written in the band); "
         "elsewhere the free form limits. Where the dose line lies above the blue line, the dose does not dissolve at "
         "that pH.";
  if (!c.measured.empty()) out << " Squares are the shake-flask points of the compound file.";
  if (d.uncertainty) out << " The thin sky-blue lines bound 90 % of the Monte Carlo samples (" << number("uncertainty") << ").";
  out << "</figcaption>\n</figure>\n";
  if (const ReportTable* t = find_table(tables, "phmax.csv")) {
    if (!t->rows.empty()) write_table_html(*t, out, csv_folder);
  }
  if (!d.profile.notes.empty()) {
    out << "<ul class=\"notes\">";
    for (const std::string& n : d.profile.notes) out << "<li>" << esc(n) << "</li>";
    out << "</ul>\n";
  }
  if (const ReportTable* t = find_table(tables, "profile.csv")) {
    std::vector<std::size_t> rows;
    for (std::size_t i = 0; i < d.profile.points.size(); ++i) {
      const double x = d.profile.points[i].pH * 2.0;
      if (std::fabs(x - std::round(x)) < 1e-6) rows.push_back(i);
    }
    write_table_html(*t, out, csv_folder, &rows,
                     "Every 0.5 pH shown; the CSV holds every " + fixed(d.request.profile_step_pH, 2) + " pH.");
  }
  out << "</section>\n";

  // Species.
  out << "<section id=\"species\">\n";
  heading("species");
  out << "<figure>\n";
  svg::write_svg(species_chart(d), out);
  out << "<figcaption><strong>How to read it.</strong> Share of each protonation state of the dissolved drug; the "
         "grey dashed vertical lines mark the pKa values at "
      << fixed(T, 1)
      << " °C. The fractions are in the profile CSV.</figcaption>\n</figure>\n";
  out << "</section>\n";

  if (d.dose_in_water) {
    out << "<section id=\"dose-in-water\">\n";
    heading("dose-in-water");
    out << "<p>The dose dissolved in water with nothing else (no buffer, no pH adjustment), at " << fixed(T, 1)
        << " °C: the pH it sets itself and what stays undissolved.</p>\n";
    if (const ReportTable* t = find_table(tables, "dose-in-water.csv")) write_table_html(*t, out, csv_folder);
    out << "</section>\n";
  }

  if (d.classification) {
    const ClassifyResult& cr = *d.classification;
    out << "<section id=\"classification\">\n";
    heading("classification");
    out << "<p class=\"lead-statement\"><strong>" << (cr.verdict == "high" ? "Highly soluble" : "Not highly soluble")
        << "</strong> after " << esc(cr.guideline) << ": the highest dose, " << esc(sig(cr.dose_mg, 4)) << " mg of "
        << esc(form_label(cr.form)) << ", needs " << esc(sig(cr.dose_solubility_volume_mL, 3))
        << " mL at the lowest solubility over pH " << fixed(cr.from_pH, 1) << "-" << fixed(cr.to_pH, 1) << " (" << esc(sig(cr.min_solubility_mg_per_mL, 3))
        << " mg/mL at pH " << fixed(cr.min_at_pH, 2) << "); the guideline allows " << fixed(cr.volume_mL, 0) << " mL.</p>\n";
    for (const char* f : {"classification-summary.csv", "classification.csv", "classification-media.csv"}) {
      if (const ReportTable* t = find_table(tables, f)) write_table_html(*t, out, csv_folder);
    }
    if (!cr.notes.empty() || !cr.convention.empty()) {
      out << "<ul class=\"notes\">";
      if (!cr.convention.empty()) out << "<li>" << esc(cr.convention) << "</li>";
      for (const std::string& n : cr.notes) out << "<li>" << esc(n) << "</li>";
      out << "</ul>\n";
    }
    out << "</section>\n";
  }

  if (d.screen) {
    const ScreenReport& sr = *d.screen;
    out << "<section id=\"screen\">\n";
    heading("screen");
    out << "<p>Each buffer is prepared alone at the target pH (its net-neutral form plus HCl or NaOH), then the dose is "
           "added and the closed system equilibrated. The minimum concentration is the weakest buffer that meets every "
           "criterion: the pH after the dose within the tolerance"
        << (sr.challenge_mol_per_L > 0 ? ", and after " + sig(sr.challenge_mol_per_L * 1e3, 3) +
                                             " mM of strong acid or of strong base added to the formulation"
                                       : std::string())
        << "; the recommended strength is that rounded up to the 1-2-5 series in mM (set by: the criterion that "
           "decides). Buffers are ranked by the minimum concentration, then by their pH change between "
        << fixed(sr.low_temperature_C, 0) << " and " << fixed(sr.high_temperature_C, 0) << " °C.</p>\n";
    if (const ScreenResult* lead = leading_buffer(d)) {
      out << "<p class=\"lead-statement\"><strong>Leading buffer: " << esc(lead->name) << " at "
          << esc(sig(lead->recommended_conc_mol_per_L.value_or(lead->conc_used_mol_per_L) * 1e3, 3)) << " mM"
          << "</strong> (set by " << esc(lead->binding) << "), brought to pH " << fixed(sr.target_pH, 2)
          << " with " << esc(lead->titrant.empty() ? std::string("no titrant") : lead->titrant) << "; pH after the dose "
          << fixed(lead->pH_after_drug, 2) << ", osmolarity " << fixed(lead->osmolarity_mOsm_per_L, 1)
          << " mOsm/L (ideal).</p>\n";
    } else {
      out << "<p class=\"lead-statement\"><strong>No buffer holds the target with this dose.</strong></p>\n";
    }
    if (const ReportTable* t = find_table(tables, "screen.csv")) {
      // Buffers with no pKa near the target are named below the table, not given a row each.
      std::vector<std::size_t> rows;
      std::vector<std::string> outside;
      for (std::size_t i = 0; i < sr.results.size(); ++i) {
        if (sr.results[i].status == ScreenStatus::kOutsideRange) outside.push_back(sr.results[i].name + " (pKa " + fixed(sr.results[i].nearest_pka, 2) + ")");
        else rows.push_back(i);
      }
      write_table_html(*t, out, csv_folder, &rows,
                       "Status: ok; not-achievable (even the maximum strength drifts too far); dose-not-soluble (the "
                       "dose exceeds the solubility at the target pH).",
                       leading_buffer(d) ? 0 : -1);
      if (!outside.empty()) {
        out << "<p class=\"muted\">Not screened further, no pKa within 1 of the target (outside-range; in the CSV): ";
        for (std::size_t i = 0; i < outside.size(); ++i) out << (i ? ", " : "") << esc(outside[i]);
        out << ".</p>\n";
      }
    }
    if (!d.drift.empty()) {
      out << "<figure>\n";
      svg::write_svg(drift_chart(d), out);
      out << "<figcaption><strong>How to read it.</strong> Each line is one leading buffer: the pH it reaches once the "
             "dose is dissolved, against its concentration. Where a line enters the shaded band the buffer holds the "
             "target; the black line marks the strength recommended for the leading buffer, which may lie above where its line enters the band when another criterion (a challenge, the dose range) decides.</figcaption>\n</figure>\n";
    }
    out << "</section>\n";
  }

  if (d.recipe) {
    const Recipe& r = *d.recipe;
    out << "<section id=\"recipe\">\n";
    heading("recipe");
    out << "<p class=\"lead-statement\"><strong>" << esc(r.buffer_name) << " " << esc(sig(r.conc_mol_per_L * 1e3, 3))
        << " mM, pH " << fixed(r.target_pH, 2) << "</strong>: the leading buffer at the strength the screen recommends"
        << (leading_buffer(d) ? " (set by the " + leading_buffer(d)->binding + " criterion)" : std::string())
        << (r.isotonic ? std::string(", made isotonic with ") + (d.recipe_tonicity_note.empty() ? "sodium chloride" : "dextrose") +
                             " (osmolality estimated, to be measured)"
                       : std::string())
        << ". The buffer alone, before the drug is added.</p>\n";
    for (const char* f : {"recipe.csv", "recipe-solution.csv"}) {
      if (const ReportTable* t = find_table(tables, f)) write_table_html(*t, out, csv_folder);
    }
    if (!r.notes.empty() || !r.warnings.empty() || !r.tonicity_method.empty()) {
      out << "<ul class=\"notes\">";
      if (!d.recipe_tonicity_note.empty()) out << "<li>" << esc(d.recipe_tonicity_note) << "</li>";
      // The recipe's own sentence names NaCl; with another tonicity reagent the note above says it.
      if (!r.tonicity_method.empty() && d.recipe_tonicity_note.empty()) out << "<li>" << esc(r.tonicity_method) << "</li>";
      for (const std::string& n : r.notes) out << "<li>" << esc(n) << "</li>";
      for (const std::string& n : r.warnings) out << "<li class=\"warning\">" << esc(n) << "</li>";
      out << "</ul>\n";
    }
    out << "</section>\n";
  }

  if (d.dilution) {
    const DilutionResult& dl = *d.dilution;
    out << "<section id=\"dilution\">\n";
    heading("dilution");
    std::vector<std::string> risky;
    for (const DilutionPoint& p : dl.points) {
      if (p.risk) risky.push_back(ratio_text(p.ratio));
    }
    out << "<p class=\"lead-statement\"><strong>"
        << (risky.empty() ? "No precipitation risk" : "Precipitation risk at " + esc(risky.front()) +
                                                          (risky.size() > 1 ? " to " + esc(risky.back()) : std::string()))
        << "</strong> when the formulation (recipe above with the dose) is diluted into " << esc(dl.medium_name)
        << ": the supersaturation ratio is the drug concentration over the solubility of the least soluble solid, "
           "with the whole dose dissolved.</p>\n";
    svg::Chart ch;
    ch.id = "chart-dilution";
    ch.title = "Supersaturation on dilution into " + dl.medium_name;
    double lo = 1.0, hi = 1.0, rmax = 1.0;
    svg::Series ss{"supersaturation ratio", {}, {}, svg::SeriesKind::kLineAndMarkers, 0, 2.5};
    for (const DilutionPoint& p : dl.points) {
      ss.x.push_back(p.ratio);
      ss.y.push_back(p.supersaturation_ratio);
      rmax = std::max(rmax, p.ratio);
      if (p.supersaturation_ratio > 0 && std::isfinite(p.supersaturation_ratio)) {
        lo = std::min(lo, p.supersaturation_ratio);
        hi = std::max(hi, p.supersaturation_ratio);
      }
    }
    ch.series.push_back(ss);
    ch.x = {"dilution (total volume / formulation volume, log scale)", 1.0, std::pow(10.0, std::ceil(std::log10(rmax) - 1e-9)),
            svg::Scale::kLog10};
    ch.y = {"supersaturation ratio (log scale)", std::pow(10.0, std::floor(std::log10(lo) - 0.2)),
            std::pow(10.0, std::ceil(std::log10(hi) + 0.2)), svg::Scale::kLog10};
    ch.plot_height = 240;
    ch.bands.push_back(svg::Band{svg::Band::Orientation::kHorizontal, 1.0, ch.y.max, "precipitation possible", 2, 0.25});
    ch.lines.push_back(svg::RefLine{svg::RefLine::Orientation::kHorizontal, 1.0, "saturation (ratio 1)", 7, true, false});
    ch.description = "Supersaturation ratio of the drug against the dilution ratio into " + dl.medium_name +
                     "; above 1 the drug may precipitate.";
    out << "<figure>\n";
    svg::write_svg(ch, out);
    out << "<figcaption><strong>How to read it.</strong> Points in the shaded area (ratio above 1) may precipitate "
           "on dilution; the table gives the pH and what would remain dissolved at equilibrium.</figcaption>\n</figure>\n";
    if (const ReportTable* t = find_table(tables, "dilution.csv")) write_table_html(*t, out, csv_folder);
    if (!dl.notes.empty()) {
      out << "<ul class=\"notes\">";
      for (const std::string& n : dl.notes) out << "<li>" << esc(n) << "</li>";
      out << "</ul>\n";
    }
    out << "</section>\n";
  }

  if (d.uncertainty) {
    const ProfileBands& b = *d.uncertainty;
    out << "<section id=\"uncertainty\">\n";
    heading("uncertainty");
    double widest = 0.0, at = 0.0;
    for (std::size_t i = 0; i < b.pH.size(); ++i) {
      const double w = b.p95_log10_mol_per_L[i] - b.p05_log10_mol_per_L[i];
      if (w > widest) {
        widest = w;
        at = b.pH[i];
      }
    }
    out << "<p>The pKa values and the intrinsic solubility are drawn " << b.samples
        << " times from normal distributions with the standard uncertainties of the compound file (salt Ksp held); "
           "the thin sky-blue lines on the pH-solubility chart are the 5th and 95th percentiles. The band is widest at pH "
        << fixed(at, 2) << ", a factor " << esc(sig(std::pow(10.0, widest), 3)) << " between them.</p>\n";
    if (const ReportTable* t = find_table(tables, "uncertainty.csv")) {
      std::vector<std::size_t> rows;
      for (std::size_t i = 0; i < b.pH.size(); ++i) {
        if (std::fabs(b.pH[i] - std::round(b.pH[i])) < 1e-6) rows.push_back(i);
      }
      write_table_html(*t, out, csv_folder, &rows, "Every 1 pH shown; the CSV holds every " + fixed(d.request.uncertainty_step_pH, 2) + " pH.");
    }
    out << "</section>\n";
  }

  if (d.fit) {
    const FitResult& f = *d.fit;
    out << "<section id=\"fit\">\n";
    heading("fit");
    out << "<p>The constants are fitted to the shake-flask points of the compound file by weighted least squares in "
           "log10 solubility (Levenberg-Marquardt); root-mean-square residual "
        << esc(fixed(f.rms_log10, 3)) << " log10 units over " << f.residuals.size() << " points. "
        << (f.usable() ? "The report's other sections use the constants as given in the file, not these estimates."
                       : "The fit did not converge; its numbers are shown for inspection only.")
        << "</p>\n";
    for (const char* fn : {"fit.csv", "fit-residuals.csv"}) {
      if (const ReportTable* t = find_table(tables, fn)) write_table_html(*t, out, csv_folder);
    }
    if (!f.warnings.empty()) {
      out << "<ul class=\"notes\">";
      for (const std::string& w : f.warnings) out << "<li>" << esc(w) << "</li>";
      out << "</ul>\n";
    }
    out << "</section>\n";
  }

  // Methods.
  out << "<section id=\"methods\">\n";
  heading("methods");
  out << "<ul>\n"
         "<li>Species fractions from the macroscopic pKa values (Henderson-Hasselbalch form [1]) with "
         "thermodynamic constants corrected to the ionic strength by the Davies equation [2], solved "
         "self-consistently with the pH. Above 0.5 mol/L ionic strength the Davies equation is outside its range.</li>\n"
         "<li>Temperature: pKa, Ksp and S0 by the van 't Hoff equation with constant heat capacity of ionization [3]; "
         "buffer constants from the compilation of Goldberg, Kishore and Lennen [3] as named in the library. "
         "Water: pKw after Harned and Robinson [6], density after Kell [7], dielectric constant after Malmberg and "
         "Maryott [8].</li>\n"
         "<li>Solids: the free form (net-neutral species) saturates at S0; a 1:1 salt at a(drug ion) a(X) = Ksp. "
         "pHmax is where the free-form and salt curves cross in the medium [9].</li>\n"
         "<li>Profile: at each pH the free form is in excess in water, the pH held by HCl or NaOH; a salt "
         "precipitates where its ion product would exceed Ksp, its counterion coming from the titrant.</li>\n"
         "<li>Buffer capacity as d(strong base)/d(pH) of the closed system; its ideal limit is van Slyke's [4].</li>\n"
         "<li>Solubility classification follows ICH M9 [5]: highest dose in 250 mL over pH 1.2-6.8 at 37 °C.</li>\n"
         "<li>Activity model: "
      << activity_model_label(d.request.activity)
      << ". pH means -log10 a(H+). Closed systems: no CO2 exchange with air. Not modelled: aggregation, micelles, "
         "complexation, polymorphs and hydrates of the drug, cosolvents, ion pairing, kinetics.</li>\n</ul>\n"
         "<ol class=\"refs\">\n"
         "<li>Henderson LJ (1908) Am. J. Physiol. 21, 173; Hasselbalch KA (1916) Biochem. Z. 78, 112.</li>\n"
         "<li>Davies CW (1962) Ion Association. Butterworths, London.</li>\n"
         "<li>Goldberg RN, Kishore N, Lennen RM (2002) Thermodynamic quantities for the ionization reactions of "
         "buffers. J. Phys. Chem. Ref. Data 31, 231.</li>\n"
         "<li>van Slyke DD (1922) On the measurement of buffer values. J. Biol. Chem. 52, 525.</li>\n"
         "<li>ICH M9 (2019) Biopharmaceutics classification system-based biowaivers.</li>\n"
         "<li>Harned HS, Robinson RA (1940) Trans. Faraday Soc. 36, 973.</li>\n"
         "<li>Kell GS (1975) J. Chem. Eng. Data 20, 97.</li>\n"
         "<li>Malmberg CG, Maryott AA (1956) J. Res. Natl. Bur. Stand. 56, 1.</li>\n"
         "<li>Kramer SF, Flynn GL (1972) Solubility of organic hydrochlorides. J. Pharm. Sci. 61, 1896.</li>\n"
         "</ol>\n</section>\n";

  // Traceability.
  out << "<section id=\"traceability\">\n";
  heading("traceability");
  const Provenance& p = d.provenance;
  out << "<dl class=\"trace\">\n<dt>tool</dt><dd>pkarta " << esc(p.tool_version) << "</dd>\n<dt>library</dt><dd>"
      << esc(p.library_id) << " version " << esc(p.library_version) << "</dd>\n<dt>date (UTC)</dt><dd>"
      << esc(p.date_utc) << "</dd>\n<dt>temperature</dt><dd>" << fixed(T, 1) << " °C</dd>\n<dt>activity model</dt><dd>"
      << (d.request.activity == ActivityModel::kIdeal ? "ideal" : activity_model_label(d.request.activity))
      << "</dd>\n<dt>profile</dt><dd>pH "
      << fixed(d.request.profile_from_pH, 2) << " to " << fixed(d.request.profile_to_pH, 2) << " step "
      << fixed(d.request.profile_step_pH, 2) << ", water, HCl or NaOH</dd>\n";
  if (!p.command_line.empty()) out << "<dt>command</dt><dd><code>" << esc(p.command_line) << "</code></dd>\n";
  if (!p.buffer_sources.empty()) {
    out << "<dt>buffer data</dt><dd>";
    for (std::size_t i = 0; i < p.buffer_sources.size(); ++i) {
      out << (i ? "; " : "") << "<strong>" << esc(p.buffer_sources[i].first) << "</strong>: " << esc(p.buffer_sources[i].second);
    }
    out << "</dd>\n";
  }
  out << "</dl>\n<div class=\"table-wrap\"><table class=\"inputs\">\n<caption>Input files</caption>\n<thead><tr><th "
         "scope=\"col\">role</th><th scope=\"col\">file</th><th scope=\"col\">bytes</th><th "
         "scope=\"col\">SHA-256</th></tr></thead>\n<tbody>\n";
  for (const InputFile& f : p.inputs) {
    out << "<tr><th scope=\"row\">" << esc(f.role) << "</th><td>" << esc(f.path) << "</td><td class=\"num\">" << f.bytes
        << "</td><td class=\"hash\">" << esc(f.sha256) << "</td></tr>\n";
  }
  out << "</tbody></table></div>\n</section>\n";
  out << "<footer>Written by pkarta " << esc(p.tool_version) << ". " << esc(caution_text()) << "</footer>\n";
  out << "</body>\n</html>\n";
}

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
