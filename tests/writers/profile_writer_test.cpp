// Profile writers with Monte Carlo bands: the keys and tables docs/commands.md gives for
// `pkarta profile --uncertainty N` (the output contract; the values are made up for the test).
#include <gtest/gtest.h>

#include <cmath>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "pkarta/writers/profile_writer.h"
#include "pkarta/writers/tables.h"

namespace {

using namespace pkarta;

Profile two_points() {
  Profile p;
  p.compound_id = "test-base";
  p.compound_name = "test base";
  p.molar_mass_g_per_mol = 300.0;
  p.s0_mol_per_L = 1e-4;
  p.species = {"BH+", "B"};
  for (double pH : {4.0, 8.0}) {
    ProfilePoint pt;
    pt.pH = pH;
    pt.solubility_mol_per_L = pH < 6 ? 1e-2 : 1e-4;
    pt.solubility_mg_per_mL = pt.solubility_mol_per_L * 300.0;
    pt.fractions = {0.5, 0.5};
    p.points.push_back(pt);
  }
  return p;
}

ProfileBands two_bands() {
  ProfileBands b;
  b.pH = {4.0, 8.0};
  b.nominal_log10_mol_per_L = {-2.0, -4.0};
  b.p05_log10_mol_per_L = {-2.5, -4.5};
  b.p50_log10_mol_per_L = {-2.0, -4.0};
  b.p95_log10_mol_per_L = {-1.5, -3.5};
  b.samples = 200;
  b.seed = 7;
  return b;
}

TEST(ProfileWriter, BandsWithoutSamplesGiveTheProfileAlone) {
  const Profile p = two_points();
  const ProfileBands none;
  std::ostringstream plain, with;
  write_profile_json(p, plain);
  write_profile_json(p, none, with);
  EXPECT_EQ(plain.str(), with.str());
  plain.str("");
  with.str("");
  write_profile_csv(p, plain);
  write_profile_csv(p, none, with);
  EXPECT_EQ(plain.str(), with.str());
  plain.str("");
  with.str("");
  write_profile_text(p, plain, 0.0);
  write_profile_text(p, none, with, 0.0);
  EXPECT_EQ(plain.str(), with.str());
}

TEST(ProfileWriter, JsonCarriesThePercentilesOfEachPoint) {
  std::ostringstream out;
  write_profile_json(two_points(), two_bands(), out);
  const nlohmann::json j = nlohmann::json::parse(out.str());
  ASSERT_EQ(j["points"].size(), 2u);
  EXPECT_NEAR(j["points"][0]["solubility_p05_mol_per_L"].get<double>(), 3.1622776601683795e-3, 1e-15);
  EXPECT_NEAR(j["points"][0]["solubility_p50_mol_per_L"].get<double>(), 1e-2, 1e-15);
  EXPECT_NEAR(j["points"][1]["solubility_p95_mol_per_L"].get<double>(), 3.1622776601683795e-4, 1e-16);
  EXPECT_EQ(j["uncertainty"]["samples"].get<int>(), 200);
  EXPECT_EQ(j["uncertainty"]["seed"].get<std::uint64_t>(), 7u);
}

TEST(ProfileWriter, BandsAreATableOfTheirOwnAndTextAppendsThem) {
  std::ostringstream csv, text;
  const std::vector<DataTable> tables = profile_tables(two_points(), two_bands());
  ASSERT_EQ(tables.size(), profile_table_info().size());
  const DataTable& bands = tables[3];
  EXPECT_EQ(bands.name, "bands");
  ASSERT_EQ(bands.rows.size(), 2u);
  // 10^-2.5 mol/L at full precision: reads back to the same double.
  EXPECT_EQ(std::stod(bands.rows[0][2]), std::pow(10.0, -2.5));
  write_profile_csv(two_points(), two_bands(), csv);
  EXPECT_EQ(csv.str().find("\r\n\r\n"), std::string::npos) << "one table, no blank line";
  write_profile_text(two_points(), two_bands(), text, 0.0);
  EXPECT_NE(text.str().find("Monte Carlo bands of the solubility (200 samples, seed 7;"), std::string::npos);
}

}  // namespace
