// Salt forms: molar mass of each form and Ksp from a salt's solubility in water.
#include "pkarta/chem/equilibrium.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "equilibrium_internal.h"
#include "pkarta/base/format.h"
#include "pkarta/chem/formula.h"
#include "pkarta/chem/water.h"

namespace pkarta {

using equilibrium_detail::ipow;

double form_molar_mass(const Compound& compound, const std::string& form, const Library& library) {
  if (form.empty() || form == "free") return compound.molar_mass_g_per_mol;
  const Salt* s = compound.salt(form);
  if (!s) {
    std::string known;
    for (const Salt& x : compound.salts) known += ", " + x.id;
    throw InputError("compound '" + compound.id + "' has no salt '" + form + "' (forms: free" + known + ")");
  }
  return salt_molar_mass(compound, *s, library);
}

double salt_molar_mass(const Compound& compound, const Salt& salt, const Library& library) {
  const Salt* s = &salt;
  if (s->molar_mass_g_per_mol > 0) return s->molar_mass_g_per_mol;
  if (s->counterion_is_system) {
    // Proton transfer from the counterion's neutral parent (maleic acid, tromethamine) to the
    // drug: m free form + n parent, the parent being the library reagent that gives the system
    // alone (m z_drug + n z_counterion = 0, so the protons balance).
    for (const auto& [id, r] : library.reagents) {
      if (r.gives.size() == 1 && r.gives[0].kind == Contribution::Kind::kSystem &&
          r.gives[0].id == s->counterion && r.gives[0].count == 1.0 && r.molar_mass_g_per_mol > 0) {
        const AcidBaseSystem& sys = library.system(s->counterion);
        if (sys.neutral_index() < 0 || compound.system.permanent_charge != 0) break;
        return s->drug_count * compound.molar_mass_g_per_mol +
               s->counterion_count * r.molar_mass_g_per_mol;
      }
    }
    throw InputError(s->where, "salt '" + s->id + "': give its molar-mass (no library reagent is the "
                               "neutral parent of the counterion system '" + s->counterion + "')");
  }
  const Ion& ion = library.ion(s->counterion);
  const double h = molar_mass_g_per_mol("H");
  // BH+ X-: free base + H + X; M+ A-: free acid - H + M.
  if (s->drug_count == 1 && s->counterion_count == 1 && (ion.charge == 1 || ion.charge == -1)) {
    return compound.molar_mass_g_per_mol + ion.molar_mass_g_per_mol + (ion.charge < 0 ? h : -h);
  }
  // (B H_z)_m X_n: m (free form + z H) + n X, z the drug's charge in the salt.
  const int zd = s->drug_charge(ion.charge);
  return s->drug_count * (compound.molar_mass_g_per_mol + zd * h) +
         s->counterion_count * ion.molar_mass_g_per_mol;
}

void resolve_salt_ksp(Compound& compound, const Library& library) {
  for (Salt& salt : compound.salts) {
    if (salt.ksp || !salt.solubility_in_water_mol_per_L) continue;
    const int zc = counterion_charge_of(salt, library);
    Mixture m;
    m.temperature_C = salt.ref_temperature_C;
    const double s = *salt.solubility_in_water_mol_per_L;  // formula units
    const int sm = salt.drug_count, sn = salt.counterion_count;
    DrugAmount d;
    d.compound = compound;
    d.compound.salts.clear();
    d.dose_mol_per_L = sm == 1 ? s : sm * s;
    d.form = salt.id;
    d.allow_solids = false;
    m.drug = d;
    if (salt.counterion_is_system) {
      m.add_system(library.system(salt.counterion), sn == 1 ? s : sn * s);
    } else {
      const Ion& ion = library.ion(salt.counterion);
      m.add_ion(ion.id, ion.charge, sn == 1 ? s : sn * s);
    }
    const Equilibrium e = solve(m);
    if (!e.usable()) {
      throw InputError(salt.where, "salt '" + salt.id + "': could not solve its solution in water");
    }
    const int zd = salt.drug_charge(zc);
    const int j = compound.system.z0() - zd;
    if (j < 0 || j > static_cast<int>(compound.system.pkas.size())) {
      throw InputError(salt.where, "salt '" + salt.id + "': the compound has no species of charge " +
                                       std::to_string(zd) + " to pair " + salt.stoichiometry() +
                                       " with " + salt.counterion);
    }
    if (compound.has_intrinsic_solubility && compound.system.neutral_index() >= 0 &&
        e.drug->neutral_mol_per_L > compound.s0_at(m.temperature_C)) {
      throw InputError(salt.where, "salt '" + salt.id + "' would disproportionate in water: at its own pH " +
                                       fixed(e.pH, 2) + " the free form exceeds its intrinsic solubility; "
                                       "give ksp instead of solubility-in-water");
    }
    // The counterion's concentration: all of it for a strong ion, the one species of a system.
    double x = sn * s;
    if (salt.counterion_is_system) {
      x = 0.0;
      for (const Species& sp : e.species) {
        if (sp.system == salt.counterion && sp.charge == zc) x = sp.conc_mol_per_L;
      }
    }
    if (sm == 1 && sn == 1 && !salt.counterion_is_system) {
      const double g = davies_gamma(1, e.ionic_strength_mol_per_L, m.temperature_C);
      const double ion_conc = s * e.drug->fractions[j];
      salt.ksp = g * g * ion_conc * s;
    } else {
      const double gd = davies_gamma(zd, e.ionic_strength_mol_per_L, m.temperature_C);
      const double gx = davies_gamma(zc, e.ionic_strength_mol_per_L, m.temperature_C);
      salt.ksp = ipow(gd * sm * s * e.drug->fractions[j], sm) *
                 (salt.counterion_is_system ? ipow(gx * x, sn) : ipow(gx * sn * s, sn));
    }
  }
}

}  // namespace pkarta
