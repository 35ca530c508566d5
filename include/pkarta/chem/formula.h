// Chemical formulas to molar masses, from IUPAC standard atomic weights.
#ifndef PKARTA_FORMULA_H_
#define PKARTA_FORMULA_H_

#include <string_view>

namespace pkarta {

/// Molar mass in g/mol of a formula such as "KH2PO4", "Ca(OH)2", "Na2HPO4.7H2O" or
/// "C6H10ClN3O2.H2O". Parentheses nest; a hydrate or adduct follows a '.' (or '*') with an
/// optional leading multiplier. Atomic weights: CIAAW/IUPAC standard atomic weights, using
/// the conventional (abridged) values for elements given as intervals (H 1.008, C 12.011,
/// N 14.007, O 15.999, B 10.81, Cl 35.45, S 32.06, Mg 24.305, Br 79.904, Li 6.94).
/// Throws InputError for unknown elements or malformed formulas.
///
/// Example: molar_mass("KH2PO4") == 136.084 (to 0.001)
double molar_mass_g_per_mol(std::string_view formula);

}  // namespace pkarta

#endif  // PKARTA_FORMULA_H_
