#include "pkarta/analyses/dilute.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>

#include "pkarta/base/format.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

struct SolubilityInMixture {
  double solubility = kInf;
  std::string solid = "none";
};

// The drug's solubility at the pH, ionic strength and counterion concentrations of a mixture
// with the drug fully dissolved (the model prepared and solved by the caller).
SolubilityInMixture solubility_in(const Mixture& all, const EquilibriumModel& model, double pH) {
  SolubilityInMixture out;
  int which = -2;
  out.solubility = model.solubility_limit(pH, &which);
  if (which == -1) out.solid = "free";
  if (which >= 0) out.solid = all.drug->compound.salts[which].id;
  return out;
}

bool has_system(const Mixture& m, const std::string& id) {
  for (const SystemAmount& s : m.systems) {
    if (s.system.id == id && s.total_mol_per_L > 0) return true;
  }
  return false;
}

double dissolved_co2(const Equilibrium& e) {
  double c = 0.0;
  for (const Species& sp : e.species) {
    if (sp.system == "carbonate" && sp.charge == 0) c += sp.conc_mol_per_L;
  }
  return c;
}

bool contains(const std::string& text, const char* word) { return text.find(word) != std::string::npos; }

constexpr const char* kBloodBufferId = "blood-buffer";
constexpr double kBloodBufferPk = 7.4;  // the reference pH of the Van Slyke equation

// Ideal osmolarity (mOsm/L) of the lumped buffer's species: they stand for groups on proteins
// and haemoglobin, not free particles, so they are taken out of the reported osmolarity.
double blood_buffer_osmolarity(const Equilibrium& e) {
  double c = 0.0;
  for (const Species& sp : e.species) {
    if (sp.system == kBloodBufferId) c += sp.conc_mol_per_L;
  }
  return c * 1000.0;
}

}  // namespace

bool is_physiological_medium(const Library& library, const std::string& medium_id) {
  const Medium& m = library.medium(medium_id);
  Mixture med;
  add_medium(med, library, m.id);
  if (!has_system(med, "carbonate")) return false;
  return contains(m.id, "plasma") || contains(m.id, "blood") || contains(m.name, "plasma") || contains(m.name, "blood");
}

// Open system: the lungs hold pCO2, so CO2 made from bicarbonate by an added acid leaves and
// dissolved CO2 stays at s pCO2 while strong ions are unchanged. [CO2] rises monotonically with
// the carbonate total C_T at fixed strong ions, and [CO2] <= C_T, so C_T = [CO2]target brackets
// from below; bisection on log C_T around the unchanged closed-system solver.
Mixture open_carbonate_mixture(const Mixture& mixture, double co2_mol_per_L, const SolverOptions& solver,
                               Equilibrium* state) {
  Mixture m = mixture;
  SystemAmount* carb = nullptr;
  for (SystemAmount& s : m.systems) {
    if (s.system.id == "carbonate") carb = &s;
  }
  if (!carb) throw InputError("the open bicarbonate model needs the carbonate system in the mixture");
  auto co2_at = [&](double total, Equilibrium* out) {
    carb->total_mol_per_L = total;
    Equilibrium e = solve(m, solver);
    if (!e.usable()) {
      throw InputError("open bicarbonate model: the equilibrium at total carbonate " + sig(total, 4) +
                       " mol/L did not converge: " + e.message);
    }
    const double c = dissolved_co2(e);
    if (out) *out = std::move(e);
    return c;
  };
  double lo = co2_mol_per_L;
  double hi = std::max(carb->total_mol_per_L, co2_mol_per_L) * 2.0;
  int grow = 0;
  while (co2_at(hi, nullptr) < co2_mol_per_L) {
    lo = hi;
    hi *= 4.0;
    if (++grow > 40 || hi > 10.0) throw InputError("open bicarbonate model: no total carbonate gives the set pCO2");
  }
  for (int it = 0; it < 200 && hi / lo - 1.0 > 1e-13; ++it) {
    const double mid = std::sqrt(lo * hi);
    if (co2_at(mid, nullptr) < co2_mol_per_L) lo = mid;
    else hi = mid;
  }
  Equilibrium e;
  co2_at(std::sqrt(lo * hi), &e);
  if (state) *state = std::move(e);
  return m;
}

double DilutionOptions::non_bicarbonate_buffer_mM_per_pH() const {
  return plasma_buffer_mM_per_pH + (blood == BloodKind::kWhole ? haemoglobin_buffer_per_mmol * haemoglobin_mmol_per_L : 0.0);
}

// Species +1 (j 0), 0 (j 1), -1 (j 2): a base group then an acid group. With Davies activities and
// pH = -log aH, the conditional constants are pK1' = pK1 - log g1 and pK2' = pK2 + log g1, so
// pK1 = 7.4 + log g1 and pK2 = 7.4 - log g1 make both 7.4 at the given ionic strength. With both
// conditional constants equal the three species are a third each at pH 7.4: net charge zero and
// buffer value ln(10) C x (variance of the proton number, 2/3).
AcidBaseSystem blood_buffer_system(double ionic_strength_mol_per_L, double temperature_C) {
  const double log_g1 = std::log10(davies_gamma(1, ionic_strength_mol_per_L, temperature_C));
  AcidBaseSystem s;
  s.id = kBloodBufferId;
  s.name = "non-bicarbonate buffer of blood (lumped)";
  s.source = "Van Slyke equation, Siggaard-Andersen 1977, Scand. J. Clin. Lab. Invest. 37 Suppl 146, 15-20";
  Pka base;
  base.type = GroupType::kBase;
  base.value = base.stated_value = kBloodBufferPk + log_g1;
  base.ref_temperature_C = temperature_C;
  Pka acid;
  acid.type = GroupType::kAcid;
  acid.value = acid.stated_value = kBloodBufferPk - log_g1;
  acid.ref_temperature_C = temperature_C;
  s.pkas = {base, acid};
  return s;
}

double blood_buffer_total(double beta_mol_per_L_per_pH) { return beta_mol_per_L_per_pH * 1.5 / std::log(10.0); }

namespace {
// A system of a physiological medium that the solver carries explicitly beside the lumped
// non-bicarbonate buffer: every one present but carbonate (the Van Slyke equation's own term).
bool explicit_medium_system(const SystemAmount& s) { return s.system.id != "carbonate" && s.total_mol_per_L > 0; }
}  // namespace

double explicit_medium_buffer_value(const Mixture& medium, double ionic_strength_mol_per_L) {
  double beta = 0.0;
  for (const SystemAmount& s : medium.systems) {
    if (!explicit_medium_system(s)) continue;
    Mixture one;
    one.temperature_C = medium.temperature_C;
    one.activity = medium.activity;
    one.systems.push_back(s);
    EquilibriumModel model(one);
    model.set_ionic_strength(ionic_strength_mol_per_L);
    std::array<double, kMaxPka + 1> alpha{};
    model.fractions(0, kBloodBufferPk, alpha.data());
    double zbar = 0.0, z2bar = 0.0;
    for (int j = 0; j <= static_cast<int>(s.system.pkas.size()); ++j) {
      const double z = s.system.charge_of(j);
      zbar += z * alpha[j];
      z2bar += z * z * alpha[j];
    }
    beta += std::log(10.0) * s.total_mol_per_L * (z2bar - zbar * zbar);
  }
  return beta;
}

bool DilutionOptions::is_valid(std::string* error) const {
  if (medium_id.empty()) {
    if (error) *error = "DilutionOptions::medium_id is empty";
    return false;
  }
  if (ratios.empty()) {
    if (error) *error = "DilutionOptions::ratios is empty";
    return false;
  }
  if (!(pco2_mmHg > 0 && pco2_mmHg <= 200) || !(co2_solubility_mM_per_mmHg > 0 && co2_solubility_mM_per_mmHg < 1)) {
    if (error) *error = "DilutionOptions: pCO2 must be in (0, 200] mmHg and the CO2 solubility in (0, 1) mM/mmHg";
    return false;
  }
  if (!(plasma_buffer_mM_per_pH >= 0 && plasma_buffer_mM_per_pH < 100) ||
      !(haemoglobin_mmol_per_L >= 0 && haemoglobin_mmol_per_L < 30) ||
      !(haemoglobin_buffer_per_mmol >= 0 && haemoglobin_buffer_per_mmol < 10)) {
    if (error) *error = "DilutionOptions: the non-bicarbonate buffer values are out of range";
    return false;
  }
  for (double r : ratios) {
    if (!(r >= 1.0 && r <= 1e9)) {
      if (error) *error = "DilutionOptions::ratios has " + sig(r, 4) + ", must be >= 1 (total volume / formulation volume)";
      return false;
    }
  }
  return true;
}

Mixture diluted_mixture(const Mixture& formulation, const Library& library, const std::string& medium_id,
                        double ratio) {
  if (!(ratio >= 1.0)) {
    throw InputError("dilution ratio " + sig(ratio, 4) + " is below 1 (ratio = total volume / formulation volume)");
  }
  library.medium(medium_id);  // throws for an unknown medium
  const double f = 1.0 / ratio;
  Mixture m = formulation;
  for (SystemAmount& s : m.systems) s.total_mol_per_L *= f;
  for (IonAmount& i : m.ions) i.conc_mol_per_L *= f;
  if (m.drug) m.drug->dose_mol_per_L *= f;
  if (ratio > 1.0) add_medium(m, library, medium_id, 1.0 - f);
  return m;
}

DilutionConditions dilution_conditions(const Library& library, const DilutionOptions& options,
                                       double formulation_temperature_C) {
  const Medium& medium = library.medium(options.medium_id);
  DilutionConditions c;
  c.physiological = is_physiological_medium(library, medium.id);
  c.temperature_C = options.temperature_C ? *options.temperature_C
                    : c.physiological     ? 37.0
                                          : formulation_temperature_C;
  c.open_co2 = options.blood_model == BloodModel::kOpen || (options.blood_model == BloodModel::kAuto && c.physiological);
  c.words = medium.id + " (" + medium.name + ")" +
            (c.open_co2 ? ", open CO2 at pCO2 " + sig(options.pco2_mmHg, 3) + " mmHg" : std::string()) + ", " +
            fixed(c.temperature_C, 0) + " °C";
  return c;
}

std::string dilution_medium_label(const DilutionResult& r, bool brief) {
  if (r.blood.empty()) return r.medium_name;
  const std::string what = r.blood == "whole" ? "whole blood" : "plasma";
  const std::string co2 = r.blood_model == "open" ? "open CO2" : "closed CO2";
  if (brief) return what + ", " + co2;
  return what + " (" + r.blood_description + "; electrolytes of " + r.medium_id + ")";
}

DilutionResult analyse_dilution(const Mixture& formulation, const Library& library,
                                const DilutionOptions& options, std::vector<std::string> inputs) {
  std::string err;
  if (!options.is_valid(&err)) throw InputError(err);
  DilutionResult r;
  r.inputs = std::move(inputs);
  const Medium& medium = library.medium(options.medium_id);
  r.medium_id = medium.id;
  r.medium_name = medium.name;
  Mixture form = formulation;
  const DilutionConditions conditions = dilution_conditions(library, options, formulation.temperature_C);
  const bool physiological = conditions.physiological;
  form.temperature_C = conditions.temperature_C;
  {
    Mixture med;
    add_medium(med, library, medium.id);
    if (options.blood_model == BloodModel::kOpen && !has_system(med, "carbonate")) {
      throw InputError("the open bicarbonate model needs a medium holding bicarbonate; " + medium.id + " has none");
    }
  }
  const bool open = conditions.open_co2;
  if (physiological || options.blood_model != BloodModel::kAuto) r.blood_model = open ? "open" : "closed";
  const double co2 = options.pco2_mmHg * options.co2_solubility_mM_per_mmHg * 1e-3;
  r.temperature_C = form.temperature_C;
  if (form.drug) r.drug_name = form.drug->compound.name;
  const SolverOptions solver;

  // The non-bicarbonate buffer of plasma or whole blood, a property of the medium: diluted with
  // it, its pK' set at the medium's own ionic strength.
  if (options.blood == BloodKind::kWhole && !physiological) {
    throw InputError("whole blood buffering needs a plasma or blood medium; " + medium.id + " is neither");
  }
  std::optional<AcidBaseSystem> blood_buffer;
  double blood_buffer_mol = 0.0;
  if (physiological) {
    Mixture med;
    add_medium(med, library, medium.id);
    med.temperature_C = form.temperature_C;
    const Equilibrium me = solve(med, solver);
    if (!me.usable()) {
      r.message = "the equilibrium of the medium " + medium.id + " did not converge: " + me.message;
      return r;
    }
    r.non_bicarbonate_buffer_mM_per_pH = options.non_bicarbonate_buffer_mM_per_pH();
    r.blood = options.blood == BloodKind::kWhole ? "whole" : "plasma";
    // The measured value holds every non-bicarbonate buffer of plasma, its phosphate among
    // them; the medium's own systems (phosphate) are solved explicitly, so the lumped buffer
    // carries only the rest.
    std::string explicit_names;
    for (const SystemAmount& s : med.systems) {
      if (!explicit_medium_system(s)) continue;
      explicit_names += (explicit_names.empty() ? "" : ", ") + s.system.id;
    }
    if (explicit_names.empty()) explicit_names = "systems";
    r.medium_explicit_buffer_mM_per_pH = 1e3 * explicit_medium_buffer_value(med, me.ionic_strength_mol_per_L);
    r.lumped_buffer_mM_per_pH = std::max(0.0, r.non_bicarbonate_buffer_mM_per_pH - r.medium_explicit_buffer_mM_per_pH);
    blood_buffer = blood_buffer_system(me.ionic_strength_mol_per_L, form.temperature_C);
    blood_buffer_mol = blood_buffer_total(r.lumped_buffer_mM_per_pH * 1e-3);
    const std::string kind = options.blood == BloodKind::kWhole
                                 ? "whole-blood non-bicarbonate buffer (plasma 7.7 + haemoglobin " +
                                       sig(options.haemoglobin_buffer_per_mmol, 3) + " x " +
                                       sig(options.haemoglobin_mmol_per_L, 3) + " mmol/L) "
                                 : "plasma non-bicarbonate buffer ";
    r.blood_description = (open ? "open CO2 at pCO2 " + sig(options.pco2_mmHg, 3) + " mmHg"
                                : std::string("closed CO2 (carbonate total kept)")) +
                          " with " + kind + sig(r.non_bicarbonate_buffer_mM_per_pH, 3) + " mmol/L/pH, " +
                          "of which " + sig(r.medium_explicit_buffer_mM_per_pH, 2) + " mmol/L/pH is the medium's own " +
                          explicit_names + ", solved explicitly";
  }

  for (double ratio : options.ratios) {
    DilutionPoint p;
    p.ratio = ratio;
    Mixture mix = diluted_mixture(form, library, options.medium_id, ratio);
    if (blood_buffer && ratio > 1.0) mix.systems.push_back({*blood_buffer, blood_buffer_mol * (1.0 - 1.0 / ratio)});
    const bool open_here = open && has_system(mix, "carbonate");
    Mixture all = mix;
    if (all.drug) all.drug->allow_solids = false;
    Equilibrium e;
    if (open_here) all = open_carbonate_mixture(all, co2, solver, &e);
    else e = solve(all, solver);
    if (!e.usable()) {
      r.message = "the equilibrium at ratio " + sig(ratio, 4) + " did not converge: " + e.message;
      return r;
    }
    p.pH = e.pH;
    p.ionic_strength_mol_per_L = e.ionic_strength_mol_per_L;
    p.osmolarity_mOsm_per_L = e.osmolarity_mOsm_per_L - blood_buffer_osmolarity(e);
    p.mass_residual_rel = e.mass_residual_rel;
    p.charge_residual_rel = e.charge_residual_rel;
    p.equilibrium_pH = e.pH;
    for (const std::string& w : e.warnings) {
      const std::string tagged = "ratio " + sig(ratio, 4) + ": " + w;
      if (std::find(r.warnings.begin(), r.warnings.end(), tagged) == r.warnings.end()) r.warnings.push_back(tagged);
    }
    if (all.drug) {
      p.has_drug = true;
      p.drug_mol_per_L = all.drug->dose_mol_per_L;
      p.drug_mg_per_mL = p.drug_mol_per_L * all.drug->compound.molar_mass_g_per_mol;
      EquilibriumModel model(all);
      const StateSummary s = model.solve(solver, e.pH);
      const SolubilityInMixture sol = solubility_in(all, model, s.pH);
      p.solubility_mol_per_L = sol.solubility;
      p.limiting_solid = sol.solid;
      p.supersaturation_ratio = std::isfinite(sol.solubility) ? p.drug_mol_per_L / sol.solubility : 0.0;
      p.risk = p.supersaturation_ratio > 1.0;
      // The state after precipitation to equilibrium.
      Equilibrium eq;
      if (open_here) mix = open_carbonate_mixture(mix, co2, solver, &eq);
      else eq = solve(mix, solver);
      if (!eq.usable()) {
        r.message = "the equilibrium with solids at ratio " + sig(ratio, 4) + " did not converge: " + eq.message;
        return r;
      }
      p.equilibrium_pH = eq.pH;
      p.equilibrium_dissolved_mol_per_L = eq.drug->dissolved_mol_per_L;
      p.equilibrium_solid = eq.drug->solid;
      p.mass_residual_rel = std::max(p.mass_residual_rel, eq.mass_residual_rel);
      p.charge_residual_rel = std::max(p.charge_residual_rel, eq.charge_residual_rel);
    }
    r.points.push_back(p);
  }

  // The simplifications behind the numbers.
  r.notes.push_back("ratio = total volume / formulation volume: 1 volume of formulation made up to "
                    "'ratio' volumes with " + medium.id + " (ratio 1: the formulation itself); volumes "
                    "are additive and the mixture is well mixed, " +
                    std::string(open ? "closed but for CO2 (open model below)" : "closed") + " and at equilibrium");
  if (form.drug) {
    r.notes.push_back("pH and drug concentration: the whole dose dissolved (nothing precipitates); "
                      "solubility: of the drug at that pH, ionic strength and counterion "
                      "concentration, held by the mixture's own composition (free form at S0, a salt "
                      "at its Ksp); supersaturation ratio = drug / solubility");
    r.notes.push_back("risk = supersaturation ratio > 1: a thermodynamic driving force for "
                      "precipitation, not a rate; a supersaturated mixture may stay clear for the "
                      "infusion or transit time (nucleation and growth are not modelled)");
  }
  Mixture med;
  add_medium(med, library, medium.id);
  if (has_system(med, "carbonate") && open) {
    r.notes.push_back("blood model: open bicarbonate system: dissolved CO2 held at pCO2 " + sig(options.pco2_mmHg, 3) +
                      " mmHg x " + sig(options.co2_solubility_mM_per_mmHg, 3) + " mmol/L per mmHg = " +
                      sig(co2 * 1e3, 4) + " mmol/L, as the lungs hold arterial pCO2 (Siggaard-Andersen, The "
                      "Acid-Base Status of the Blood, 1974; Guyton and Hall, Textbook of Medical Physiology); "
                      "the total carbonate follows (CO2 leaves or enters), strong ions are unchanged");
    r.notes.push_back("the thermodynamic carbonate pK with Davies activities replaces the clinical pK' 6.1 "
                      "(Siggaard-Andersen 1977); drug binding to proteins is not modelled");
  } else if (has_system(med, "carbonate")) {
    r.notes.push_back(std::string(physiological ? "blood model: closed; " : "") + medium.id +
                      " holds bicarbonate as a closed system: no CO2 exchange with air "
                      "or lungs, so its pH is not held at a set pCO2; binding of the drug to proteins "
                      "is not modelled");
  }
  if (blood_buffer) {
    r.notes.push_back(
        "non-bicarbonate buffer (" + r.blood + "): beta = " + sig(r.non_bicarbonate_buffer_mM_per_pH, 3) +
        " mmol/L per pH of undiluted " + medium.id + " (Van Slyke equation, Siggaard-Andersen 1977, Scand. J. Clin. Lab. "
        "Invest. 37 Suppl 146: plasma proteins and phosphate 7.7, whole blood 1.43 cHb + 7.7 with cHb in mmol/L; "
        "recalled, to be verified), diluted with the medium; modelled as a lumped ampholyte with both pK' 7.4 "
        "(net charge zero at pH 7.4), " + sig(blood_buffer_mol * 1e3, 4) + " mmol/L, left out of the osmolarity; it "
        "carries " + sig(r.lumped_buffer_mM_per_pH, 3) + " mmol/L per pH, the rest (" +
        sig(r.medium_explicit_buffer_mM_per_pH, 2) + " mmol/L per pH at pH 7.4) being the medium's own " +
        "non-carbonate systems, solved explicitly");
  }
  for (const IonAmount& i : med.ions) {
    if (i.charge == 0 && i.conc_mol_per_L > 0) {
      r.notes.push_back(medium.id + ": " + i.id + " is a non-electrolyte; it counts in the "
                        "osmolarity only, so for acid-base the medium is water");
    }
  }
  if (form.drug) {
    Mixture undiluted = form;
    undiluted.drug->allow_solids = false;
    const Equilibrium e = solve(undiluted, solver);
    if (e.usable() && e.drug && e.drug->saturation_ratio > 1.0) {
      r.warnings.push_back("the formulation itself is supersaturated (saturation ratio " +
                           sig(e.drug->saturation_ratio, 3) + " before dilution)");
    }
  }
  r.converged = true;
  r.message = "converged";
  return r;
}

}  // namespace pkarta
