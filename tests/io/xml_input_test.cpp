// The XML readers on their own: positions in files with any line ending, NUL bytes, huge
// fields, and a valid compound read back. Positions are 1-based line:column (common practice
// of compilers and editors).
#include "pkarta/io/xml_input.h"

#include <gtest/gtest.h>

#include <string>

#include "pkarta/base/error.h"

namespace {

const pkarta::Library& library() {
  static const pkarta::Library lib = pkarta::builtin_library();
  return lib;
}

std::string error_of(const std::string& text) {
  pkarta::Warnings warnings;
  try {
    pkarta::parse_compound(text, "c.xml", library(), &warnings);
  } catch (const pkarta::InputError& e) {
    return e.what();
  }
  return "";
}

const char* const kGood =
    "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
    " <intrinsic-solubility value='1' unit='ug/mL'/>\n</compound>\n";

TEST(XmlInput, ReadsAValidCompound) {
  pkarta::Warnings warnings;
  const pkarta::Compound c = pkarta::parse_compound(kGood, "c.xml", library(), &warnings);
  EXPECT_EQ(c.id, "x");
  EXPECT_DOUBLE_EQ(c.molar_mass_g_per_mol, 300.0);
  ASSERT_EQ(c.system.pkas.size(), 1u);
  EXPECT_DOUBLE_EQ(c.system.pkas[0].value, 8.0);
  EXPECT_TRUE(warnings.empty());
}

TEST(XmlInput, LineNumbersCountLfCrlfAndLoneCr) {
  // The same error on line 3 whatever the line ends: <pka> with a bad type.
  for (const std::string eol : {"\n", "\r\n", "\r"}) {
    const std::string text = "<compound id='x' name='x' molar-mass='300'>" + eol +
                             " <intrinsic-solubility value='1' unit='ug/mL'/>" + eol +
                             " <pka value='8' type='weird'/>" + eol + "</compound>" + eol;
    const std::string e = error_of(text);
    EXPECT_EQ(e.rfind("c.xml:3:2: ", 0), 0u) << "line end " << (eol == "\r" ? "CR" : eol == "\n" ? "LF" : "CRLF")
                                             << ": " << e;
  }
}

TEST(XmlInput, NulByteIsAnErrorAtItsOwnPosition) {
  std::string text = kGood;
  text.insert(text.find("<pka") + 4, 1, '\0');  // line 2, column 6
  EXPECT_EQ(error_of(text).rfind("c.xml:2:6: NUL byte", 0), 0u) << error_of(text);
  // A NUL after the closing tag is not ignored either.
  std::string tail = std::string(kGood) + std::string(1, '\0') + "<more/>";
  EXPECT_NE(error_of(tail).find("NUL byte"), std::string::npos);
}

TEST(XmlInput, HugeFieldIsShownShortenedWithItsLength) {
  const std::string id(100000, 'q');
  const std::string text = "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
                           " <intrinsic-solubility value='1' unit='ug/mL'/>\n <salt id='s' counterion='" +
                           id + "' ksp='1e-3'/>\n</compound>\n";
  const std::string e = error_of(text);
  EXPECT_NE(e.find("(100000 characters)"), std::string::npos) << e.substr(0, 300);
  EXPECT_LT(e.size(), 400u);
}

TEST(XmlInput, ShownKeepsShortTextAndCutsLongTextOnACharacterBoundary) {
  EXPECT_EQ(pkarta::shown("25mM"), "25mM");
  std::string degrees;
  for (int i = 0; i < 60; ++i) degrees += "\xC2\xB0";  // 120 bytes of two-byte characters
  const std::string s = pkarta::shown(degrees);
  EXPECT_EQ(s.substr(0, 80), degrees.substr(0, 80));
  EXPECT_NE(s.find("... (120 characters)"), std::string::npos);
}

}  // namespace

// A weak-acid counterion: the species of a library system named by its charge (hydrogen
// maleate, HA- of the maleate system). Without a molar mass the salt's is the free base plus
// the neutral parent acid (proton transfer): 300 + 116.07 (maleic acid, C4H4O4, from IUPAC
// atomic weights) g/mol.
TEST(XmlInput, WeakAcidCounterionIsASpeciesOfALibrarySystem) {
  const std::string text =
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='mg/mL'/>\n"
      " <salt id='maleate' counterion='maleate' counterion-charge='-1' "
      "solubility-in-water='5 mg/mL'/>\n</compound>\n";
  pkarta::Warnings warnings;
  const pkarta::Compound c = pkarta::parse_compound(text, "c.xml", library(), &warnings);
  ASSERT_EQ(c.salts.size(), 1u);
  EXPECT_TRUE(c.salts[0].counterion_is_system);
  EXPECT_EQ(c.salts[0].counterion_charge, -1);
  EXPECT_EQ(pkarta::counterion_label(c.salts[0], library()), "maleate HA-");
  ASSERT_TRUE(c.salts[0].solubility_in_water_mol_per_L.has_value());
  EXPECT_NEAR(*c.salts[0].solubility_in_water_mol_per_L, 5.0 / 416.07, 5.0 / 416.07 * 1e-3);
  ASSERT_TRUE(c.salts[0].ksp.has_value());
  EXPECT_GT(*c.salts[0].ksp, 0.0);
}

TEST(XmlInput, WeakCounterionErrorsNameTheSaltAndItsPlace) {
  const std::string head =
      "<compound id='x' name='x' molar-mass='300'>\n <pka value='8' type='base'/>\n"
      " <intrinsic-solubility value='1' unit='mg/mL'/>\n";
  // No species of charge -3 in maleate (H2A, HA-, A2-).
  std::string e = error_of(head + " <salt id='m' counterion='maleate' counterion-charge='-3' ksp='1e-3'/>\n</compound>\n");
  EXPECT_NE(e.find("c.xml:4:"), std::string::npos) << e;
  EXPECT_NE(e.find("-1 (HA-), -2 (A2-)"), std::string::npos) << e;
  // A system named without counterion-charge gets a hint.
  e = error_of(head + " <salt id='m' counterion='maleate' ksp='1e-3'/>\n</compound>\n");
  EXPECT_NE(e.find("c.xml:4:"), std::string::npos) << e;
  EXPECT_NE(e.find("give counterion-charge"), std::string::npos) << e;
  // Hydrogen maleate (-1) cannot pair 1:2 with a monobasic base (needs charge 2).
  e = error_of(head + " <salt id='m' counterion='maleate' counterion-charge='-1' stoichiometry='1:2' ksp='1e-3'/>\n</compound>\n");
  EXPECT_NE(e.find("c.xml:4:"), std::string::npos) << e;
  EXPECT_NE(e.find("no species of charge 2"), std::string::npos) << e;
}
