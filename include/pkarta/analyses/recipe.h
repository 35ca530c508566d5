// Bench recipes: what to weigh (and titrate) to make a buffer at a pH, strength and volume.
//
// Two ways (docs/commands.md, `pkarta recipe`):
//  - an acid-form and a base-form reagent of the buffer's system (e.g. NaH2PO4.2H2O and
//    Na2HPO4.12H2O), split so that the closed-system equilibrium with Davies activities gives
//    exactly the target pH: n_a a + n_b b = C (system balance) and z_a a + z_b b = -q(pH, I)
//    (charge balance, q the charge of the system species, H+ and OH- at the target pH), with
//    the ionic strength I iterated to self-consistency;
//  - one reagent plus a volume of a 1 M titrant (the buffer's acid- or base-titrant, HCl or
//    NaOH), the direction following from the sign of the charge balance.
// Optionally NaCl is added so that the osmolality estimate (osmotic coefficient 0.93 applied to
// the ideal osmolarity, divided by the density of water) reaches 290 mOsm/kg; the salt's ionic
// strength is included when the split is solved. Osmolality must be measured.
#ifndef PKARTA_RECIPE_H_
#define PKARTA_RECIPE_H_

#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/model.h"

namespace pkarta {

/// Target osmolality of an isotonic recipe, mOsm/kg: plasma 275-295 (common practice of clinical chemistry), and
/// 0.9 % NaCl about 286-288.
inline constexpr double kIsotonicTarget_mOsm_per_kg = 290.0;

/// What a recipe is asked.
struct RecipeOptions {
  std::string buffer;                 ///< library buffer id
  double pH = 7.0;                    ///< target pH (0-14)
  double conc_mol_per_L = 0.05;       ///< total of the buffer system in the final volume (> 0)
  double volume_L = 1.0;              ///< final volume (> 0)
  double temperature_C = 25.0;        ///< the buffer is made up (and its pH holds) at this T
  /// Reagent ids: empty for the buffer's own acid-reagent/base-reagent; one id for that reagent
  /// plus titrant; two ids for an acid/base pair (in either order).
  std::vector<std::string> reagents;
  bool use_titrant = false;           ///< one reagent plus titrant even when the buffer has two
  double titrant_conc_mol_per_L = 1.0;
  bool isotonic = false;              ///< add NaCl to reach kIsotonicTarget_mOsm_per_kg (estimate)
  std::string tonicity_reagent = "NaCl";
  /// Osmolarity of solutes added later (a dose), counted when the tonicity reagent is sized.
  double other_solutes_mOsm_per_L = 0.0;
  ActivityModel activity = ActivityModel::kDavies;
  /// False with a message naming the field ("RecipeOptions::volume_L = 0, must be > 0").
  bool is_valid(std::string* error) const;
};

/// One line to weigh.
struct RecipeReagent {
  std::string id;
  std::string name;
  std::string formula;
  std::string state;                  ///< solid | liquid | solution (as in the library)
  std::string role;                   ///< "acid form", "base form", "buffer", "tonicity"
  double molar_mass_g_per_mol = 0.0;  ///< from the formula (IUPAC atomic weights)
  double conc_mol_per_L = 0.0;        ///< in the final volume
  double amount_mol = 0.0;
  double mass_g = 0.0;
};

/// A volume of titrant solution.
struct RecipeTitrant {
  std::string id;                     ///< reagent id (HCl, NaOH)
  std::string name;
  double conc_mol_per_L = 1.0;        ///< of the titrant solution used
  double volume_mL = 0.0;
  double amount_mol = 0.0;
};

/// The recipe and what the resulting solution is computed to be.
struct Recipe {
  std::string buffer;
  std::string buffer_name;
  std::string system;
  double target_pH = 0.0;
  double conc_mol_per_L = 0.0;
  double volume_L = 1.0;
  double temperature_C = 25.0;
  ActivityModel activity = kDefaultActivityModel;
  std::vector<RecipeReagent> reagents;
  std::optional<RecipeTitrant> titrant;
  // The solution as made, by the full equilibrium solve (docs/model.md):
  double pH = 0.0;
  double ionic_strength_mol_per_L = 0.0;
  double osmolarity_mOsm_per_L = 0.0;              ///< ideal, all dissolved species
  double osmolality_estimate_mOsm_per_kg = 0.0;    ///< 0.93 x osmolarity / density: an estimate
  double capacity_mol_per_L_per_pH = 0.0;
  bool isotonic = false;
  std::string tonicity_method;                     ///< how the NaCl was sized ("" when not asked)
  std::vector<std::string> notes;                  ///< bench remarks (liquids, stock solutions)
  std::vector<std::string> warnings;
};

/// Works out a recipe. Throws InputError whose location names the RecipeOptions field at fault
/// ("buffer", "reagents", "pH", "isotonic") for invalid options, an unknown buffer or reagent, a
/// reagent that does not carry the buffer's system, or a pH the chosen reagent pair cannot
/// reach without a titrant; std::runtime_error if the equilibrium fails to converge.
Recipe make_recipe(const Library& library, const RecipeOptions& options);

/// The recipe's contents as a Mixture (reagents, titrant, salt at their final concentrations),
/// at the recipe temperature: what `pkarta mix` would be given.
Mixture recipe_mixture(const Library& library, const Recipe& recipe,
                       ActivityModel activity = ActivityModel::kDavies);

/// Where the activity models part for a recipe's solved state `e` of `mixture` (activity_model_hint),
/// that warning with what to do at the bench; empty otherwise.
std::string recipe_activity_warning(const Mixture& mixture, const Equilibrium& e);

/// Parses a volume: "1L", "500mL", "0.25 L", "250 ml", "1000 uL". Returns litres.
/// Throws InputError (without location) for no unit, an unknown unit, or a volume <= 0.
double parse_volume_L(std::string_view text);

// The text, CSV and JSON writers of a recipe: pkarta/writers/recipe_writer.h.

}  // namespace pkarta

#endif  // PKARTA_RECIPE_H_
