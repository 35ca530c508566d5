// Rectangular tables of mix, profile, classify, fit and dilute (writers/tables.h).
#include "pkarta/writers/tables.h"

#include <cmath>

#include "pkarta/base/limits.h"
#include "pkarta/chem/water.h"

namespace pkarta {
namespace {


std::string join_words(const std::vector<std::string>& words, const char* sep = " ") {
  std::string s;
  for (const std::string& w : words) s += (s.empty() ? "" : sep) + w;
  return s;
}

}  // namespace

std::vector<TableInfo> mix_table_info() {
  return {{"state", "one row per temperature: pH, ionic strength, osmolarity, capacity, the drug's fate"},
          {"species", "one row per species and temperature: concentration and activity coefficient"},
          {"notes", "warnings and the caution"}};
}

std::vector<DataTable> mix_tables(const std::vector<MixResult>& results) {
  DataTable state{"state",
                  {"temperature_C", "pH", "ionic_strength_mol_per_L", "ionic_strength_flag", "osmolarity_mOsm_per_L",
                   "osmolality_estimate_mOsm_per_kg", "capacity_mol_per_L_per_pH", "drug_dose_mol_per_L",
                   "drug_dissolved_mol_per_L", "drug_dissolved_mg_per_mL", "drug_solid", "drug_saturation_ratio"},
                  {}};
  DataTable species{"species",
                    {"temperature_C", "species", "system", "charge", "conc_mol_per_L", "activity_coefficient"},
                    {}};
  std::vector<std::string> warnings;
  for (const MixResult& r : results) {
    const Equilibrium& e = r.equilibrium;
    const bool d = e.drug.has_value();
    state.add({full(e.temperature_C), full(e.pH), full(e.ionic_strength_mol_per_L),
               e.ionic_strength_mol_per_L > kDaviesMaxIonicStrength ? kOutsideActivityRangeFlag : "",
               full(e.osmolarity_mOsm_per_L), full(r.osmolality_estimate_mOsm_per_kg),
               full(r.capacity_mol_per_L_per_pH), d ? full(e.drug->dose_mol_per_L) : "",
               d ? full(e.drug->dissolved_mol_per_L) : "", d ? full(e.drug->dissolved_mg_per_mL) : "",
               d ? e.drug->solid : "", d ? full(e.drug->saturation_ratio) : ""});
    for (const Species& s : e.species) {
      species.add({full(e.temperature_C), s.name, s.system, std::to_string(s.charge), full(s.conc_mol_per_L),
                   full(s.activity_coefficient)});
    }
    for (const std::string& w : e.warnings) {
      warnings.push_back(results.size() > 1 ? "at " + full(e.temperature_C) + " C: " + w : w);
    }
  }
  return {state, species, notes_table({"Activity model: Davies; pH = -log10 a(H+)."}, warnings)};
}

std::vector<TableInfo> profile_table_info() {
  return {{"points", "one row per pH: solubility, ideal solubility, limiting solid, species fractions"},
          {"ph_max", "one row per salt: pHmax and the solubility there"},
          {"derived_ksp", "one row per salt whose Ksp is derived from its solubility in water"},
          {"bands", "one row per pH: Monte Carlo 5/50/95 % solubility (with --uncertainty)"},
          {"notes", "notes, warnings and the caution"}};
}

std::vector<DataTable> profile_tables(const Profile& p, const ProfileBands& bands) {
  std::vector<std::string> head = {"pH", "solubility_mol_per_L", "solubility_mg_per_mL", "solubility_flag",
                                   "ideal_solubility_mol_per_L", "ideal_solubility_flag", "limiting_solid",
                                   "ionic_strength_mol_per_L", "ionic_strength_flag", "titrant",
                                   "titrant_mol_per_L", "capped"};
  for (const std::string& s : p.species) head.push_back("fraction_" + s);
  DataTable points{"points", head, {}};
  const bool davies = p.activity == ActivityModel::kDavies;
  for (const ProfilePoint& pt : p.points) {
    std::vector<std::string> row = {
        full(pt.pH),
        full(pt.solubility_mol_per_L),
        full(pt.solubility_mg_per_mL),
        pt.capped ? kCappedFlag : "",
        full(pt.ideal_solubility_mol_per_L),
        pt.ideal_solubility_mol_per_L >= kSolubilityCap_mol_per_L ? kCappedFlag : "",
        pt.limiting_solid,
        full(pt.ionic_strength_mol_per_L),
        davies && pt.ionic_strength_mol_per_L > kDaviesMaxIonicStrength ? kOutsideActivityRangeFlag : "",
        pt.titrant_mol_per_L > 0 ? p.base_titrant : (pt.titrant_mol_per_L < 0 ? p.acid_titrant : ""),
        full(std::fabs(pt.titrant_mol_per_L)),
        boolean(pt.capped)};
    for (std::size_t i = 0; i < p.species.size(); ++i) {
      row.push_back(i < pt.fractions.size() ? full(pt.fractions[i]) : "");
    }
    points.add(row);
  }
  DataTable mx{"ph_max", {"salt", "counterion", "pH_max", "solubility_mol_per_L", "on_profile"}, {}};
  for (const PhMax& m : p.ph_max) {
    mx.add({m.salt, m.counterion, full(m.pH), full(m.solubility_mol_per_L), boolean(m.on_profile)});
  }
  DataTable dk{"derived_ksp",
               {"salt", "solubility_in_water", "solubility_in_water_mol_per_L", "temperature_C", "ksp_mol2_per_L2",
                "ksp_at_run_temperature_mol2_per_L2"},
               {}};
  for (const DerivedKsp& d : p.derived_ksp) {
    dk.add({d.salt, d.solubility_in_water, full(d.solubility_in_water_mol_per_L), full(d.reference_temperature_C),
            full(d.ksp), full(d.ksp_at_run_temperature)});
  }
  DataTable bt{"bands",
               {"pH", "solubility_mol_per_L", "solubility_p05_mol_per_L", "solubility_p50_mol_per_L",
                "solubility_p95_mol_per_L", "width_log10"},
               {}};
  if (bands.samples > 0) {
    for (std::size_t i = 0; i < bands.pH.size(); ++i) {
      bt.add({full(bands.pH[i]), full(std::pow(10.0, bands.nominal_log10_mol_per_L[i])),
              full(std::pow(10.0, bands.p05_log10_mol_per_L[i])), full(std::pow(10.0, bands.p50_log10_mol_per_L[i])),
              full(std::pow(10.0, bands.p95_log10_mol_per_L[i])),
              full(bands.p95_log10_mol_per_L[i] - bands.p05_log10_mol_per_L[i])});
    }
  }
  std::vector<std::string> notes = {"temperature " + full(p.temperature_C) + " C"};
  notes.insert(notes.end(), p.notes.begin(), p.notes.end());
  if (bands.samples > 0) {
    notes.push_back("bands: " + std::to_string(bands.samples) + " samples, seed " + std::to_string(bands.seed));
  }
  return {points, mx, dk, bt, notes_table(notes, p.warnings)};
}

std::vector<TableInfo> classify_table_info() {
  return {{"points", "one row per reported pH: solubility and dose number"},
          {"summary", "one row: verdict, dose, minimum solubility and where"},
          {"media", "one row per medium: pH after the dose, dissolved fraction"},
          {"notes", "notes, warnings and the caution"}};
}

std::vector<DataTable> classify_tables(const ClassifyResult& r) {
  DataTable pts{"points",
                {"point", "pH", "solubility_mol_per_L", "solubility_mg_per_mL", "dose_number", "limiting_solid"},
                {}};
  for (const ClassifyPoint& p : r.points) {
    pts.add({p.label, full(p.pH), full(p.solubility_mol_per_L), full(p.solubility_mg_per_mL), full(p.dose_number),
             p.limiting_solid});
  }
  DataTable sum{"summary",
                {"compound", "form", "verdict", "dose_mg", "volume_mL", "temperature_C", "min_solubility_mg_per_mL",
                 "min_solubility_mol_per_L", "min_at_pH", "dose_solubility_volume_mL", "guideline", "convention"},
                {}};
  sum.add({r.compound_id, r.form, r.verdict, full(r.dose_mg), full(r.volume_mL), full(r.temperature_C),
           full(r.min_solubility_mg_per_mL), full(r.min_solubility_mol_per_L), full(r.min_at_pH),
           full(r.dose_solubility_volume_mL), r.guideline, r.convention});
  DataTable media{"media",
                  {"medium", "name", "nominal_pH", "pH_after_dose", "dissolved_fraction", "solid"},
                  {}};
  for (const MediumCheck& c : r.media) {
    media.add({c.medium, c.name, c.nominal_pH, c.usable ? full(c.pH_after) : "",
               c.usable ? full(c.dissolved_fraction) : "", c.usable ? c.solid : ""});
  }
  return {pts, sum, media, notes_table(r.notes, r.warnings)};
}

std::vector<TableInfo> fit_table_info() {
  return {{"parameters", "one row per fitted parameter: start, estimate, standard error"},
          {"residuals", "one row per measured point: observed and fitted log10 solubility"},
          {"correlation", "one row per parameter: its correlation with each parameter (columns)"},
          {"summary", "one row: status, rms, degrees of freedom, lack-of-fit and runs tests"},
          {"notes", "warnings and the caution"}};
}

std::vector<DataTable> fit_tables(const FitResult& r) {
  DataTable ps{"parameters", {"parameter", "start", "estimate", "std_error"}, {}};
  for (const FitParameter& p : r.parameters) {
    ps.add({p.name, full(p.start), full(p.estimate), full(p.std_error)});
  }
  DataTable res{"residuals",
                {"pH", "temperature_C", "observed_log10_mol_per_L", "fitted_log10_mol_per_L", "residual_log10",
                 "limiting_solid"},
                {}};
  for (const FitResidual& x : r.residuals) {
    res.add({full(x.pH), full(x.temperature_C), full(x.observed_log10), full(x.fitted_log10),
             full(x.observed_log10 - x.fitted_log10), x.limiting_solid});
  }
  std::vector<std::string> head = {"parameter"};
  for (const FitParameter& p : r.parameters) head.push_back(p.name);
  DataTable corr{"correlation", head, {}};
  const auto n = static_cast<Eigen::Index>(r.parameters.size());
  for (Eigen::Index a = 0; a < n; ++a) {
    std::vector<std::string> row = {r.parameters[static_cast<std::size_t>(a)].name};
    for (Eigen::Index b = 0; b < n; ++b) {
      row.push_back(a < r.correlation.rows() && b < r.correlation.cols() ? full(r.correlation(a, b)) : "");
    }
    corr.add(row);
  }
  DataTable sum{"summary",
                {"status", "message", "data_source", "iterations", "rms_log10", "residual_sd_log10",
                 "degrees_of_freedom", "lack_of_fit_test", "reduced_chi_square", "lack_of_fit_p", "runs",
                 "runs_expected", "runs_p"},
                {}};
  sum.add({r.status == FitStatus::kConverged ? "converged"
           : r.status == FitStatus::kMaxIterations ? "max-iterations" : "failure",
           r.message, r.data_source, std::to_string(r.iterations), full(r.rms_log10), full(r.residual_sd),
           std::to_string(r.degrees_of_freedom), r.lack_of_fit_test, full(r.reduced_chi_square),
           full(r.lack_of_fit_p), std::to_string(r.runs.runs), full(r.runs.expected_runs), full(r.runs.p)});
  return {ps, res, corr, sum, notes_table({}, r.warnings)};
}

std::vector<TableInfo> dilute_table_info() {
  return {{"points", "one row per dilution ratio: pH, drug, solubility, supersaturation, risk"},
          {"notes", "notes, warnings and the caution"}};
}

std::vector<DataTable> dilute_tables(const DilutionResult& r) {
  DataTable t{"points",
              {"medium", "temperature_C", "ratio", "pH", "ionic_strength_mol_per_L", "osmolarity_mOsm_per_L",
               "drug_mol_per_L", "drug_mg_per_mL", "solubility_mol_per_L", "solubility_flag", "limiting_solid",
               "supersaturation_ratio", "risk", "equilibrium_pH", "equilibrium_dissolved_mol_per_L",
               "equilibrium_solid"},
              {}};
  for (const DilutionPoint& p : r.points) {
    const bool d = p.has_drug;
    const bool unlimited = d && !std::isfinite(p.solubility_mol_per_L);
    t.add({r.medium_id, full(r.temperature_C), full(p.ratio), full(p.pH), full(p.ionic_strength_mol_per_L),
           full(p.osmolarity_mOsm_per_L), d ? full(p.drug_mol_per_L) : "", d ? full(p.drug_mg_per_mL) : "",
           d ? full(p.solubility_mol_per_L) : "", unlimited ? "unlimited" : "", d ? p.limiting_solid : "",
           d ? full(p.supersaturation_ratio) : "", d ? boolean(p.risk) : "", d ? full(p.equilibrium_pH) : "",
           d ? full(p.equilibrium_dissolved_mol_per_L) : "", d ? p.equilibrium_solid : ""});
  }
  std::vector<std::string> notes = {"ratio = total volume / formulation volume"};
  if (!r.inputs.empty()) notes.push_back("formulation: " + join_words(r.inputs, ", "));
  notes.insert(notes.end(), r.notes.begin(), r.notes.end());
  return {t, notes_table(notes, r.warnings)};
}

}  // namespace pkarta
