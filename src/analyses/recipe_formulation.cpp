#include "pkarta/analyses/recipe_formulation.h"

#include <algorithm>
#include <cmath>

#include "pkarta/analyses/mix.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

// Net strong charge one mole of a reagent gives (HCl -1, NaOH +1).
double strong_charge(const Library& library, const std::string& id) {
  double q = 0.0;
  for (const Contribution& c : library.reagent(id).gives) {
    if (c.kind != Contribution::Kind::kSystem) q += c.count * library.ion(c.id).charge;
  }
  return q;
}

void set_titrant(const Library& library, const Buffer& buffer, Recipe& r, double signed_charge,
                 double titrant_conc) {
  const std::string id = signed_charge >= 0 ? buffer.base_titrant : buffer.acid_titrant;
  const double amount = signed_charge / strong_charge(library, id);  // mol/L, >= 0
  RecipeTitrant t;
  t.id = id;
  t.name = library.reagent(id).name;
  t.conc_mol_per_L = titrant_conc;
  t.amount_mol = amount * r.volume_L;
  t.volume_mL = 1000.0 * t.amount_mol / titrant_conc;
  r.titrant = t;
}

double titrant_signed_charge(const Library& library, const Recipe& r) {
  if (!r.titrant || r.titrant->amount_mol <= 0) return 0.0;
  return strong_charge(library, r.titrant->id) * r.titrant->amount_mol / r.volume_L;
}

// The titrant that brings buffer plus drug to the target pH (Newton on the signed amount).
bool adjust_titrant(const Library& library, const Buffer& buffer, Recipe& r, const Compound& compound,
                    double dose, const std::string& form, double target, double titrant_conc, ActivityModel activity) {
  double q = titrant_signed_charge(library, r);
  for (int it = 0; it < 60; ++it) {
    Mixture m = recipe_mixture(library, r, activity);
    add_drug(m, library, compound, dose, form);
    const Equilibrium e = solve(m);
    if (!e.usable()) return false;
    if (std::fabs(e.pH - target) < 1e-7) return true;
    const double beta = std::max(buffer_capacity(m), 1e-12);
    q += std::clamp(beta * (target - e.pH), -beta, beta);
    set_titrant(library, buffer, r, q, titrant_conc);
  }
  return false;
}

double osmolarity_of(const Mixture& m) {
  const Equilibrium e = solve(m);
  return e.usable() ? e.osmolarity_mOsm_per_L : 0.0;
}

Formulation build(const Library& library, RecipeOptions o, const Compound& compound, double dose,
                  const std::string& form, ScreenPreparation how) {
  const Buffer& buffer = library.buffer(o.buffer);
  Formulation f;
  f.preparation = how;
  if (how == ScreenPreparation::kAdjusted) {
    if (o.reagents.size() == 2) {
      throw InputError(SourceLocation{"preparation", 0, 0},
                       "the adjusted preparation weighs one buffer reagent and titrates; give one reagent or none");
    }
    o.use_titrant = true;
  }
  // The drug's own osmolarity, counted when the tonicity reagent is sized (twice: the buffer's
  // species change a little once the drug is in).
  o.other_solutes_mOsm_per_L = 0.0;
  Recipe r = make_recipe(library, o);
  for (int round = 0; round < 3 && o.isotonic; ++round) {
    Mixture with = recipe_mixture(library, r, o.activity);
    add_drug(with, library, compound, dose, form);
    o.other_solutes_mOsm_per_L = osmolarity_of(with) - osmolarity_of(recipe_mixture(library, r, o.activity));
    r = make_recipe(library, o);
  }
  if (how == ScreenPreparation::kAdjusted) {
    // Tonicity reagent and titrant together: each titrant step changes the ionic strength a
    // little; the tonicity reagent's amount is fixed from the buffer alone plus the drug.
    const double rho = water_density_kg_per_L(o.temperature_C);
    for (int round = 0; round < 8; ++round) {
      if (!adjust_titrant(library, buffer, r, compound, dose, form, o.pH, o.titrant_conc_mol_per_L, o.activity)) {
        f.warnings.push_back("the titrant bringing buffer and drug to the target did not converge");
        break;
      }
      if (!o.isotonic) break;
      RecipeReagent* tonicity = nullptr;
      for (RecipeReagent& x : r.reagents) {
        if (x.role == "tonicity") tonicity = &x;
      }
      if (!tonicity) break;
      Mixture with = recipe_mixture(library, r, o.activity);
      add_drug(with, library, compound, dose, form);
      const double want = kIsotonicTarget_mOsm_per_kg * rho / kOsmoticCoefficient;
      double particles = 0.0;
      for (const Contribution& c : library.reagent(tonicity->id).gives) particles += c.count;
      const double change = (want - osmolarity_of(with)) / 1000.0 / std::max(particles, 1.0);
      if (std::fabs(change) < 1e-9) break;
      tonicity->conc_mol_per_L = std::max(0.0, tonicity->conc_mol_per_L + change);
      tonicity->amount_mol = tonicity->conc_mol_per_L * r.volume_L;
      tonicity->mass_g = tonicity->amount_mol * tonicity->molar_mass_g_per_mol;
    }
    // The reagents as finally weighed, without the drug: what the solution table shows.
    const Mixture alone = recipe_mixture(library, r, o.activity);
    const Equilibrium e = solve(alone);
    if (e.usable()) {
      r.pH = e.pH;
      r.ionic_strength_mol_per_L = e.ionic_strength_mol_per_L;
      r.osmolarity_mOsm_per_L = e.osmolarity_mOsm_per_L;
      r.osmolality_estimate_mOsm_per_kg = kOsmoticCoefficient * e.osmolarity_mOsm_per_L / rho;
      r.capacity_mol_per_L_per_pH = buffer_capacity(alone);
    }
    r.warnings.clear();
    r.notes.push_back("adjusted preparation: the recipe's own pH, ionic strength, osmolarity and capacity are of "
                      "the reagents without the drug; the titrant is sized to bring the pH to the target with the "
                      "drug in, and the formulation's values are those with the drug");
  }
  f.recipe = r;
  return f;
}

}  // namespace

Mixture formulation_mixture(const Library& library, const Formulation& f, const Compound& compound,
                            ActivityModel activity) {
  Mixture m = recipe_mixture(library, f.recipe, activity);
  add_drug(m, library, compound, f.drug.dose_mol_per_L, f.drug.form);
  return m;
}

Formulation make_formulation(const Library& library, const RecipeOptions& options, const Compound& compound,
                             double dose, const std::string& form, ScreenPreparation how) {
  if (!(dose > 0) || !std::isfinite(dose)) throw InputError(SourceLocation{"dose", 0, 0}, "the dose must be > 0");
  if (form != "free" && !compound.salt(form)) {
    throw InputError(SourceLocation{"form", 0, 0}, "compound '" + compound.id + "' has no salt '" + form + "'");
  }
  RecipeOptions o = options;
  std::string note;
  const Salt* salt = form == "free" ? nullptr : compound.salt(form);
  Formulation f = build(library, o, compound, dose, form, how);
  f.drug.id = compound.id;
  f.drug.form = form;
  f.drug.dose_mol_per_L = dose;
  f.drug.molar_mass_g_per_mol = form_molar_mass(compound, form, library);
  f.drug.amount_mol = dose * o.volume_L;
  f.drug.mass_g = f.drug.amount_mol * f.drug.molar_mass_g_per_mol;

  // Tonicity by the numbers: NaCl brings chloride, the counterion of a hydrochloride.
  if (o.isotonic && o.tonicity_reagent == "NaCl" && salt && salt->counterion == "Cl-") {
    const Equilibrium e = solve(formulation_mixture(library, f, compound, o.activity));
    const double ratio = e.usable() && e.drug ? e.drug->saturation_ratio : 0.0;
    const double limit_mg = ratio > 0 ? dose / ratio * f.drug.molar_mass_g_per_mol : 0.0;
    double nacl = 0.0;
    for (const RecipeReagent& x : f.recipe.reagents) {
      if (x.role == "tonicity") nacl = x.conc_mol_per_L;
    }
    const std::string head = "NaCl to 290 mOsm/kg would add " + sig(nacl * 1e3, 3) + " mM chloride; the " + form +
                             "'s solubility limit there is about " + sig(limit_mg, 3) + " mg/mL (as the salt), " +
                             sig(ratio > 0 ? 1.0 / ratio : 0.0, 3) + " times the dose of " +
                             sig(dose * f.drug.molar_mass_g_per_mol, 3) + " mg/mL";
    if (ratio * kTonicitySolubilityMargin > 1.0 && library.reagents.count("dextrose")) {
      o.tonicity_reagent = "dextrose";
      f = build(library, o, compound, dose, form, how);
      f.drug.id = compound.id;
      f.drug.form = form;
      f.drug.dose_mol_per_L = dose;
      f.drug.molar_mass_g_per_mol = form_molar_mass(compound, form, library);
      f.drug.amount_mol = dose * o.volume_L;
      f.drug.mass_g = f.drug.amount_mol * f.drug.molar_mass_g_per_mol;
      note = head + ", less than the margin of " + fixed(kTonicitySolubilityMargin, 0) +
             " asked (common-ion effect): dextrose is used instead.";
    } else {
      note = head + ", at least the margin of " + fixed(kTonicitySolubilityMargin, 0) + " asked: NaCl is used.";
    }
  } else if (o.isotonic) {
    note = o.tonicity_reagent + " is used" +
           (salt ? std::string(": the ") + form + "'s counterion " + salt->counterion + " is not chloride."
                 : std::string(": the free form brings no counterion."));
  }
  f.tonicity_note = note;

  const Mixture m = formulation_mixture(library, f, compound, o.activity);
  const Equilibrium e = solve(m);
  if (!e.usable()) throw std::runtime_error("the formulation's equilibrium did not converge: " + e.message);
  f.pH = e.pH;
  f.ionic_strength_mol_per_L = e.ionic_strength_mol_per_L;
  f.osmolarity_mOsm_per_L = e.osmolarity_mOsm_per_L;
  f.osmolality_estimate_mOsm_per_kg =
      kOsmoticCoefficient * e.osmolarity_mOsm_per_L / water_density_kg_per_L(o.temperature_C);
  f.capacity_mol_per_L_per_pH = buffer_capacity(m);
  if (e.drug) {
    f.solid = e.drug->solid;
    f.saturation_ratio = e.drug->saturation_ratio;
  }
  for (const std::string& w : e.warnings) f.warnings.push_back(w);
  if (std::string w = recipe_activity_warning(m, e); !w.empty()) f.warnings.push_back(std::move(w));
  auto ph_at = [&](double T) {
    Mixture x = m;
    x.temperature_C = T;
    const Equilibrium ex = solve(x);
    return ex.usable() ? ex.pH : std::nan("");
  };
  f.pH_low = ph_at(f.low_temperature_C);
  f.pH_high = ph_at(f.high_temperature_C);
  f.solubility_at_pH_mol_per_L =
      solubility_at_pH(compound, library, f.pH, ProfileConditions::in_water(o.temperature_C, o.activity))
          .solubility_mol_per_L;
  f.solubility_margin = f.solubility_at_pH_mol_per_L > 0 ? dose / f.solubility_at_pH_mol_per_L : 0.0;
  if (f.solid != "none") f.warnings.push_back("the dose does not dissolve completely: solid " + f.solid + " expected");

  // Order of addition.
  const Recipe& r = f.recipe;
  std::string weigh;
  for (const RecipeReagent& x : r.reagents) {
    weigh += (weigh.empty() ? "" : ", ") + sig(x.mass_g, 4) + " g " + x.id;
  }
  const std::string drug_line = sig(f.drug.mass_g, 4) + " g " + compound.id + (form == "free" ? "" : " " + form);
  const std::string volume = sig(r.volume_L * 1000.0, 4) + " mL";
  const std::string titrant = r.titrant && r.titrant->volume_mL > 0
                                  ? sig(r.titrant->volume_mL, 4) + " mL of " + sig(r.titrant->conc_mol_per_L, 3) +
                                        " M " + r.titrant->id
                                  : std::string("no titrant");
  f.steps.push_back("Dissolve " + weigh + " in about 80 % of the " + volume + " of water for injections at " +
                    fixed(r.temperature_C, 0) + " °C.");
  if (how == ScreenPreparation::kPremade) {
    f.steps.push_back("Add " + titrant + " (the buffer alone reaches pH " + fixed(r.pH, 2) + ").");
    f.steps.push_back("Dissolve " + drug_line + "; the pH is then computed to be " + fixed(f.pH, 2) + ".");
  } else {
    f.steps.push_back("Dissolve " + drug_line + ".");
    f.steps.push_back("Add " + titrant + " to bring the pH to " + fixed(r.target_pH, 2) +
                      " with the drug in; check with a calibrated pH meter and finish the adjustment with it.");
  }
  f.steps.push_back("Make up to " + volume + " with water, mix, and check the pH again.");
  return f;
}

}  // namespace pkarta
