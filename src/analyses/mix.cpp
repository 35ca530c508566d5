#include "pkarta/analyses/mix.h"

#include <algorithm>

#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

std::string DaviesDriftConditions::words() const {
  std::string names;
  for (const std::string& id : systems) names += (names.empty() ? "" : ", ") + id;
  return "ionic strength " + sig(ionic_strength_mol_per_L, 2) + " mol/L with " + sig(multivalent_mol_per_L * 1e3, 2) +
         " mM of di- and trivalent anions (" + names + ")";
}

std::optional<DaviesDriftConditions> davies_drift_conditions(const Mixture& mixture, const Equilibrium& e) {
  if (mixture.activity != ActivityModel::kDavies || !(e.ionic_strength_mol_per_L > kDaviesHintIonicStrength)) {
    return std::nullopt;
  }
  const std::string drug = mixture.drug ? mixture.drug->compound.system.id : std::string();
  DaviesDriftConditions c;
  c.ionic_strength_mol_per_L = e.ionic_strength_mol_per_L;
  for (const Species& sp : e.species) {
    if (sp.system.empty() || sp.system == drug || sp.charge > -2) continue;
    c.multivalent_mol_per_L += sp.conc_mol_per_L;
    if (std::find(c.systems.begin(), c.systems.end(), sp.system) == c.systems.end()) c.systems.push_back(sp.system);
  }
  if (c.multivalent_mol_per_L < kDaviesHintMultivalentMolPerL) return std::nullopt;
  return c;
}

std::string activity_model_hint(const Mixture& mixture, const Equilibrium& e) {
  const std::optional<DaviesDriftConditions> c = davies_drift_conditions(mixture, e);
  if (!c) return {};
  return c->words() +
         ": Davies activities run alkaline here against published buffer tables (McIlvaine 1921: +0.05 to "
         "+0.15 pH at I 0.3-0.6); --activity ion-pairs or sit comes closer (README, \"Accuracy\")";
}

MixResult analyse_mix(const Mixture& mixture, std::vector<std::string> inputs) {
  MixResult r;
  r.inputs = std::move(inputs);
  r.activity = mixture.activity;
  r.equilibrium = solve(mixture);
  if (mixture.drug) r.drug_name = mixture.drug->compound.name;
  if (r.equilibrium.usable()) {
    if (std::string hint = activity_model_hint(mixture, r.equilibrium); !hint.empty()) {
      r.equilibrium.warnings.push_back(std::move(hint));
    }
    r.capacity_mol_per_L_per_pH = buffer_capacity(mixture);
    r.osmolality_estimate_mOsm_per_kg = kOsmoticCoefficient * r.equilibrium.osmolarity_mOsm_per_L /
                                        water_density_kg_per_L(mixture.temperature_C);
  }
  return r;
}

}  // namespace pkarta
