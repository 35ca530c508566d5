// Dilution of a formulation into a medium: buffer pH on dilution, precipitation risk of a weak
// base, mass balance at every ratio, media simplifications and bad input.
#include "pkarta/analyses/dilute.h"

#include <gtest/gtest.h>

#include "cli_run.h"
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <map>
#include <sstream>

#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/xml_input.h"
#include "test_compounds.h"

namespace pkarta {
namespace {

using pkarta_test::RunResult;
using pkarta_test::run;
using pkarta_test::temp_dir;
using pkarta_test::write_file;
using pkarta_test::slurp;

constexpr double kBalanceTolerance = 1e-10;  // every returned state (docs/model.md, Solver)

// Invented weak base for these checks: pKa 8.0, log10 S0 -5.5 mol/L, molar mass 300, no salts.
Compound invented_base() {
  Compound c = pkarta_test::one_pka_compound("test-base", 8.0, GroupType::kBase, std::pow(10.0, -5.5), 300.0);
  c.name = "test base";
  return c;
}

// 5 mg/mL of the base dissolved with 20 mM HCl (a low-pH parenteral-style formulation).
Mixture acidic_base_formulation(const Library& lib) {
  Mixture m;
  add_reagent(m, lib, "HCl", 0.020);
  add_drug(m, lib, invented_base(), 5.0 / 300.0, "free");
  return m;
}

// Common practice: a buffer's pH follows the ratio of its base and acid forms
// (Henderson-Hasselbalch), which dilution leaves unchanged; with activities set to 1 the pH
// stays where it was as long as [H+] and [OH-] stay small beside the buffer (below 0.5 % of
// each form here: phosphate near pH 7.2 to 0.25 mM, acetate near pH 4.76 to 5 mM).
TEST(Dilute, BufferAloneIntoWaterKeepsItsIdealPh) {
  const Library lib = builtin_library();
  struct Case {
    const char* acid;
    const char* base;
    double conc_mol_per_L;  // of each form
    double max_ratio;
    double pka;             // library value at 25 °C: phosphate step 2, acetic acid
  } cases[] = {{"KH2PO4", "Na2HPO4", 0.025, 100, 7.198}, {"acetic-acid", "sodium-acetate", 0.1, 20, 4.756}};
  for (const Case& c : cases) {
    Mixture m;
    m.activity = ActivityModel::kIdeal;
    add_reagent(m, lib, c.acid, c.conc_mol_per_L);
    add_reagent(m, lib, c.base, c.conc_mol_per_L);
    DilutionOptions o;
    o.medium_id = "water";
    o.ratios = {1, 2, 5, 10, 20, 50, 100};
    const DilutionResult r = analyse_dilution(m, lib, o);
    ASSERT_TRUE(r.usable()) << r.message;
    ASSERT_EQ(r.points.size(), 7u);
    EXPECT_NEAR(r.points[0].pH, c.pka, 0.003) << c.acid;
    for (const DilutionPoint& p : r.points) {
      if (p.ratio <= c.max_ratio) EXPECT_NEAR(p.pH, r.points[0].pH, 0.005) << c.acid << " ratio " << p.ratio;
      EXPECT_FALSE(p.has_drug);
      EXPECT_FALSE(p.risk);
    }
  }
  // Beyond that, the full charge balance of an acetate buffer (common practice):
  // pH = pKa + log10((Cb + h) / (Ca - h)), h = [H+], here 1 mM of each form at ratio 100.
  Mixture m;
  m.activity = ActivityModel::kIdeal;
  add_reagent(m, lib, "acetic-acid", 0.1);
  add_reagent(m, lib, "sodium-acetate", 0.1);
  DilutionOptions o;
  o.medium_id = "water";
  o.ratios = {100};
  const DilutionResult r = analyse_dilution(m, lib, o);
  double h = std::pow(10.0, -4.756);
  for (int i = 0; i < 100; ++i) h = std::pow(10.0, -(4.756 + std::log10((1e-3 + h) / (1e-3 - h))));
  EXPECT_NEAR(r.points[0].pH, -std::log10(h), 0.003);
  EXPECT_GT(r.points[0].pH, 4.756 + 0.01);  // the shift is real, not within the 0.005 above
}

// A weak base held in solution at low pH precipitates when a buffered medium at pH 7.4 takes
// its pH up (common practice of parenteral formulation: dilution of pH-solubilised bases in
// blood), but not in unbuffered saline, which leaves the pH low.
TEST(Dilute, WeakBaseAtLowPhRisksPrecipitationInPlasmaNotInSaline) {
  const Library lib = builtin_library();
  const Mixture form = acidic_base_formulation(lib);
  DilutionOptions o;
  o.ratios = {1, 2, 5, 10, 20, 50, 100};
  o.medium_id = "plasma-7.4";
  const DilutionResult plasma = analyse_dilution(form, lib, o);
  o.medium_id = "saline-0.9";
  const DilutionResult saline = analyse_dilution(form, lib, o);
  ASSERT_TRUE(plasma.usable() && saline.usable());
  EXPECT_FALSE(plasma.points[0].risk);
  EXPECT_LT(plasma.points[0].pH, 4.0);
  int first_risk = -1;
  for (std::size_t i = 0; i < plasma.points.size(); ++i) {
    if (plasma.points[i].risk && first_risk < 0) first_risk = static_cast<int>(i);
  }
  ASSERT_GT(first_risk, 0) << "no precipitation risk in plasma at any ratio";
  for (std::size_t i = first_risk; i < plasma.points.size(); ++i) {
    EXPECT_TRUE(plasma.points[i].risk) << "ratio " << plasma.points[i].ratio;
    EXPECT_FALSE(saline.points[i].risk) << "saline, ratio " << saline.points[i].ratio;
    EXPECT_GT(plasma.points[i].pH, 6.5);
    EXPECT_LT(saline.points[i].pH, 6.0);
    EXPECT_EQ(plasma.points[i].limiting_solid, "free");
    EXPECT_NE(plasma.points[i].equilibrium_solid, "none");
  }
  // At pH 7.4 the free base's solubility is S0 (1 + 10^(pKa - pH)) (Henderson-Hasselbalch,
  // Avdeef 2003): within activity effects of the HH value at that pH.
  const DilutionPoint& p = plasma.points.back();
  const double hh = std::pow(10.0, -5.5) * (1.0 + std::pow(10.0, 8.0 - p.pH));
  EXPECT_NEAR(std::log10(p.solubility_mol_per_L), std::log10(hh), 0.1);
  // The notes state the medium's model: plasma is treated as an open bicarbonate system.
  bool note = false;
  for (const std::string& n : plasma.notes) note = note || n.find("blood model: open bicarbonate system") != std::string::npos;
  EXPECT_TRUE(note);
}

// The supersaturation ratio is the mixture's saturation ratio (docs/model.md), and the
// solubility is the dose over it.
TEST(Dilute, SupersaturationIsTheSaturationRatioOfTheMixture) {
  const Library lib = builtin_library();
  const Compound demo = load_compound_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-base.xml", lib, nullptr);
  Mixture form;
  add_drug(form, lib, demo, 2e-3 / 347.9 * 1000.0, "hydrochloride");
  DilutionOptions o;
  o.medium_id = "saline-0.9";
  o.ratios = {1, 3, 30};
  const DilutionResult r = analyse_dilution(form, lib, o);
  ASSERT_TRUE(r.usable());
  for (const DilutionPoint& p : r.points) {
    Mixture all = diluted_mixture(form, lib, "saline-0.9", p.ratio);
    all.drug->allow_solids = false;
    const Equilibrium e = solve(all);
    ASSERT_TRUE(e.usable());
    EXPECT_NEAR(p.supersaturation_ratio, e.drug->saturation_ratio, 1e-9 * e.drug->saturation_ratio);
    EXPECT_NEAR(p.solubility_mol_per_L * p.supersaturation_ratio, p.drug_mol_per_L, 1e-12 * p.drug_mol_per_L);
  }
}

// Mass balance at every ratio: every total of the mixture is formulation / r + medium (1 - 1/r),
// and the drug dissolved plus precipitated equals the diluted dose.
TEST(Dilute, MassBalanceHoldsAtEveryRatio) {
  const Library lib = builtin_library();
  const Mixture form = acidic_base_formulation(lib);
  Mixture medium;
  add_medium(medium, lib, "plasma-7.4");
  for (double r : {1.0, 1.5, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0, 1000.0}) {
    const Mixture m = diluted_mixture(form, lib, "plasma-7.4", r);
    std::map<std::string, double> expect, got;
    for (const SystemAmount& s : form.systems) expect["sys " + s.system.id] += s.total_mol_per_L / r;
    for (const IonAmount& i : form.ions) expect["ion " + i.id] += i.conc_mol_per_L / r;
    for (const SystemAmount& s : medium.systems) expect["sys " + s.system.id] += s.total_mol_per_L * (1 - 1 / r);
    for (const IonAmount& i : medium.ions) expect["ion " + i.id] += i.conc_mol_per_L * (1 - 1 / r);
    for (const SystemAmount& s : m.systems) got["sys " + s.system.id] += s.total_mol_per_L;
    for (const IonAmount& i : m.ions) got["ion " + i.id] += i.conc_mol_per_L;
    for (const auto& [id, c] : expect) {
      EXPECT_NEAR(got[id], c, 1e-14 + 1e-12 * c) << id << " at ratio " << r;
    }
    EXPECT_EQ(got.size(), expect.size());
    ASSERT_TRUE(m.drug.has_value());
    EXPECT_NEAR(m.drug->dose_mol_per_L, form.drug->dose_mol_per_L / r, 1e-15);
    const Equilibrium e = solve(m);
    ASSERT_TRUE(e.usable());
    EXPECT_LT(e.mass_residual_rel, kBalanceTolerance);
    EXPECT_LT(e.charge_residual_rel, kBalanceTolerance);
    const double total = e.drug->dissolved_mol_per_L + e.drug->free_solid_mol_per_L + e.drug->salt_solid_mol_per_L;
    EXPECT_NEAR(total, form.drug->dose_mol_per_L / r, kBalanceTolerance * total);
  }
  DilutionOptions o;
  o.medium_id = "plasma-7.4";
  const DilutionResult res = analyse_dilution(form, lib, o);
  for (const DilutionPoint& p : res.points) {
    EXPECT_LT(p.mass_residual_rel, kBalanceTolerance) << p.ratio;
    EXPECT_LT(p.charge_residual_rel, kBalanceTolerance) << p.ratio;
  }
}

// 5 % dextrose is a non-electrolyte: for acid-base it is water (the stated simplification).
TEST(Dilute, DextroseIsWaterForAcidBase) {
  const Library lib = builtin_library();
  const Mixture form = acidic_base_formulation(lib);
  DilutionOptions o;
  o.ratios = {2, 10, 100};
  o.medium_id = "water";
  const DilutionResult water = analyse_dilution(form, lib, o);
  o.medium_id = "dextrose-5";
  const DilutionResult dex = analyse_dilution(form, lib, o);
  for (std::size_t i = 0; i < water.points.size(); ++i) {
    EXPECT_NEAR(dex.points[i].pH, water.points[i].pH, 1e-9);
    EXPECT_NEAR(dex.points[i].supersaturation_ratio, water.points[i].supersaturation_ratio,
                1e-9 * water.points[i].supersaturation_ratio);
    EXPECT_GT(dex.points[i].osmolarity_mOsm_per_L, water.points[i].osmolarity_mOsm_per_L + 100.0);
  }
  bool note = false;
  for (const std::string& n : dex.notes) note = note || n.find("non-electrolyte") != std::string::npos;
  EXPECT_TRUE(note);
}

TEST(Dilute, RatioBelowOneIsRejected) {
  const Library lib = builtin_library();
  const Mixture form = acidic_base_formulation(lib);
  EXPECT_THROW(diluted_mixture(form, lib, "water", 0.5), InputError);
  EXPECT_THROW(diluted_mixture(form, lib, "no-such-medium", 2), InputError);
  DilutionOptions o;
  o.medium_id = "water";
  o.ratios = {0.9};
  EXPECT_THROW(analyse_dilution(form, lib, o), InputError);
}

// ----- command line ------------------------------------------------------------------------

TEST(DiluteCli, JsonKeysAndBadOptions) {
  RunResult r = run("dilute --compound compounds/demo-base.xml --dose 2mg/mL --form mesylate "
                    "--into plasma-7.4 --ratios 1,10,100 --format json");
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* key : {"\"points\"", "\"ratio\"", "\"pH\"", "\"drug_mol_per_L\"", "\"solubility_mol_per_L\"",
                          "\"supersaturation_ratio\"", "\"risk\"", "\"notes\""}) {
    EXPECT_NE(r.out.find(key), std::string::npos) << key;
  }
  r = run("dilute --add KH2PO4=25mM --into plasma-7.4 --ratios 1,0.5");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("--ratios"), std::string::npos) << r.err;
  r = run("dilute --add KH2PO4=25mM --into blood");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("--into"), std::string::npos) << r.err;
  r = run("dilute --add KH2PO4=25mM");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("--into"), std::string::npos) << r.err;
  r = run("dilute --add KH2PO4=25mM --into water --ratios 1,x");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("--ratios"), std::string::npos) << r.err;
}

}  // namespace
}  // namespace pkarta
