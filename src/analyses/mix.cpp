#include "pkarta/analyses/mix.h"

#include "pkarta/chem/water.h"

namespace pkarta {

MixResult analyse_mix(const Mixture& mixture, std::vector<std::string> inputs) {
  MixResult r;
  r.inputs = std::move(inputs);
  r.activity = mixture.activity;
  r.equilibrium = solve(mixture);
  if (mixture.drug) r.drug_name = mixture.drug->compound.name;
  if (r.equilibrium.usable()) {
    r.capacity_mol_per_L_per_pH = buffer_capacity(mixture);
    r.osmolality_estimate_mOsm_per_kg = kOsmoticCoefficient * r.equilibrium.osmolarity_mOsm_per_L /
                                        water_density_kg_per_L(mixture.temperature_C);
  }
  return r;
}

}  // namespace pkarta
