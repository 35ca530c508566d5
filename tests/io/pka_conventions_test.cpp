// Apparent pKa (concentration or mixed scale at a stated ionic strength) converted to the
// thermodynamic pKa with Davies activities when a compound or library file is read; a stated
// ionic strength of the S0 measurement is recorded and needs no correction.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

std::string acetic_compound(const std::string& pka_attributes, const std::string& s0_attributes = "") {
  return "<compound id=\"acetic\" molar-mass=\"60.05\">\n"
         "  <pka value=\"" + pka_attributes + " type=\"acid\"/>\n"
         "  <intrinsic-solubility value=\"1\" unit=\"M\"" + s0_attributes + "/>\n"
         "</compound>\n";
}

// Acetic acid, 25 °C. Concentration-scale constant at I = 0.1 mol/L: log K = 4.56 (Martell and
// Smith, Critical Stability Constants vol. 3, 1977; recalled, to be verified). Thermodynamic
// value: 4.756 (Goldberg, Kishore and Lennen 2002, J. Phys. Chem. Ref. Data 31, 231; Harned and
// Ehlers 1933, J. Am. Chem. Soc. 55, 652). Davies, HA -> A- + H+: pKa = pKc + 2 A f(I), with
// A = 0.511 and f(0.1) = 0.2103, i.e. 4.56 + 0.215 = 4.775, 0.019 from 4.756.
TEST(PkaConventions, ApparentAceticAcidConvertsToThermodynamic) {
  const Library lib = builtin_library();
  const Compound c = parse_compound(
      acetic_compound("4.56\" scale=\"concentration\" ionic-strength=\"0.1\" electrolyte=\"KCl\""), "acetic.xml", lib,
      nullptr);
  ASSERT_EQ(c.system.pkas.size(), 1u);
  EXPECT_NEAR(c.system.pkas[0].value, 4.756, 0.02);
  EXPECT_DOUBLE_EQ(c.system.pkas[0].stated_value, 4.56);
  const std::vector<std::string> notes = c.convention_notes();
  ASSERT_EQ(notes.size(), 1u);
  EXPECT_NE(notes[0].find("apparent"), std::string::npos) << notes[0];
  EXPECT_NE(notes[0].find("I = 0.100 mol/L KCl"), std::string::npos) << notes[0];
  EXPECT_NE(notes[0].find("thermodynamic 4.775"), std::string::npos) << notes[0];
}

// The conversion is the inverse of the solver's own Davies model: a buffer solved at about
// I = 0.15 mol/L gives concentration- and mixed-scale constants that convert back to the
// library's thermodynamic pKa. Phosphate pK2 (H2PO4- -> HPO4(2-)) checks the charges of a
// step that does not start from a neutral species: mixed scale pKa = pKmix + 3 D,
// concentration scale pKa = pKc + 4 D.
TEST(PkaConventions, RoundTripThroughTheSolverAtPhysiologicalIonicStrength) {
  const Library lib = builtin_library();
  Mixture m;
  add_reagent(m, lib, "KH2PO4", 0.01);
  add_reagent(m, lib, "Na2HPO4", 0.01);
  add_reagent(m, lib, "NaCl", 0.11);
  const Equilibrium e = solve(m);
  ASSERT_TRUE(e.usable());
  EXPECT_NEAR(e.ionic_strength_mol_per_L, 0.15, 0.01);
  double h = 0, h2a = 0, ha = 0;
  for (const Species& s : e.species) {
    if (s.name == "H+") h = s.conc_mol_per_L;
    if (s.system == "phosphate" && s.charge == -1) h2a = s.conc_mol_per_L;
    if (s.system == "phosphate" && s.charge == -2) ha = s.conc_mol_per_L;
  }
  ASSERT_GT(h, 0);
  const double pkmix = e.pH - std::log10(ha / h2a);
  const double pkc = -std::log10(h) - std::log10(ha / h2a);
  const double I = e.ionic_strength_mol_per_L;
  const double thermo = lib.system("phosphate").pkas[1].value;
  EXPECT_NEAR(thermodynamic_pka(PkaScale::kMixed, pkmix, I, -1, 25.0), thermo, 1e-6);
  EXPECT_NEAR(thermodynamic_pka(PkaScale::kConcentration, pkc, I, -1, 25.0), thermo, 1e-6);

  // The same through a library file: the apparent pK2 read back as the thermodynamic one.
  char text[1024];
  std::snprintf(text, sizeof text,
                "<library id=\"t\" version=\"1\">\n"
                "  <system id=\"phosphate\">\n"
                "    <pka value=\"2.148\" type=\"acid\"/>\n"
                "    <pka value=\"%.10f\" type=\"acid\" scale=\"mixed\" ionic-strength=\"%.10f\"/>\n"
                "    <pka value=\"12.35\" type=\"acid\"/>\n"
                "  </system>\n"
                "</library>\n",
                pkmix, I);
  const Library over = parse_library(text, "apparent.xml", &lib, nullptr);
  EXPECT_NEAR(over.system("phosphate").pkas[1].value, thermo, 1e-6);
  EXPECT_NEAR(over.system("phosphate").pkas[0].value, 2.148, 1e-12);
}

// A base group (R-NH3+ -> R-NH2, zA = +1): concentration scale pKa = pKc + D (1 + 0 - 1) = pKc,
// mixed scale pKa = pKmix - D (the charges of the two species set the correction).
TEST(PkaConventions, BaseGroupCorrectionFollowsTheCharges) {
  EXPECT_NEAR(thermodynamic_pka(PkaScale::kConcentration, 9.0, 0.15, 1, 25.0), 9.0, 1e-12);
  EXPECT_LT(thermodynamic_pka(PkaScale::kMixed, 9.0, 0.15, 1, 25.0), 9.0 - 0.1);
  EXPECT_DOUBLE_EQ(thermodynamic_pka(PkaScale::kThermodynamic, 9.0, 0.15, 1, 25.0), 9.0);
}

TEST(PkaConventions, IntrinsicSolubilityIonicStrengthIsRecordedNotCorrected) {
  const Library lib = builtin_library();
  const Compound c = parse_compound(acetic_compound("4.756\"", " ionic-strength=\"0.15\" electrolyte=\"phosphate buffer\""),
                                    "acetic.xml", lib, nullptr);
  EXPECT_DOUBLE_EQ(c.s0_mol_per_L, 1.0);
  EXPECT_DOUBLE_EQ(c.s0_stated_ionic_strength_mol_per_L, 0.15);
  const std::vector<std::string> notes = c.convention_notes();
  ASSERT_EQ(notes.size(), 1u);
  EXPECT_NE(notes[0].find("no correction"), std::string::npos) << notes[0];
  EXPECT_TRUE(parse_compound(acetic_compound("4.756\""), "acetic.xml", lib, nullptr).convention_notes().empty());
}

TEST(PkaConventions, BadAttributesAreInputErrorsWithAPlace) {
  const Library lib = builtin_library();
  for (const char* attrs : {"4.56\" scale=\"mixed\"", "4.56\" ionic-strength=\"0.1\"", "4.56\" scale=\"activity\"",
                            "4.56\" scale=\"mixed\" ionic-strength=\"2\""}) {
    try {
      parse_compound(acetic_compound(attrs), "acetic.xml", lib, nullptr);
      ADD_FAILURE() << attrs;
    } catch (const InputError& e) {
      EXPECT_NE(std::string(e.what()).find("acetic.xml:2:"), std::string::npos) << e.what();
    }
  }
}

}  // namespace
}  // namespace pkarta
