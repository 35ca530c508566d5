// Molar masses computed from formulas against published values.
#include "pkarta/chem/formula.h"

#include <gtest/gtest.h>

#include "pkarta/base/error.h"

namespace pkarta {
namespace {

// Tolerance 0.01 g/mol: the conventional atomic weights (IUPAC CIAAW standard atomic weights,
// computed from the CIAAW 2021 / IUPAC abridged table).
constexpr double kTol = 0.01;

TEST(MolarMass, PhosphateSaltsAgreeWithConventionalAtomicWeights) {
  EXPECT_NEAR(molar_mass_g_per_mol("KH2PO4"), 136.084, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("Na2HPO4"), 141.957, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("Na2HPO4.7H2O"), 268.062, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("Na2HPO4.12H2O"), 358.137, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("NaH2PO4.H2O"), 137.991, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("NaH2PO4.2H2O"), 156.006, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("K2HPO4"), 174.174, kTol);
}

TEST(MolarMass, OrganicBufferReagents) {
  // IUPAC CIAAW conventional atomic weights; handbook values in the last column agree within 0.01.
  EXPECT_NEAR(molar_mass_g_per_mol("C6H8O7"), 192.123, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("C6H8O7.H2O"), 210.138, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("Na3C6H5O7.2H2O"), 294.098, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("C4H11NO3"), 121.136, kTol);       // tris
  EXPECT_NEAR(molar_mass_g_per_mol("KHC8H4O4"), 204.222, kTol);       // KHP
  EXPECT_NEAR(molar_mass_g_per_mol("NaC2H3O2.3H2O"), 136.079, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("CH3COOH"), 60.052, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("KHC4H4O6"), 188.176, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("KH2C6H5O7"), 230.213, kTol);
}

TEST(MolarMass, InorganicAndHydrates) {
  EXPECT_NEAR(molar_mass_g_per_mol("NaCl"), 58.440, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("KCl"), 74.548, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("HCl"), 36.458, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("NaOH"), 39.997, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("Na2B4O7.10H2O"), 381.363, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("H3BO3"), 61.831, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("NaHCO3"), 84.006, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("Na2CO3"), 105.988, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("KH3(C2O4)2.2H2O"), 254.188, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("MgCl2.6H2O"), 203.295, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("CaCl2.2H2O"), 147.008, kTol);
  EXPECT_NEAR(molar_mass_g_per_mol("H2O"), 18.015, kTol);
}

TEST(MolarMass, DrugCrossChecks) {
  // Phenobarbital C12H12N2O3 232.24 and its sodium salt 254.22 (IARC Monographs vol. 79).
  EXPECT_NEAR(molar_mass_g_per_mol("C12H12N2O3"), 232.24, 0.02);
  EXPECT_NEAR(molar_mass_g_per_mol("C12H11N2NaO3"), 254.22, 0.02);
}

TEST(MolarMass, NestedParenthesesAndMultipliedAdducts) {
  EXPECT_NEAR(molar_mass_g_per_mol("Ca(OH)2"), 40.078 + 2 * (15.999 + 1.008), 1e-9);
  EXPECT_NEAR(molar_mass_g_per_mol("Na2SO4.10H2O"), molar_mass_g_per_mol("Na2SO4") + 10 * 18.015, 1e-9);
}

TEST(MolarMass, MalformedFormulasAreRejectedWithThePlace) {
  EXPECT_THROW(molar_mass_g_per_mol(""), InputError);
  EXPECT_THROW(molar_mass_g_per_mol("Xx2"), InputError);
  EXPECT_THROW(molar_mass_g_per_mol("Na(Cl"), InputError);
  EXPECT_THROW(molar_mass_g_per_mol("NaCl."), InputError);
  EXPECT_THROW(molar_mass_g_per_mol("nacl"), InputError);
  EXPECT_THROW(molar_mass_g_per_mol("H0"), InputError);
  try {
    molar_mass_g_per_mol("KQ2");
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("unknown element 'Q'"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace pkarta
