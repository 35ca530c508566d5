// The oxalate, ammonia, formate, imidazole and MOPS systems and the calcium hydroxide and sodium
// citrate reagents of the built-in library, each checked against a published pH at 25 °C.
//
// Sources and tolerances:
//  - Potassium tetroxalate 0.05 mol/kg, pH 1.679: the reference standard of Buck et al.,
//    "Measurement of pH. Definition, standards, and procedures (IUPAC Recommendations 2002)",
//    Pure Appl. Chem. 74, 2169 (recalled, to be verified). Tolerance 0.02, as for the primary
//    standards (Davies against the Bates-Guggenheim convention of pH(S)).
//  - Calcium hydroxide saturated at 25 °C (0.0203 mol/kg), pH 12.454: Bates, Bower and Smith
//    1956, J. Res. NBS 56, 305 (recalled, to be verified). Tolerance 0.08: the ion pair CaOH+
//    (log K about 1.3) is not modelled, so free hydroxide and pH are slightly overstated.
//  - Sodium dihydrogen citrate 0.05 mol/kg: the potassium dihydrogen citrate primary standard,
//    pH 3.776 (Buck et al. 2002); the counterion is a spectator, tolerance 0.02.
//  - 0.1 mol/L ammonia pH 11.1 and 0.1 mol/L formic acid pH 2.3: CRC Handbook of Chemistry and
//    Physics, table "Approximate pH values of acids and bases" (recalled, to be verified). The
//    table rounds to 0.1 pH, so tolerance 0.1.
//  - Imidazole half-neutralized with HCl: pH = pKa 6.95 at 25 °C, and MOPS half-neutralized with
//    NaOH: pKa 7.20, as listed in the buffer tables of Beynon and Easterby 1996, "Buffer
//    Solutions: The Basics" (recalled, to be verified). At 10 mM ionic strength the activity
//    correction is about 0.04 pH; tolerance 0.1 (the tables give apparent values to 0.05).
// Fumarate has no published pH checked here.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

struct Case {
  const char* name;
  std::vector<std::pair<const char*, double>> amounts;  // reagent id, mol/L or mol/kg
  AmountUnit unit;
  double published_pH;
  double tolerance;
};

double ph_of(const Library& lib, const Case& c) {
  Mixture m;
  m.temperature_C = 25.0;
  Amount a;
  a.unit = c.unit;
  for (const auto& [id, v] : c.amounts) {
    a.value = v;
    add_reagent(m, lib, id, reagent_conc_mol_per_L(lib, id, a, 25.0));
  }
  const Equilibrium e = solve(m);
  EXPECT_TRUE(e.usable()) << c.name;
  return e.pH;
}

TEST(LibrarySystems, PublishedPhValuesAt25C) {
  const Library lib = builtin_library();
  const std::vector<Case> cases = {
      {"potassium tetroxalate 0.05 mol/kg", {{"potassium-tetroxalate.2H2O", 0.05}}, AmountUnit::kMolal, 1.679, 0.02},
      {"calcium hydroxide saturated", {{"calcium-hydroxide", 0.0203}}, AmountUnit::kMolal, 12.454, 0.08},
      {"sodium dihydrogen citrate 0.05 mol/kg", {{"sodium-dihydrogen-citrate", 0.05}}, AmountUnit::kMolal, 3.776, 0.02},
      {"ammonia 0.1 M", {{"ammonia-solution", 0.1}}, AmountUnit::kMolar, 11.1, 0.1},
      {"formic acid 0.1 M", {{"formic-acid", 0.1}}, AmountUnit::kMolar, 2.3, 0.1},
      {"imidazole 20 mM + HCl 10 mM", {{"imidazole", 0.02}, {"HCl", 0.01}}, AmountUnit::kMolar, 6.95, 0.1},
      {"MOPS 20 mM + NaOH 10 mM", {{"MOPS", 0.02}, {"NaOH", 0.01}}, AmountUnit::kMolar, 7.20, 0.1},
  };
  for (const Case& c : cases) {
    const double pH = ph_of(lib, c);
    std::printf("  %-40s pkarta %.3f  published %.3f\n", c.name, pH, c.published_pH);
    EXPECT_NEAR(pH, c.published_pH, c.tolerance) << c.name;
  }
}

// Stoichiometry of the new reagents (common practice: the formula fixes the counts).
TEST(LibrarySystems, NewReagentsGiveTheirFormulaCounts) {
  const Library lib = builtin_library();
  struct Expect { const char* reagent; const char* system; double count; const char* ion; double ions; };
  const std::vector<Expect> expected = {
      {"Na3PO4", "phosphate", 1, "Na+", 3},         {"K3PO4", "phosphate", 1, "K+", 3},
      {"Na3PO4.12H2O", "phosphate", 1, "Na+", 3},   {"disodium-tartrate.2H2O", "tartrate", 1, "Na+", 2},
      {"disodium-hydrogen-citrate", "citrate", 1, "Na+", 2},
      {"potassium-tetroxalate.2H2O", "oxalate", 2, "K+", 1}, {"NH4Cl", "ammonia", 1, "Cl-", 1},
  };
  for (const Expect& x : expected) {
    Mixture m;
    add_reagent(m, lib, x.reagent, 0.01);
    double sys = 0, ion = 0;
    for (const SystemAmount& s : m.systems) if (s.system.id == x.system) sys += s.total_mol_per_L;
    for (const IonAmount& i : m.ions) if (i.id == x.ion) ion += i.conc_mol_per_L;
    EXPECT_NEAR(sys, 0.01 * x.count, 1e-12) << x.reagent;
    EXPECT_NEAR(ion, 0.01 * x.ions, 1e-12) << x.reagent;
  }
  Mixture ca;
  add_reagent(ca, lib, "calcium-hydroxide", 0.01);
  ASSERT_EQ(ca.ions.size(), 1u);
  EXPECT_EQ(ca.ions[0].charge, 2);
}

}  // namespace
}  // namespace pkarta

namespace pkarta {
namespace {

// The sulfate system (HSO4- / SO4 2-, pK 1.99 at 25 °C, Martell and Smith, recalled, to be
// verified): 10 mM sodium hydrogen sulfate with activity coefficients 1 against the hand
// calculation of a weak acid, [H+]^2 / (C - [H+]) = Ka (the textbook quadratic, common
// practice); the charges of its species (-1, -2) and its temperature dependence (protonation
// enthalpy +22.6 kJ/mol: the pK rises with temperature, by van 't Hoff 0.133 from 25 to 50 °C).
TEST(LibrarySystems, SulfateSecondStep) {
  const Library lib = builtin_library();
  const AcidBaseSystem& s = lib.system("sulfate");
  ASSERT_EQ(s.pkas.size(), 1u);
  EXPECT_EQ(s.charge_of(0), -1);
  EXPECT_EQ(s.charge_of(1), -2);
  EXPECT_NEAR(s.pkas[0].at(50.0) - s.pkas[0].at(25.0),
              22.6e3 / (kGasConstant * kLn10) * (1.0 / 298.15 - 1.0 / 323.15), 1e-9);
  Mixture m;
  m.activity = ActivityModel::kIdeal;
  add_reagent(m, lib, "sodium-hydrogen-sulfate", 0.010);
  const Equilibrium e = solve(m);
  ASSERT_TRUE(e.usable());
  const double ka = std::pow(10.0, -1.99), c = 0.010;
  const double h = 0.5 * (-ka + std::sqrt(ka * ka + 4.0 * ka * c));  // water negligible
  EXPECT_NEAR(e.pH, -std::log10(h), 1e-3);
}

}  // namespace
}  // namespace pkarta
