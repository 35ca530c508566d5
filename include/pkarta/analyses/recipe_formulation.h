// Bench recipe of a formulation: a buffer recipe (recipe.h) with the dose of a drug in it.
//
// Two preparations (as for `pkarta screen`): premade, the buffer (with its tonicity reagent)
// is made at the target pH and the drug dissolved in it, the pH after the drug predicted;
// adjusted, one buffer reagent, the drug and the tonicity reagent are dissolved together and the
// buffer's titrant (HCl or NaOH) brings the pH to the target with the drug in (solved with the
// full equilibrium, Newton steps on the titrant amount with the formulation's capacity).
//
// Tonicity: NaCl unless its chloride would bring the solubility limit of a hydrochloride below
// the dose with a margin (kTonicitySolubilityMargin): the drug's saturation ratio with the
// whole dose dissolved (ion product over Ksp) must stay at most 1/margin; otherwise dextrose.
#ifndef PKARTA_RECIPE_FORMULATION_H_
#define PKARTA_RECIPE_FORMULATION_H_

#include <ostream>
#include <string>
#include <vector>

#include "pkarta/analyses/recipe.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// The solubility limit must be at least this times the dose for NaCl to be the tonicity
/// reagent of a chloride salt (a choice of the tool, stated in the output).
inline constexpr double kTonicitySolubilityMargin = 2.0;

/// The drug of a formulation.
struct FormulationDrug {
  std::string id;                      ///< compound id
  std::string form = "free";           ///< the form weighed: free or a salt id
  double molar_mass_g_per_mol = 0.0;   ///< of that form
  double dose_mol_per_L = 0.0;         ///< of drug
  double amount_mol = 0.0;             ///< in the volume
  double mass_g = 0.0;                 ///< of the form weighed
};

/// The formulation: what to weigh and titrate, in order, and what it is computed to be.
struct Formulation {
  Recipe recipe;                       ///< buffer reagents, titrant, tonicity reagent
  FormulationDrug drug;
  ScreenPreparation preparation = ScreenPreparation::kPremade;
  double pH = 0.0;                     ///< with the drug in, at the recipe temperature
  double pH_low = 0.0;                 ///< same totals at low_temperature_C
  double pH_high = 0.0;                ///< ... and at high_temperature_C
  double low_temperature_C = 5.0;
  double high_temperature_C = 40.0;
  double ionic_strength_mol_per_L = 0.0;
  double osmolarity_mOsm_per_L = 0.0;
  double osmolality_estimate_mOsm_per_kg = 0.0;
  double capacity_mol_per_L_per_pH = 0.0;
  double solubility_at_pH_mol_per_L = 0.0;  ///< in water at the final pH (profile)
  double solubility_margin = 0.0;           ///< dose / that solubility
  double saturation_ratio = 0.0;            ///< in the formulation (equilibrium.h DrugState)
  std::string solid = "none";               ///< solid expected in the formulation
  std::string tonicity_note;                ///< why the tonicity reagent was chosen, with numbers
  std::vector<std::string> steps;           ///< order of addition
  std::vector<std::string> warnings;
};

/// Works out the formulation for `options` (the buffer recipe) plus a dose of `compound` in
/// `form`, made as `how` says. Throws InputError as make_recipe does, or naming "preparation" when adjusted is asked
/// with two reagents.
Formulation make_formulation(const Library& library, const RecipeOptions& options, const Compound& compound,
                             double dose_mol_per_L, const std::string& form,
                             ScreenPreparation how = ScreenPreparation::kPremade);

/// Everything weighed and titrated, as a Mixture (what `pkarta mix` would be given).
Mixture formulation_mixture(const Library& library, const Formulation& f, const Compound& compound,
                            ActivityModel activity = ActivityModel::kDavies);

// The text, CSV and JSON writers of a formulation: pkarta/writers/recipe_writer.h.

}  // namespace pkarta

#endif  // PKARTA_RECIPE_FORMULATION_H_
