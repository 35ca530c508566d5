// Solubility classification after ICH M9 (2019): the whole pH range decides, not three points.
#include <gtest/gtest.h>

#include "cli_run.h"
#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

#include "pkarta/analyses/classify.h"
#include "pkarta/io/xml_input.h"

namespace {

using pkarta_test::RunResult;
using pkarta_test::run;
using pkarta_test::temp_dir;
using pkarta_test::write_file;
using pkarta_test::slurp;

using namespace pkarta;

constexpr double kClosedFormRel = 1e-9;

const Library& lib() {
  static const Library l = builtin_library();
  return l;
}

Compound compound_from(const std::string& xml) { return parse_compound(xml, "<test compound>", lib(), nullptr); }

// Invented: a base with pKa 9, S0 1e-3 M (0.3 mg/mL, molar mass 300) and a hydrochloride of
// molar mass 336.46 given by a large Ksp (it limits only far below pH 1.2).
const char* kSolubleBase =
    "<compound id=\"soluble-base\" name=\"soluble base\" molar-mass=\"300\">"
    "<pka value=\"9\" type=\"base\"/><intrinsic-solubility value=\"1e-3\" unit=\"M\"/>"
    "<salt id=\"hydrochloride\" counterion=\"Cl-\" ksp=\"5\" molar-mass=\"336.46\"/></compound>";

// Invented ampholyte: acid pKa 5.0 and base pKa 6.3 around a zwitterion of S0 1e-4 M (molar
// mass 300). Avdeef 2003 eq. 6.7: S = S0 (1 + 10^(5.0 - pH) + 10^(pH - 6.3)), lowest at
// pH (5.0 + 6.3)/2 = 5.65 with S = S0 (1 + 2 10^-0.65) = 1.448 S0, while S(4.5) = S(6.8) =
// 4.178 S0 and S(1.2) is far higher. A dose of 15 mg in 250 mL (2e-4 M, 2 S0) therefore passes
// at pH 1.2, 4.5 and 6.8 (D0 0.48) and fails at the minimum (D0 1.38).
const char* kAmpholyte =
    "<compound id=\"ampholyte\" name=\"test ampholyte\" molar-mass=\"300\">"
    "<pka value=\"5.0\" type=\"acid\"/><pka value=\"6.3\" type=\"base\"/>"
    "<intrinsic-solubility value=\"1e-4\" unit=\"M\"/></compound>";

double hh_ampholyte(double pH) { return 1e-4 * (1 + std::pow(10.0, 5.0 - pH) + std::pow(10.0, pH - 6.3)); }

TEST(Classify, SolubleEverywhereIsHigh) {
  const Compound c = compound_from(kSolubleBase);
  ClassifyOptions o;
  o.dose_mg = 100;
  o.activity = ActivityModel::kIdeal;
  const ClassifyResult r = classify(c, lib(), o);
  EXPECT_EQ(r.verdict, "high");
  EXPECT_NE(r.guideline.find("ICH M9"), std::string::npos);
  EXPECT_DOUBLE_EQ(r.temperature_C, 37.0);
  EXPECT_DOUBLE_EQ(r.volume_mL, 250.0);
  // A base is least soluble at the top of the range: S0 (1 + 10^(pKa - 6.8)) (Avdeef 2003, 6.1).
  EXPECT_NEAR(r.min_at_pH, 6.8, 1e-9);
  const double s_min = 1e-3 * (1 + std::pow(10.0, 9 - 6.8));
  EXPECT_LT(std::fabs(r.min_solubility_mol_per_L - s_min) / s_min, kClosedFormRel);
  EXPECT_NEAR(r.min_solubility_mg_per_mL, s_min * 300.0, 1e-9 * s_min * 300.0);
  const double dose_conc = 100.0 / 300.0 / 250.0;  // mol/L
  ASSERT_GE(r.points.size(), 4u);
  for (const ClassifyPoint& p : r.points) {
    EXPECT_LE(p.dose_number, 1.0) << p.label;
    EXPECT_NEAR(p.dose_number, dose_conc / p.solubility_mol_per_L, 1e-12 * p.dose_number) << p.label;
  }
  EXPECT_EQ(r.points[0].label, "pH 1.2");
  EXPECT_EQ(r.points[1].label, "pH 4.5");
  EXPECT_EQ(r.points[2].label, "pH 6.8");
  EXPECT_EQ(r.points.back().label, "minimum");
  ASSERT_EQ(r.media.size(), 3u);
  for (const MediumCheck& m : r.media) {
    EXPECT_TRUE(m.usable) << m.medium;
    EXPECT_EQ(m.solid, "none") << m.medium;
    EXPECT_NEAR(m.dissolved_fraction, 1.0, 1e-9) << m.medium;
  }
}

TEST(Classify, AmpholyteFailingOnlyBetweenItsPkasIsLow) {
  const Compound c = compound_from(kAmpholyte);
  ClassifyOptions o;
  o.dose_mg = 15;
  o.activity = ActivityModel::kIdeal;
  const ClassifyResult r = classify(c, lib(), o);
  // The three pharmacopeial anchor points all pass: a three-point check would say "high".
  double worst_anchor = 0;
  for (const ClassifyPoint& p : r.points) {
    if (p.label.rfind("pH ", 0) == 0) {
      EXPECT_NEAR(p.solubility_mol_per_L, hh_ampholyte(p.pH), kClosedFormRel * hh_ampholyte(p.pH)) << p.label;
      worst_anchor = std::max(worst_anchor, p.dose_number);
    }
  }
  EXPECT_NEAR(worst_anchor, 2e-4 / hh_ampholyte(4.5), 1e-9);
  EXPECT_LT(worst_anchor, 1.0);
  // The scan finds the minimum between the pKa values and decides "low".
  EXPECT_EQ(r.verdict, "low");
  EXPECT_NEAR(r.min_at_pH, 5.65, 1e-5);
  EXPECT_LT(std::fabs(r.min_solubility_mol_per_L - hh_ampholyte(5.65)) / hh_ampholyte(5.65), kClosedFormRel);
  EXPECT_NEAR(r.points.back().dose_number, 2e-4 / hh_ampholyte(5.65), 1e-8);
  EXPECT_GT(r.points.back().dose_number, 1.0);
  EXPECT_NEAR(r.dose_solubility_volume_mL, 15.0 / (hh_ampholyte(5.65) * 300.0), 1e-6);
  // Both pKa values lie in the range and are reported (ICH M9: test at the pKa too).
  int pka_points = 0;
  for (const ClassifyPoint& p : r.points) pka_points += p.label.rfind("pKa ", 0) == 0;
  EXPECT_EQ(pka_points, 2);
  // With activities (Davies) the verdict stands.
  o.activity = ActivityModel::kDavies;
  EXPECT_EQ(classify(c, lib(), o).verdict, "low");
  // Half the dose passes everywhere.
  o.dose_mg = 7.5;
  EXPECT_EQ(classify(c, lib(), o).verdict, "high");
}

TEST(Classify, ADoseGivenAsTheSaltCountsMolesOfDrug) {
  // Common practice: a dose is the mass of the form weighed, here the hydrochloride (336.46
  // g/mol); the same mass of salt is fewer moles of drug than of the free base (300 g/mol).
  const Compound c = compound_from(kSolubleBase);
  ClassifyOptions o;
  o.dose_mg = 200;
  const ClassifyResult free = classify(c, lib(), o);
  o.form = "hydrochloride";
  const ClassifyResult salt = classify(c, lib(), o);
  EXPECT_DOUBLE_EQ(salt.form_molar_mass_g_per_mol, 336.46);
  EXPECT_NEAR(salt.points.back().dose_number / free.points.back().dose_number, 300.0 / 336.46, 1e-9);
  EXPECT_NEAR(salt.min_solubility_mg_per_mL / free.min_solubility_mg_per_mL, 336.46 / 300.0, 1e-9);
  o.form = "mesylate";
  EXPECT_THROW(classify(c, lib(), o), InputError);
}

TEST(Classify, OptionsAreValidated) {
  std::string err;
  ClassifyOptions o;
  EXPECT_FALSE(o.is_valid(&err));
  EXPECT_EQ(err, "ClassifyOptions::dose_mg = 0, must be > 0");
  o.dose_mg = 10;
  EXPECT_TRUE(o.is_valid(&err));
  o.volume_mL = -1;
  EXPECT_FALSE(o.is_valid(&err));
  EXPECT_EQ(err, "ClassifyOptions::volume_mL = -1, must be > 0");
}

// --- Command line -----------------------------------------------------------------------------

TEST(ClassifyCli, JsonHasTheDesignKeysAndTheVerdict) {
  const std::string f = write_file("amph.xml", kAmpholyte);
  RunResult r = run("classify --compound " + f + " --dose-mg 15 --format json");
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* key : {"\"verdict\": \"low\"", "\"guideline\"", "\"temperature_C\": 37", "\"volume_mL\": 250",
                          "\"min_solubility_mg_per_mL\"", "\"min_at_pH\": 5.6", "\"points\"", "\"pH\"",
                          "\"solubility_mg_per_mL\"", "\"dose_number\"", "\"caution\""}) {
    EXPECT_NE(r.out.find(key), std::string::npos) << key << "\n" << r.out;
  }
  r = run("classify --compound " + f + " --dose-mg 5");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("Verdict: HIGH"), std::string::npos);
  EXPECT_NE(r.out.find("ICH M9"), std::string::npos);
  r = run("classify --compound compounds/demo-base.xml --dose-mg 10 --form hydrochloride --format csv");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_EQ(r.out.rfind("point,pH,solubility_mol_per_L,solubility_mg_per_mL,dose_number", 0), 0u);
}

TEST(ClassifyCli, BadInputExitsTwoWithAClearMessage) {
  const std::string neg = write_file("neg.xml",
                                     "<compound id=\"x\" name=\"x\" molar-mass=\"300\">\n"
                                     "  <pka value=\"8\" type=\"base\"/>\n"
                                     "  <intrinsic-solubility value=\"-1\" unit=\"mg/mL\"/>\n</compound>\n");
  struct Case {
    std::string args, expect;
  };
  const std::vector<Case> cases = {
      {"classify --compound compounds/demo-base.xml", "--dose-mg: --dose-mg N is required"},
      {"classify --compound compounds/demo-base.xml --dose-mg 0", "--dose-mg: dose (mg) 0 must be > 0"},
      {"classify --compound compounds/demo-base.xml --dose-mg -5", "--dose-mg: dose (mg) -5 must be > 0"},
      {"classify --compound compounds/demo-base.xml --dose-mg 5 --volume-mL 0", "--volume-mL: volume (mL) 0 must be > 0"},
      {"classify --compound compounds/demo-base.xml --dose-mg 5 --form tosylate", "--form: compound 'demo-base' has no form 'tosylate'"},
      {"classify --compound compounds/demo-base.xml --dose-mg 5 --acid KCl", "--acid: reagent 'KCl' is not a strong acid"},
      {"classify --compound compounds/demo-base.xml --dose-mg 5 --step 0", "--step: step 0 must be > 0"},
      {"classify --compound " + neg + " --dose-mg 5", "neg.xml:3:3: intrinsic solubility must be > 0"},
      {"classify --compound compounds/demo-base.xml --dose-mg 5 --step 0.5", "--step: step 0.5 is above 0.1 pH"},
      {"classify --compound compounds/demo-base.xml --dose-mg 5mg", "--dose-mg:"},
      {"classify --dose-mg 5", "--compound: --compound FILE is required"},
  };
  for (const Case& k : cases) {
    const RunResult r = run(k.args);
    EXPECT_EQ(r.code, 2) << k.args << "\n" << r.err;
    EXPECT_NE(r.err.find(k.expect), std::string::npos) << k.args << "\n" << r.err;
    EXPECT_TRUE(r.out.empty()) << k.args;
  }
}

}  // namespace
