// Invented compounds for the checks: one ionisable group, no salts, no temperature dependence.
#ifndef PKARTA_TESTS_SUPPORT_TEST_COMPOUNDS_H_
#define PKARTA_TESTS_SUPPORT_TEST_COMPOUNDS_H_

#include <string>

#include "pkarta/chem/model.h"

namespace pkarta_test {

/// A compound with one pKa (acid or base), intrinsic solubility s0 (mol/L) and a molar mass.
inline pkarta::Compound one_pka_compound(const std::string& id, double pka, pkarta::GroupType type,
                                         double s0_mol_per_L, double molar_mass_g_per_mol) {
  pkarta::Compound c;
  c.id = id;
  c.name = id;
  c.molar_mass_g_per_mol = molar_mass_g_per_mol;
  c.system.id = id;
  pkarta::Pka p;
  p.value = pka;
  p.type = type;
  c.system.pkas.push_back(p);
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = s0_mol_per_L;
  return c;
}

}  // namespace pkarta_test

#endif  // PKARTA_TESTS_SUPPORT_TEST_COMPOUNDS_H_
