// Building a Mixture from library reagents, media and a drug dose.
#ifndef PKARTA_MIXTURE_BUILDER_H_
#define PKARTA_MIXTURE_BUILDER_H_

#include <string>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/model.h"
#include "pkarta/chem/units.h"

namespace pkarta {

/// Concentration (mol/L) of a reagent given as an amount (mass units use its formula mass).
double reagent_conc_mol_per_L(const Library& library, const std::string& reagent_id,
                              const Amount& amount, double temperature_C);

/// Adds a reagent at a concentration: the systems and strong ions it gives.
void add_reagent(Mixture& mixture, const Library& library, const std::string& reagent_id,
                 double conc_mol_per_L);

/// Adds a medium's reagents, scaled by `fraction` (volume fraction of the medium).
void add_medium(Mixture& mixture, const Library& library, const std::string& medium_id,
                double fraction = 1.0);

/// Dose concentration (mol/L of drug) from an amount of the form weighed (the amount refers to
/// the form: the free form or the salt's m:n formula units, whose molar mass includes the
/// counterions; each formula unit holds m drug ions).
double dose_conc_mol_per_L(const Library& library, const Compound& compound, const std::string& form,
                           const Amount& amount, double temperature_C);

/// How a dose is stated: as an amount of the form weighed (the default), or as its free-form
/// equivalent, the common label claim "equivalent to 2 mg/mL of the base" (the amount then
/// converts with the free form's molar mass, whatever salt is weighed).
enum class DoseBasis { kFormWeighed, kFreeForm };

/// The drug's total in mol/L for an amount stated on `basis` (see above).
double dose_conc_mol_per_L(const Library& library, const Compound& compound, const std::string& form,
                           const Amount& amount, double temperature_C, DoseBasis basis);

/// Adds the drug at a dose in a form: the drug total, plus the salt's counterion (n/m of the
/// dose for an m:n salt).
void add_drug(Mixture& mixture, const Library& library, const Compound& compound,
              double dose_mol_per_L, const std::string& form);

}  // namespace pkarta

#endif  // PKARTA_MIXTURE_BUILDER_H_
