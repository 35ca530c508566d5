// The buffer screen's next step when no buffer holds the target made premade: the titrant the
// dose alone needs (checked against the charge balance written out by hand) and the same
// buffers screened with the pH adjusted after the dose.
#include <gtest/gtest.h>

#include <cmath>

#include "pkarta/analyses/screen.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"
#include "pkarta/writers/screen_writer.h"
#include "test_compounds.h"

namespace pkarta {
namespace {

// An invented monoprotic acid, pKa 4.20 (thermodynamic, no temperature dependence), soluble
// enough that no solid forms in these checks.
Compound invented_acid(double s0_mol_per_L = 1.0) {
  return pkarta_test::one_pka_compound("acid-4.2", 4.20, GroupType::kAcid, s0_mol_per_L, 250.0);
}

ScreenJob acid_job(double dose_mol_per_L) {
  ScreenJob j;
  j.compound = invented_acid();
  j.dose_mol_per_L = dose_mol_per_L;
  return j;
}

// Phosphate and tris at pH 7.4, the other options at their defaults.
ScreenOptions phosphate_and_tris_at_7_4() {
  ScreenOptions opt;
  opt.target_pH = 7.4;
  opt.buffers = {"phosphate", "tris"};
  return opt;
}

TEST(ScreenFallback, DoseTitrantMatchesTheChargeBalanceByHand) {
  // With activity coefficients 1, the strong base that brings C mol/L of a monoprotic acid to
  // pH p in water is, from the charge balance [Na+] + [H+] = [A-] + [OH-]:
  //   [Na+] = C / (1 + 10^(pKa - p)) + Kw / h - h,  h = 10^-p.
  const Library lib = builtin_library();
  ScreenOptions opt;
  opt.activity = ActivityModel::kIdeal;
  opt.temperature_C = 25.0;
  for (double target : {5.0, 6.0, 7.4}) {
    opt.target_pH = target;
    const double c = 0.02;
    const BufferPreparation t = dose_titration(lib, lib.buffer("phosphate"), acid_job(c), opt);
    ASSERT_TRUE(t.converged) << target;
    EXPECT_EQ(t.titrant, "NaOH") << target;
    const double h = std::pow(10.0, -target);
    const double kw = std::pow(10.0, -pkw(25.0));
    const double by_hand = c / (1.0 + std::pow(10.0, 4.20 - target)) + kw / h - h;
    EXPECT_NEAR(t.titrant_mol_per_L, by_hand, 1e-6 * by_hand) << target;
  }
}

TEST(ScreenFallback, PremadeFailureGivesTheAdjustedBuffersThatHoldTheTarget) {
  // 20 mM of a free acid into a buffer made first at pH 7.4: 20 mM of acid released on
  // ionisation is more than 0.1 M phosphate or tris absorbs within 0.1 pH, so no buffer is ok;
  // adjusted after the dose, both hold the target by construction of that preparation.
  const Library lib = builtin_library();
  const ScreenOptions opt = phosphate_and_tris_at_7_4();
  const ScreenReport rep = screen(lib, acid_job(0.02), opt);
  for (const ScreenResult& r : rep.results) EXPECT_NE(r.status, ScreenStatus::kOk) << r.buffer;
  ASSERT_TRUE(rep.fallback);
  EXPECT_TRUE(rep.fallback->dose_titrant_found);
  EXPECT_EQ(rep.fallback->dose_titrant, "NaOH");
  // About the dose itself (fully ionised at pH 7.4, 3 units above the pKa): 20 mM within 0.1 %.
  EXPECT_NEAR(rep.fallback->dose_titrant_mol_per_L, 0.02, 2e-5);
  EXPECT_NEAR(rep.fallback->dose_titrant_mg_per_mL, 0.02 * lib.reagent("NaOH").molar_mass_g_per_mol, 1e-3);
  ASSERT_FALSE(rep.fallback->adjusted.empty());
  for (const ScreenResult& r : rep.fallback->adjusted) {
    EXPECT_EQ(r.status, ScreenStatus::kOk) << r.buffer;
    EXPECT_NEAR(r.pH_after_drug, opt.target_pH, opt.tolerance_pH) << r.buffer;
    ASSERT_TRUE(r.recommended_conc_mol_per_L) << r.buffer;
  }
}

// The same case: tris moves by about -0.03 pH per °C (Good et al. 1966, Biochemistry 5, 467;
// dH 47.45 kJ/mol, Goldberg et al. 2002), so adjusted to 7.4 at 25 °C it reads some 0.5 higher
// at 5 °C; phosphate moves by about -0.003 per °C (the Ph. Eur. 0.025/0.025 standard). The
// adjusted list puts phosphate first and says why tris does not hold in storage.
TEST(ScreenFallback, AdjustedListPutsTheBufferThatHoldsInStorageFirstAndSaysWhy) {
  const Library lib = builtin_library();
  const ScreenReport rep = screen(lib, acid_job(0.02), phosphate_and_tris_at_7_4());
  ASSERT_TRUE(rep.fallback);
  ASSERT_EQ(rep.fallback->adjusted.size(), 2u);
  EXPECT_EQ(rep.fallback->adjusted[0].buffer, "phosphate");
  EXPECT_TRUE(rep.fallback->adjusted[0].holds_at_storage);
  EXPECT_FALSE(rep.fallback->adjusted[1].holds_at_storage);
  EXPECT_GT(rep.fallback->adjusted[1].pH_at_5C - 7.4, 0.4);
  const std::vector<std::string> items = screen_fallback_items(rep);
  ASSERT_EQ(items.size(), 2u);
  EXPECT_EQ(items[0].find("outside"), std::string::npos) << items[0];
  EXPECT_NE(items[1].find("outside 7.40 +/- 0.10 at 5 °C"), std::string::npos) << items[1];
}

TEST(ScreenFallback, NoFallbackWhenABufferHoldsTheTargetOrTheScreenIsAdjusted) {
  const Library lib = builtin_library();
  ScreenOptions opt;
  opt.target_pH = 7.4;
  opt.buffers = {"phosphate", "tris"};
  // 0.2 mM of the acid: 0.1 M phosphate absorbs it easily.
  const ScreenReport small = screen(lib, acid_job(2e-4), opt);
  EXPECT_EQ(small.results.front().status, ScreenStatus::kOk);
  EXPECT_FALSE(small.fallback);
  opt.preparation = ScreenPreparation::kAdjusted;
  const ScreenReport adjusted = screen(lib, acid_job(0.02), opt);
  EXPECT_FALSE(adjusted.fallback);
}

TEST(ScreenFallback, DoseSolublePhRangeFollowsHendersonHasselbalch) {
  // A monoprotic acid without salts, activity coefficients 1: S(pH) = S0 (1 + 10^(pH - pKa))
  // (Henderson-Hasselbalch solubility), so C dissolves from pH = pKa + log10(C/S0 - 1) upwards.
  const Library lib = builtin_library();
  ScreenOptions opt;
  opt.activity = ActivityModel::kIdeal;
  opt.target_pH = 5.0;
  const Compound c = invented_acid(1e-4);
  const double dose = 0.01;
  const auto ranges = dose_soluble_pH_ranges(lib, c, dose, opt);
  ASSERT_EQ(ranges.size(), 1u);
  EXPECT_NEAR(ranges[0].first, 4.20 + std::log10(dose / 1e-4 - 1.0), 2e-4);
  EXPECT_DOUBLE_EQ(ranges[0].second, 13.0);
  // A dose that does not dissolve at the target: the screen names the range, and no
  // adjusted fallback is offered (adjusting the pH to the same target does not dissolve it).
  opt.buffers = {"acetate", "citrate"};
  ScreenJob job;
  job.compound = c;
  job.dose_mol_per_L = dose;
  const ScreenReport rep = screen(lib, job, opt);
  ASSERT_EQ(rep.dose_soluble_pH_ranges.size(), 1u);
  EXPECT_NEAR(rep.dose_soluble_pH_ranges[0].first, ranges[0].first, 1e-12);
  EXPECT_FALSE(rep.fallback);
  bool named = false;
  for (const std::string& w : rep.warnings) named = named || w.find("6.20 and above") != std::string::npos;
  EXPECT_TRUE(named);
}

}  // namespace
}  // namespace pkarta
