// The measured-solubility CSV reader: columns in any order, units, weights, located errors.
#include "pkarta/io/solubility_csv.h"

#include "pkarta/io/xml_input.h"

#include <gtest/gtest.h>

#include <string>
#include <vector>

namespace pkarta {
namespace {

TEST(SolubilityCsv, ColumnsInAnyOrderWithUnitsTemperatureAndWeights) {
  const std::string text =
      "# shake-flask, 24 h\n"
      "Unit,pH,Value,Temperature,log_sd\n"
      "mg/mL,2.0,3.0,37,0.05\n"
      "\n"
      "\"ug/mL\",7.5,\"12\",,\n"
      "M,9,1e-5,25,0.1\n";
  std::vector<std::string> warnings;
  const std::vector<FitPoint> p = parse_solubility_csv(text, "d.csv", 300.0, &warnings);
  ASSERT_EQ(p.size(), 3u);
  EXPECT_DOUBLE_EQ(p[0].pH, 2.0);
  EXPECT_NEAR(p[0].solubility_mol_per_L, 3.0 / 300.0, 1e-15);
  EXPECT_DOUBLE_EQ(p[0].temperature_C, 37.0);
  EXPECT_DOUBLE_EQ(p[0].log10_sd, 0.05);
  EXPECT_NEAR(p[1].solubility_mol_per_L, 12e-3 / 300.0, 1e-18);
  EXPECT_DOUBLE_EQ(p[1].temperature_C, 25.0);
  EXPECT_EQ(p[1].where.line, 5);
  EXPECT_DOUBLE_EQ(p[2].solubility_mol_per_L, 1e-5);
  EXPECT_TRUE(warnings.empty());
}

TEST(SolubilityCsv, ErrorsNameLineAndColumn) {
  auto error_of = [](const std::string& text) -> InputError {
    try {
      parse_solubility_csv(text, "d.csv", 300.0, nullptr);
    } catch (const InputError& e) {
      return e;
    }
    return InputError("no error");
  };
  InputError e = error_of("pH,value\n2,3\n");
  EXPECT_EQ(e.where().line, 1);
  EXPECT_NE(e.message().find("unit"), std::string::npos) << e.message();
  e = error_of("pH,value,unit\n2,3,mg/mL\n4,x3,mg/mL\n");
  EXPECT_EQ(e.where().line, 3);
  EXPECT_EQ(e.where().column, 3);
  EXPECT_NE(e.message().find("not a number"), std::string::npos);
  e = error_of("pH,value,unit\n2,-3,mg/mL\n");
  EXPECT_EQ(e.where().line, 2);
  EXPECT_NE(e.message().find("must be > 0"), std::string::npos);
  e = error_of("pH,value,unit\n2,3\n");
  EXPECT_EQ(e.where().line, 2);
  EXPECT_NE(e.message().find("fields"), std::string::npos);
  e = error_of("pH,value,unit\n2,3,furlongs\n");
  EXPECT_NE(e.message().find("unknown unit"), std::string::npos);
  e = error_of("2,3,mg/mL\n");
  EXPECT_NE(e.message().find("header"), std::string::npos);
  e = error_of("pH,value,unit\n20,3,mg/mL\n");
  EXPECT_NE(e.message().find("expected -1 to 15"), std::string::npos);
}

// The CSV 'unit' column and a compound file's 'unit' attribute accept and refuse the same
// texts: "e3M" was read by the CSV as M (the amount "1e3M") but refused by the XML reader.
TEST(SolubilityCsv, UnitColumnAgreesWithTheCompoundFileUnitAttribute) {
  const Library lib = builtin_library();
  auto csv_ok = [](const std::string& unit) {
    try {
      parse_solubility_csv("pH,value,unit\n2,3,\"" + unit + "\"\n", "d.csv", 300.0, nullptr);
      return true;
    } catch (const InputError&) {
      return false;
    }
  };
  auto xml_ok = [&](const std::string& unit) {
    try {
      parse_compound("<compound id='x' name='x' molar-mass='300'><pka value='8' type='base'/>"
                     "<intrinsic-solubility value='1' unit='ug/mL'/><measured-solubility>"
                     "<point pH='2' value='3' unit='" + unit + "'/></measured-solubility></compound>",
                     "c.xml", lib, nullptr);
      return true;
    } catch (const InputError&) {
      return false;
    }
  };
  for (const char* unit : {"mg/mL", "ug/mL", "M", "mM", "uM", "g/L", "%w/v", "mol/kg"}) {
    EXPECT_TRUE(csv_ok(unit)) << unit;
    EXPECT_TRUE(xml_ok(unit)) << unit;
  }
  // Spaces around a CSV cell are trimmed (common practice of CSV readers); an XML attribute is
  // read as its schema reads it, where " mg/mL " is not one of the enumerated units.
  EXPECT_TRUE(csv_ok(" mg/mL "));
  EXPECT_FALSE(xml_ok(" mg/mL "));
  for (const char* unit : {"e3M", "E3M", "0mM", "1mM", ".5M", "-M", "+mM", "stone", "", "mg/mL 2"}) {
    EXPECT_FALSE(csv_ok(unit)) << unit;
    EXPECT_FALSE(xml_ok(unit)) << unit;
  }
  try {
    parse_solubility_csv("pH,value,unit\n2,3,e3M\n", "d.csv", 300.0, nullptr);
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()), "d.csv:2:5: column 'unit' is \"e3M\", expected a unit alone such as mg/mL, ug/mL or mM");
  }
}

}  // namespace
}  // namespace pkarta
