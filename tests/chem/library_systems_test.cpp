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

namespace pkarta {
namespace {

// Temperature dependence of the lactate, benzoate and histidine (imidazolium) steps: the
// library's pKa at 5 and 37 °C against van 't Hoff with constant dCp worked out here from each
// source's own numbers at 298.15 K (R = 8.314462618 J/(K mol), CODATA 2018), within 0.002;
// where the source gives pK at other temperatures as an equation, against that equation too.
double vant_hoff_by_hand(double pk25, double dH_J, double dCp, double t_C) {
  const double R = 8.314462618, ln10 = std::log(10.0), T0 = 298.15, T = t_C + 273.15;
  return pk25 + dH_J / (R * ln10) * (1.0 / T - 1.0 / T0) -
         dCp / (R * ln10) * (T0 / T - 1.0 + std::log(T / T0));
}

// Benzoic acid. Kettler, Wesolowski and Palmer 1995, "Dissociation quotient of benzoic acid in
// aqueous sodium chloride media to 250 °C", J. Solution Chem. 24(4), abstract: at 25 °C, 1 bar,
// I = 0, log Ka = -4.206, dH 0.3 kJ/mol, dCp -207 J/(K mol).
// Cross-check: "Ionization of aqueous benzoic acid: conductance and thermodynamics", J. Solution
// Chem. 8(5), 329-345 (doi 10.1007/BF00646786), abstract: pKa(m) = -75.5422 + 3136.34/T +
// 28.7965 log10 T - 6.8139e-3 T. Tolerance 0.015: the two studies differ by 0.005 at 25 °C
// (4.206 against 4.201), and the conductance fit's ionization heat capacity (about -37
// cal/(K mol), -155 J/(K mol), same abstract) against -207 adds up to 0.007 more by 5 °C.
TEST(LibrarySystems, BenzoateFollowsKettler1995) {
  const Library lib = builtin_library();
  const Pka& k = lib.system("benzoate").pkas.at(0);
  const auto conductance = [](double t_C) {
    const double T = t_C + 273.15;
    return -75.5422 + 3136.34 / T + 28.7965 * std::log10(T) - 6.8139e-3 * T;
  };
  for (double t : {5.0, 37.0}) {
    EXPECT_NEAR(k.at(t), vant_hoff_by_hand(4.206, 0.3e3, -207.0, t), 0.002) << t << " °C";
    EXPECT_NEAR(k.at(t), conductance(t), 0.015) << t << " °C";
  }
  EXPECT_NEAR(k.at(25.0), 4.206, 0.002);
}

// Lactic acid. Martin and Tartar's determination as summarised in the monograph "Holten",
// chapter V paragraph 1.1, quoted in the ECHA REACH registration dossier for lactic acid
// (dissociation constant): pKa = 3.857 + 5e-5 (t - 22.5)^2, t in °C. The source gives no dH or
// dCp; they follow from its equation at 25 °C (van 't Hoff: dH = -ln10 R T^2 dpK/dT, dCp =
// d(dH)/dT), worked out here. Against the equation itself at 5 and 37 °C the tolerance is
// 0.003: the equation holds d2pK/dT2 constant where the model holds dCp constant (they part by
// 0.0016 at 5 °C, worked out by hand), plus the rounding of dH and dCp in the library.
TEST(LibrarySystems, LactateFollowsMartinAndTartar) {
  const Library lib = builtin_library();
  const Pka& k = lib.system("lactate").pkas.at(0);
  const double R = 8.314462618, ln10 = std::log(10.0), T0 = 298.15;
  const auto equation = [](double t_C) { return 3.857 + 5e-5 * (t_C - 22.5) * (t_C - 22.5); };
  const double slope = 2.0 * 5e-5 * (25.0 - 22.5), curvature = 2.0 * 5e-5;  // per K, per K^2
  const double dH = -ln10 * R * T0 * T0 * slope;                                   // J/mol
  const double dCp = -ln10 * R * (2.0 * T0 * slope + T0 * T0 * curvature);          // J/(K mol)
  for (double t : {5.0, 37.0}) {
    EXPECT_NEAR(k.at(t), vant_hoff_by_hand(equation(25.0), dH, dCp, t), 0.002) << t << " °C";
    EXPECT_NEAR(k.at(t), equation(t), 0.003) << t << " °C";
  }
}

// L-histidine, imidazolium step. Bhattacharya and Lecomte 1997, "Temperature dependence of
// histidine ionization constants in myoglobin", abstract: standard enthalpy of ionization 29
// kJ/mol for free histidine (no dCp given: 0). The pK 6.07 at 25 °C is the library's (recalled
// from Goldberg et al. 2002, to be verified); the source gives no pK at other temperatures.
TEST(LibrarySystems, HistidineImidazoliumFollowsBhattacharyaAndLecomte) {
  const Library lib = builtin_library();
  const Pka& k = lib.system("histidine").pkas.at(1);
  for (double t : {5.0, 37.0})
    EXPECT_NEAR(k.at(t), vant_hoff_by_hand(6.07, 29e3, 0.0, t), 0.002) << t << " °C";
  EXPECT_LT(k.at(37.0), k.at(25.0) - 0.15);  // an amine-like step: pK falls about 0.2 by 37 °C
}

// Amino acids without their own dH read: the class values of Bretti, Giuffrè, Lando and
// Sammartano 2016, SpringerPlus 5, 928, abstract (protonation dH of the amino group -44.5 +/- 0.4
// kJ/mol, of the carboxylate -2.5 +/- 1.6 kJ/mol, I = 0, 25 °C, mean of six alpha-amino acids),
// with the sign of ionization. Checks: glycine's own values (Goldberg, Kishore and Lennen 2002,
// recalled, to be verified) lie within the class ranges; each amino step of glutamate, arginine
// and histidine moves with 44.5 kJ/mol (the pK falls by 0.56 from 5 to 25 °C, worked out with
// van 't Hoff by hand); carboxyl steps barely move (Nagai, Kuwabara and Carta 2008, J. Chem. Eng.
// Data 53, 619, abstract: glutamic acid's two carboxyl pK "almost independent of temperature").
TEST(LibrarySystems, AminoAcidStepsMoveWithTheClassEnthalpies) {
  const Library lib = builtin_library();
  const AcidBaseSystem& gly = lib.system("glycine");
  EXPECT_NEAR(gly.pkas.at(1).dH_kJ_per_mol, 44.5, 0.4 + 0.5);   // class sd + Goldberg's +/-0.5
  EXPECT_NEAR(gly.pkas.at(0).dH_kJ_per_mol, 2.5, 1.6);
  struct Step {
    const char* system;
    std::size_t index;
    double dH_kJ;
  };
  for (const Step& st : {Step{"glutamate", 2, 44.5}, Step{"arginine", 1, 44.5}, Step{"histidine", 2, 44.5},
                         Step{"glutamate", 0, 2.5}, Step{"glutamate", 1, 2.5}, Step{"arginine", 0, 2.5},
                         Step{"histidine", 0, 2.5}}) {
    const Pka& k = lib.system(st.system).pkas.at(st.index);
    const double pk25 = k.at(25.0);
    for (double t : {5.0, 40.0})
      EXPECT_NEAR(k.at(t), vant_hoff_by_hand(pk25, st.dH_kJ * 1e3, 0.0, t), 0.002) << st.system << " step " << st.index << " " << t << " °C";
    if (st.dH_kJ > 40) {
      EXPECT_NEAR(k.at(5.0) - pk25, 0.56, 0.01) << st.system;  // 44.5e3/(R ln10) (1/278.15 - 1/298.15) = 0.5606
    } else {
      EXPECT_LT(std::fabs(k.at(40.0) - k.at(5.0)), 0.06) << st.system;
    }
  }
}

// Meglumine: no measured dH read; diethanolamine's (the analogous secondary amino alcohol,
// Goldberg et al. 2002, recalled, to be verified) is used, so the amine's pK falls with
// temperature as an aliphatic amine's does (diethanolamine itself: 8.883 at 25 °C).
TEST(LibrarySystems, MeglumineTakesTheDiethanolamineEnthalpy) {
  const Library lib = builtin_library();
  const Pka& meg = lib.system("meglumine").pkas.at(0);
  const Pka& dea = lib.system("diethanolamine").pkas.at(0);
  EXPECT_NEAR(meg.dH_kJ_per_mol, dea.dH_kJ_per_mol, 0.1);
  EXPECT_GT(meg.at(5.0) - meg.at(25.0), 0.45);
  EXPECT_LT(meg.at(40.0) - meg.at(25.0), -0.3);
}

}  // namespace
}  // namespace pkarta
