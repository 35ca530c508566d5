#include "pkarta/chem/mixture_builder.h"

namespace pkarta {

double reagent_conc_mol_per_L(const Library& library, const std::string& reagent_id,
                              const Amount& amount, double temperature_C) {
  const Reagent& r = library.reagent(reagent_id);
  return amount.to_mol_per_L(r.molar_mass_g_per_mol, temperature_C);
}

void add_reagent(Mixture& mixture, const Library& library, const std::string& reagent_id,
                 double conc_mol_per_L) {
  const Reagent& r = library.reagent(reagent_id);
  for (const Contribution& c : r.gives) {
    if (c.kind == Contribution::Kind::kSystem) {
      mixture.add_system(library.system(c.id), c.count * conc_mol_per_L);
    } else {
      const Ion& ion = library.ion(c.id);
      mixture.add_ion(ion.id, ion.charge, c.count * conc_mol_per_L);
    }
  }
}

void add_medium(Mixture& mixture, const Library& library, const std::string& medium_id,
                double fraction) {
  const Medium& m = library.medium(medium_id);
  for (const auto& [reagent, conc] : m.reagents_mol_per_L) {
    add_reagent(mixture, library, reagent, conc * fraction);
  }
}

double dose_conc_mol_per_L(const Library& library, const Compound& compound, const std::string& form,
                           const Amount& amount, double temperature_C) {
  const double units = amount.to_mol_per_L(form_molar_mass(compound, form, library), temperature_C);
  const Salt* s = form.empty() || form == "free" ? nullptr : compound.salt(form);
  // An amount of an m:n salt is of its formula units, each holding m drug ions.
  return s && s->drug_count != 1 ? s->drug_count * units : units;
}

double dose_conc_mol_per_L(const Library& library, const Compound& compound, const std::string& form,
                           const Amount& amount, double temperature_C, DoseBasis basis) {
  if (basis == DoseBasis::kFormWeighed) return dose_conc_mol_per_L(library, compound, form, amount, temperature_C);
  form_molar_mass(compound, form, library);  // the form must exist
  return amount.to_mol_per_L(compound.molar_mass_g_per_mol, temperature_C);
}

void add_drug(Mixture& mixture, const Library& library, const Compound& compound,
              double dose_mol_per_L, const std::string& form) {
  DrugAmount d;
  d.compound = compound;
  d.dose_mol_per_L = dose_mol_per_L;
  d.form = form.empty() ? "free" : form;
  if (d.form != "free") {
    const Salt* s = compound.salt(d.form);
    if (!s) {
      std::string known;
      for (const Salt& x : compound.salts) known += (known.empty() ? "" : ", ") + x.id;
      throw InputError("compound '" + compound.id + "' has no salt '" + d.form + "' (forms: free" +
                       (known.empty() ? "" : ", " + known) + ")");
    }
    const double counterion = (s->drug_count == 1 && s->counterion_count == 1)
                                  ? dose_mol_per_L
                                  : dose_mol_per_L * s->counterion_count / s->drug_count;
    if (s->counterion_is_system) {
      // A weak-acid or weak-base counterion enters as its system (its equilibria apply).
      mixture.add_system(library.system(s->counterion), counterion);
    } else {
      const Ion& ion = library.ion(s->counterion);
      mixture.add_ion(ion.id, ion.charge, counterion);
    }
  }
  mixture.drug = d;
}

}  // namespace pkarta
