// `pkarta mix`: one closed-system equilibrium, with capacity and osmolarity.
#ifndef PKARTA_MIX_H_
#define PKARTA_MIX_H_

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

/// Under Davies activities at such an ionic strength and with such multivalent anions in the
/// solved state `e`: a warning naming them, the pH the same mixture has with explicit ion pairs
/// and under SIT, and what the published tables say; empty otherwise. analyse_mix() adds it to
/// the state's warnings.
std::string activity_model_hint(const Mixture& mixture, const Equilibrium& e);

/// Solves the mixture and derives capacity and the osmolality estimate.
MixResult analyse_mix(const Mixture& mixture, std::vector<std::string> inputs);

}  // namespace pkarta

#endif  // PKARTA_MIX_H_
