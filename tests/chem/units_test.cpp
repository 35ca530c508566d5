#include "pkarta/chem/units.h"

#include <gtest/gtest.h>

#include "pkarta/base/error.h"
#include "pkarta/chem/water.h"

namespace pkarta {
namespace {

TEST(Amount, ParsesEveryUnitOfTheCommandLine) {
  EXPECT_DOUBLE_EQ(parse_amount("25mM").to_mol_per_L(0, 25), 0.025);
  EXPECT_DOUBLE_EQ(parse_amount("0.025M").to_mol_per_L(0, 25), 0.025);
  EXPECT_DOUBLE_EQ(parse_amount("0.1 M").to_mol_per_L(0, 25), 0.1);
  EXPECT_DOUBLE_EQ(parse_amount("10mg/mL").to_mol_per_L(200, 25), 0.05);
  EXPECT_DOUBLE_EQ(parse_amount("1.5g/L").to_mol_per_L(150, 25), 0.01);
  EXPECT_DOUBLE_EQ(parse_amount("5ug/mL").to_mol_per_L(500, 25), 1e-5);
  // 0.9 %w/v NaCl = 9 g/L = 0.154 mol/L (common practice).
  EXPECT_NEAR(parse_amount("0.9%w/v").to_mol_per_L(58.44, 25), 0.154, 0.0005);
  EXPECT_DOUBLE_EQ(parse_amount("2e-3M").to_mol_per_L(0, 25), 2e-3);
}

TEST(Amount, MolalityUsesTheWaterDensity) {
  // c = m * rho(T): 0.025 mol/kg at 25 °C with rho = 0.997043 kg/L (Kell, ITS-90).
  EXPECT_NEAR(parse_amount("0.025mol/kg").to_mol_per_L(0, 25), 0.025 * 0.997043, 1e-8);
}

TEST(Amount, BadAmountsNameTheProblem) {
  EXPECT_THROW(parse_amount("25"), InputError);       // no unit
  EXPECT_THROW(parse_amount("mM"), InputError);       // no number
  EXPECT_THROW(parse_amount("25 furlongs"), InputError);
  EXPECT_THROW(parse_amount("-5mM"), InputError);
  EXPECT_THROW(parse_amount("1e999M"), InputError);
  EXPECT_THROW(parse_amount("5mg/mL").to_mol_per_L(0, 25), InputError);  // mass without molar mass
  try {
    parse_amount("25");
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("has no unit"), std::string::npos);
  }
}

TEST(Number, WholeStringLocaleIndependent) {
  EXPECT_DOUBLE_EQ(parse_number("7.25", "x"), 7.25);
  EXPECT_THROW(parse_number("7,25", "x"), InputError);
  EXPECT_THROW(parse_number("7.2.5", "x"), InputError);
  EXPECT_THROW(parse_number("nan", "x"), InputError);
  EXPECT_THROW(parse_number("", "x"), InputError);
}

}  // namespace
}  // namespace pkarta
