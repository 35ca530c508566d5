// pH-solubility of a drug with excess solid: free form, salt limits, pHmax.
//
// At each pH the drug's excess free form is equilibrated in a medium, the pH being held by a
// strong acid (HCl by default: its anion comes with it) or NaOH. A salt precipitates where its
// ion product would exceed Ksp, its counterion coming from the titrant and the medium; the
// solubility is then the salt-limited one (DESIGN.md section 2).
#ifndef PKARTA_PROFILE_H_
#define PKARTA_PROFILE_H_

#include <string>
#include <vector>

#include "pkarta/equilibrium.h"
#include "pkarta/model.h"

namespace pkarta {

/// How the profile is made.
struct ProfileConditions {
  double temperature_C = 25.0;
  ActivityModel activity = ActivityModel::kDavies;
  Mixture medium;                    ///< systems and ions of the medium (no drug); its
                                     ///< temperature and activity fields are ignored
  std::string acid_titrant = "HCl";  ///< library reagent giving the strong anion
  std::string base_titrant = "NaOH"; ///< library reagent giving the strong cation
};

/// Solubility at one pH.
struct SolubilityAtPh {
  double pH = 7.0;
  double solubility_mol_per_L = 0.0;        ///< total dissolved drug
  double ideal_solubility_mol_per_L = 0.0;  ///< Henderson-Hasselbalch: S0 sum_j alpha_j/alpha_n, activities 1
  std::string limiting_solid = "free";      ///< "free", a salt id, or "none" (nothing limits)
  double ionic_strength_mol_per_L = 0.0;
  std::vector<double> fractions;            ///< species fractions j = 0..n at this pH
  double titrant_mol_per_L = 0.0;           ///< > 0: base titrant added; < 0: acid titrant
  /// For each compound salt (same order as compound.salts): ion product at free-form saturation
  /// over Ksp (> 1: the salt limits). 0 when its counterion is absent.
  std::vector<double> salt_saturation_at_free;
  bool capped = false;                      ///< solubility above kSolubilityCap_mol_per_L
};

/// Solubilities above this are reported at the cap (no solid limits; outside any real medium).
inline constexpr double kSolubilityCap_mol_per_L = 10.0;

/// Equilibrium solubility with excess solid at a fixed pH (activity coefficients iterated to
/// self-consistency with the ionic strength of the saturated solution, titrant included).
/// The compound's salts must have ksp resolved (load_compound_file does it).
SolubilityAtPh solubility_at_pH(const Compound& compound, const Library& library, double pH,
                                const ProfileConditions& conditions);

}  // namespace pkarta

#endif  // PKARTA_PROFILE_H_
