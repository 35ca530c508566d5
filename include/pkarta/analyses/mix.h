// `pkarta mix`: one closed-system equilibrium, with capacity and osmolarity.
#ifndef PKARTA_MIX_H_
#define PKARTA_MIX_H_

#include <optional>
#include <string>
#include <vector>

#include "pkarta/chem/equilibrium.h"

namespace pkarta {

struct MixResult {
  Equilibrium equilibrium;
  double capacity_mol_per_L_per_pH = 0.0;
  double osmolality_estimate_mOsm_per_kg = 0.0;  ///< osmotic coefficient 0.93: an estimate
  std::vector<std::string> inputs;               ///< "KH2PO4 25 mM", for the text header
  std::string drug_name;
  ActivityModel activity = ActivityModel::kDavies;  ///< as solved (named in the text footer)
};

/// Osmotic coefficient used for the osmolality estimate (NaCl at physiological strength,
/// 0.93; osmotic coefficients as tabulated by Robinson and Stokes, Electrolyte Solutions, 1959).
inline constexpr double kOsmoticCoefficient = 0.93;

/// Above this ionic strength (mol/L), with at least kDaviesHintMultivalentMolPerL of di- and
/// trivalent buffer anions, Davies activities drift alkaline against published buffer tables
/// (tests/chem/buffer_tables_test.cpp: McIlvaine 1921, mean 0.054 up to I 0.3, 0.113 above).
inline constexpr double kDaviesHintIonicStrength = 0.15;
inline constexpr double kDaviesHintMultivalentMolPerL = 0.005;

/// Where Davies is known to drift: the solved state's ionic strength, its di- and trivalent
/// buffer anions (mol/L, all species of charge -2 or below of the library systems, the drug's
/// own excluded) and the ids of their systems.
struct DaviesDriftConditions {
  double ionic_strength_mol_per_L = 0.0;
  double multivalent_mol_per_L = 0.0;
  std::vector<std::string> systems;
  /// "ionic strength 0.22 mol/L with 40 mM of di- and trivalent anions (phosphate)"
  std::string words() const;
};

/// Set when `mixture` is solved under Davies activities above kDaviesHintIonicStrength with at
/// least kDaviesHintMultivalentMolPerL of multivalent anions in the solved state `e`.
std::optional<DaviesDriftConditions> davies_drift_conditions(const Mixture& mixture, const Equilibrium& e);

/// Under such conditions, a warning naming the multivalent anions of the solved state `e` and
/// the models that are closer (`--activity ion-pairs` or `sit`); empty otherwise.
/// analyse_mix() adds it to the state's warnings.
std::string activity_model_hint(const Mixture& mixture, const Equilibrium& e);

/// Solves the mixture and derives capacity and the osmolality estimate.
MixResult analyse_mix(const Mixture& mixture, std::vector<std::string> inputs);

}  // namespace pkarta

#endif  // PKARTA_MIX_H_
