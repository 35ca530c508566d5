#include "pkarta/analyses/mix.h"

#include <algorithm>
#include <optional>

#include "pkarta/base/format.h"
#include "pkarta/chem/water.h"

namespace pkarta {

namespace {

// Where Davies is known to drift: the solved state's ionic strength, its di- and trivalent buffer
// anions (mol/L: species of charge -2 or below of the library systems, the drug's own excluded)
// and the ids of their systems.
struct DaviesDriftConditions {
  double ionic_strength_mol_per_L = 0.0;
  double multivalent_mol_per_L = 0.0;
  std::vector<std::string> systems;
  // "ionic strength 0.22 mol/L with 40 mM of di- and trivalent anions (phosphate)"
  std::string words() const;
};

std::string DaviesDriftConditions::words() const {
  std::string names;
  for (const std::string& id : systems) names += (names.empty() ? "" : ", ") + id;
  return "ionic strength " + sig(ionic_strength_mol_per_L, 2) + " mol/L with " + sig(multivalent_mol_per_L * 1e3, 2) +
         " mM of di- and trivalent anions (" + names + ")";
}

// Set under Davies activities above kDaviesHintIonicStrength with at least
// kDaviesHintMultivalentMolPerL of multivalent anions in `e`.
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

}  // namespace

std::string activity_model_hint(const Mixture& mixture, const Equilibrium& e) {
  const std::optional<DaviesDriftConditions> c = davies_drift_conditions(mixture, e);
  if (!c) return {};
  // The pH of the same solution under the two models made for this range.
  std::string others;
  for (const ActivityModel m : {ActivityModel::kIonPairs, ActivityModel::kSit}) {
    Mixture other = mixture;
    other.activity = m;
    const Equilibrium x = solve(other);
    if (!x.usable()) continue;
    others += std::string(others.empty() ? "pH " : " and ") + fixed(x.pH, 2) +
              (m == ActivityModel::kSit ? " under SIT (--activity sit)" : " with explicit ion pairs (--activity ion-pairs)");
  }
  std::string text = c->words() + ": the activity models part here";
  if (!others.empty()) text += "; the same solution gives " + others + ", against Davies' " + fixed(e.pH, 2);
  return text + ". Against McIlvaine's citrate-phosphate table (1921) Davies runs 0.05-0.15 pH alkaline at I "
                "0.3-0.6, ion pairs and SIT within 0.07 (README, \"Accuracy\")";
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
