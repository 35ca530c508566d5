// Buffer screening: buffer preparation, the minimum concentration, temperature columns,
// ranking, batch runs and the command line.
#include "pkarta/analyses/screen.h"

#include "pkarta/analyses/dilute.h"

#include <gtest/gtest.h>

#include "cli_run.h"
#include <sys/wait.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <regex>
#include <sstream>

#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"
#include "pkarta/writers/screen_writer.h"

namespace pkarta {
namespace {

using pkarta_test::RunResult;
using pkarta_test::run;
using pkarta_test::temp_dir;
using pkarta_test::write_file;
using pkarta_test::slurp;

// Debye-Hückel A at 25 °C, 0.5108 (from Malmberg and Maryott 1956 with the
// Kell density) and the Davies (1962) bracket, written out here for the hand computations.
constexpr double kA25 = 0.5108;
double davies_f(double I) { return std::sqrt(I) / (1.0 + std::sqrt(I)) - 0.3 * I; }

class Screen : public ::testing::Test {
 protected:
  void SetUp() override {
    lib_ = builtin_library();
    Warnings w;
    base_ = load_compound_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-base.xml", lib_, &w);
    acid_ = load_compound_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-acid.xml", lib_, &w);
  }
  ScreenJob job(const Compound& c, double dose_mg_per_mL, const std::string& form) const {
    ScreenJob j;
    j.compound = c;
    j.form = form;
    j.dose_mol_per_L = dose_mg_per_mL / form_molar_mass(c, form, lib_);
    return j;
  }
  Library lib_;
  Compound base_;
  Compound acid_;
};

TEST_F(Screen, EqualPartsAtPkaHoldPkaWithinTheActivityCorrection) {
  // Henderson-Hasselbalch with Davies activities: for HA/A- at equal parts,
  // pH = pKa + log10 gamma(A-) = pKa - A f(I); for H2PO4-/HPO4(2-), pH = pK2 - 3 A f(I).
  // Acetate pKa 4.756, phosphate pK2 7.198 (Goldberg, Kishore and Lennen 2002, J. Phys. Chem. Ref. Data 31, 231).
  struct Case {
    const char* acid;
    const char* base;
    double conc, pka, ionic_strength, z2_difference;
  };
  const Case cases[] = {
      {"acetic-acid", "sodium-acetate", 0.05, 4.756, 0.05, 1.0},
      {"KH2PO4", "Na2HPO4", 0.025, 7.198, 0.1, 3.0},
  };
  for (const Case& c : cases) {
    for (ActivityModel model : {ActivityModel::kDavies, ActivityModel::kIdeal}) {
      Mixture m;
      m.activity = model;
      add_reagent(m, lib_, c.acid, c.conc);
      add_reagent(m, lib_, c.base, c.conc);
      const Equilibrium e = solve(m);
      ASSERT_TRUE(e.usable());
      const double correction =
          model == ActivityModel::kIdeal ? 0.0 : -c.z2_difference * kA25 * davies_f(c.ionic_strength);
      EXPECT_NEAR(e.pH, c.pka + correction, 0.003) << c.acid << " + " << c.base;
      EXPECT_LE(std::fabs(e.pH - c.pka), std::fabs(correction) + 0.003);
    }
  }
}

TEST_F(Screen, BufferAloneIsTitratedToHalfNeutralisationAtItsApparentPka) {
  // Acetic acid C plus NaOH t: equal parts when t = C/2 - [H+] (charge balance), where the pH
  // is pKa - A f(I) with I = t + [H+] (Henderson-Hasselbalch with Davies, by hand).
  const double c = 0.05;
  const double pka = 4.756;  // Goldberg, Kishore and Lennen 2002
  double t = c / 2, pH = pka;
  for (int k = 0; k < 50; ++k) {
    pH = pka - kA25 * davies_f(t + std::pow(10.0, -pH));
    const double h = std::pow(10.0, -pH) / std::pow(10.0, -kA25 * davies_f(t));
    t = c / 2 - h;
  }
  const BufferPreparation p = prepare_buffer(lib_, lib_.buffer("acetate"), c, pH, 25.0);
  ASSERT_TRUE(p.converged);
  EXPECT_EQ(p.titrant, "NaOH");
  EXPECT_NEAR(p.titrant_mol_per_L, t, 2e-5);
  // The buffer alone sits at the target (the titrant was solved for it).
  Mixture m = screen_mixture(lib_, lib_.buffer("acetate"), p, nullptr, 0.0, "free", 25.0);
  EXPECT_NEAR(solve(m).pH, pH, 1e-9);
  // Tris base is brought down with HCl.
  const BufferPreparation tris = prepare_buffer(lib_, lib_.buffer("tris"), 0.05, 7.4, 25.0);
  EXPECT_EQ(tris.titrant, "HCl");
  EXPECT_GT(tris.titrant_mol_per_L, 0.04);
  EXPECT_LT(tris.titrant_mol_per_L, 0.05);
}

TEST_F(Screen, MoreBufferAlwaysMeansLessDrift) {
  // Buffer capacity grows with the buffer's concentration (van Slyke 1922), so the pH drift
  // caused by the acid or base a dose brings can only shrink as C rises: checked on a grid of
  // 31 concentrations from 1e-5 M to max-conc. With activities 1 this holds for every dose;
  // with Davies activities it is checked for free-form doses, which bring no ions (a salt dose
  // also shifts the buffer's apparent pKa through the ionic strength, see the next test).
  struct Case {
    const Compound* c;
    double dose_mg;
    const char* form;
    const char* buffer;
    double target;
  };
  const Case cases[] = {
      {&base_, 0.5, "hydrochloride", "citrate", 5.0},  {&base_, 0.5, "hydrochloride", "acetate", 4.5},
      {&base_, 0.05, "free", "phosphate", 7.0},        {&acid_, 5.0, "sodium", "phosphate", 7.4},
      {&acid_, 5.0, "sodium", "tris", 8.0},            {&acid_, 1.0, "free", "histidine", 6.0},
      {&acid_, 0.5, "free", "citrate", 4.0},           {&base_, 0.02, "free", "tris", 8.0},
      {&base_, 2.0, "hydrochloride", "phosphate", 6.5},  // dose partly undissolved
  };
  int grids = 0;
  for (const Case& k : cases) {
    for (ActivityModel model : {ActivityModel::kIdeal, ActivityModel::kDavies}) {
      if (model == ActivityModel::kDavies && std::string(k.form) != "free") continue;
      ScreenOptions opt;
      opt.target_pH = k.target;
      opt.activity = model;
      const ScreenJob j = job(*k.c, k.dose_mg, k.form);
      const Buffer& b = lib_.buffer(k.buffer);
      double previous = INFINITY;
      for (int i = 0; i <= 30; ++i) {
        const double conc = 1e-5 * std::pow(b.max_conc_mol_per_L / 1e-5, i / 30.0);
        const double drift =
            std::fabs(ph_after_drug(lib_, b, conc, j.compound, j.dose_mol_per_L, j.form, opt) - k.target);
        ASSERT_TRUE(std::isfinite(drift));
        EXPECT_LE(drift, previous + 1e-9) << k.buffer << " " << k.form << " at " << conc << " M, "
                                          << (model == ActivityModel::kIdeal ? "ideal" : "Davies");
        previous = drift;
      }
      ++grids;
    }
  }
  EXPECT_EQ(grids, 13);
}

TEST_F(Screen, SaltDoseShiftsTheApparentPkaAndMinConcIsTheRobustEnd) {
  // A 5 mg/mL dose of a sodium salt (18.5 mM) raises the ionic strength; phosphate's apparent
  // pK2 falls by 3 A [f(I) - f(I0)] (Davies), about 0.08 at a few mM of buffer, so the pH after
  // the dose crosses the target near 0.16 mM (the salt's base pushing up) and then sags below it
  // before recovering as the buffer's own ionic strength takes over. With a tolerance of 0.05
  // the reported min_conc is the lower end of the range that reaches max-conc. The dose
  // criterion alone (no acid or base challenge).
  ScreenOptions opt;
  opt.challenge_mol_per_L = 0.0;
  opt.target_pH = 7.4;
  opt.tolerance_pH = 0.05;
  opt.buffers = {"phosphate"};
  const ScreenJob j = job(acid_, 5.0, "sodium");
  const ScreenResult r = screen(lib_, j, opt).results.front();
  ASSERT_EQ(r.status, ScreenStatus::kOk);
  const Buffer& b = lib_.buffer("phosphate");
  auto drift = [&](double c) {
    return ph_after_drug(lib_, b, c, j.compound, j.dose_mol_per_L, j.form, opt) - opt.target_pH;
  };
  // The sag: at 1.3 mM the pH lies below the target by about the activity shift.
  const double sag = drift(1.3e-3);
  const double expected = -3 * kA25 * (davies_f(0.0185 + 0.0032) - davies_f(0.0032));
  EXPECT_LT(sag, -opt.tolerance_pH);
  EXPECT_NEAR(sag, expected, 0.5 * std::fabs(expected));
  // Somewhere below the sag the pH crosses the target, but min_conc lies above the sag.
  EXPECT_GT(*r.min_conc_mol_per_L, 1.3e-3);
  for (int i = 0; i <= 20; ++i) {
    const double c = *r.min_conc_mol_per_L * std::pow(b.max_conc_mol_per_L / *r.min_conc_mol_per_L, i / 20.0);
    EXPECT_LE(std::fabs(drift(c)), opt.tolerance_pH) << c;
  }
  EXPECT_GT(std::fabs(drift(0.99 * *r.min_conc_mol_per_L)), opt.tolerance_pH);
}

// A maleate salt screened in a maleate buffer: the dose's hydrogen maleate joins the buffer's
// own maleate (mass balance: total maleate = buffer + dose, common practice), so the pH after
// the drug is the pH of that hand-built mixture (buffer, its titrant, drug and one maleate
// total), and not the pH with the buffer's maleate alone.
TEST_F(Screen, SaltCounterionOfTheBuffersOwnSystemAddsToTheBuffer) {
  Compound c = base_;
  Salt s;
  s.id = "maleate";
  s.counterion = "maleate";
  s.counterion_is_system = true;
  s.counterion_charge = -1;  // hydrogen maleate
  s.ksp = 1.0;               // soluble: no solid at these doses
  c.salts.push_back(s);
  const Buffer& buffer = lib_.buffers.at("maleate");
  const double conc = 0.02, pH = 6.0, T = 25.0;
  const double dose = 2.0 / form_molar_mass(c, "maleate", lib_);  // 2 mg/mL of the salt
  const BufferPreparation prep = prepare_buffer(lib_, buffer, conc, pH, T);
  ASSERT_TRUE(prep.converged);
  ASSERT_EQ(prep.titrant, "NaOH");

  const Mixture screened = screen_mixture(lib_, buffer, prep, &c, dose, "maleate", T);
  double maleate_total = 0.0;
  for (const SystemAmount& sa : screened.systems) {
    if (sa.system.id == "maleate") maleate_total += sa.total_mol_per_L;
  }
  EXPECT_NEAR(maleate_total, conc + dose, 1e-15 * (conc + dose));

  Mixture hand;
  hand.temperature_C = T;
  hand.add_system(lib_.system("maleate"), conc);
  hand.add_ion("Na+", +1, prep.titrant_mol_per_L);
  add_drug(hand, lib_, c, dose, "maleate");
  const Equilibrium e = solve(hand, SolverOptions());
  ASSERT_EQ(e.termination, Termination::kConverged) << e.message;
  ScreenOptions o;
  o.target_pH = pH;
  o.temperature_C = T;
  const double after = ph_after_drug(lib_, buffer, conc, c, dose, "maleate", o);
  EXPECT_NEAR(after, e.pH, 1e-9);

  // Without the dose's maleate (the buffer's total only) the pH is measurably different.
  Mixture without = hand;
  for (SystemAmount& sa : without.systems) {
    if (sa.system.id == "maleate") sa.total_mol_per_L = conc;
  }
  const Equilibrium w = solve(without, SolverOptions());
  ASSERT_EQ(w.termination, Termination::kConverged);
  EXPECT_GT(std::fabs(w.pH - e.pH), 0.01);
}

TEST_F(Screen, MinimumConcentrationIsConsistent) {
  // At min_conc the drift is within the tolerance; at 0.99 min_conc it is not (docs/model.md).
  // The dose criterion alone (challenge off); the values shown are at the recommended strength.
  struct Case {
    const Compound* c;
    double dose_mg;
    const char* form;
    double target, tolerance;
  };
  const Case cases[] = {{&base_, 0.5, "hydrochloride", 5.0, 0.1},
                        {&acid_, 5.0, "sodium", 7.4, 0.05},
                        {&base_, 0.2, "free", 7.0, 0.1}};
  int checked = 0;
  for (const Case& k : cases) {
    ScreenOptions opt;
    opt.challenge_mol_per_L = 0.0;
    opt.target_pH = k.target;
    opt.tolerance_pH = k.tolerance;
    const ScreenJob j = job(*k.c, k.dose_mg, k.form);
    const ScreenReport rep = screen(lib_, j, opt);
    for (const ScreenResult& r : rep.results) {
      if (!r.min_conc_mol_per_L || r.min_conc_at_lower_bound) continue;
      const Buffer& b = lib_.buffer(r.buffer);
      const double at = ph_after_drug(lib_, b, *r.min_conc_mol_per_L, j.compound, j.dose_mol_per_L, j.form, opt);
      const double below =
          ph_after_drug(lib_, b, 0.99 * *r.min_conc_mol_per_L, j.compound, j.dose_mol_per_L, j.form, opt);
      EXPECT_LE(std::fabs(at - k.target), k.tolerance) << r.buffer;
      EXPECT_GT(std::fabs(below - k.target), k.tolerance) << r.buffer;
      EXPECT_EQ(r.binding, "dose") << r.buffer;
      ASSERT_TRUE(r.recommended_conc_mol_per_L) << r.buffer;
      EXPECT_NEAR(r.pH_after_drug,
                  ph_after_drug(lib_, b, *r.recommended_conc_mol_per_L, j.compound, j.dose_mol_per_L, j.form, opt),
                  1e-9)
          << r.buffer;
      ++checked;
    }
  }
  EXPECT_GE(checked, 20);
}

TEST_F(Screen, NotAchievableReportsValuesAtMaxConc) {
  // A 10 mg/mL dose of the sodium salt of an acid (pKa 4.3, 37 mM) against a tolerance of
  // 0.001 at pH 7.4: neither 0.1 M phosphate nor 0.1 M HEPES holds it (the salt's own pH is
  // about 8.7).
  ScreenOptions opt;
  opt.target_pH = 7.4;
  opt.tolerance_pH = 0.001;
  opt.buffers = {"phosphate", "HEPES"};
  const ScreenReport rep = screen(lib_, job(acid_, 10.0, "sodium"), opt);
  for (const ScreenResult& r : rep.results) {
    EXPECT_EQ(r.status, ScreenStatus::kNotAchievable) << r.buffer;
    EXPECT_FALSE(r.min_conc_mol_per_L);
    EXPECT_EQ(r.conc_used_mol_per_L, r.max_conc_mol_per_L);
    EXPECT_GT(std::fabs(r.pH_after_drug - opt.target_pH), opt.tolerance_pH);
  }
}

TEST_F(Screen, TrisShiftsAbout003PerDegreeWhilePhosphateShiftsLittle) {
  // Tris dpKa/dT = -0.028 per K from dH = 47.45 kJ/mol (Goldberg et al. 2002), -0.031 (Good et
  // al. 1966), "about 0.03 per degree" (common practice): the screen's 5 and 40 °C columns
  // must show a slope within -0.034 to -0.024 per °C. Phosphate pK2: -0.0021 per K (Goldberg);
  // the Ph. Eur. 0.025/0.025 phosphate standard changes by -0.0028 per °C (Ph. Eur. 5.0
  // Table 2.2.3.-2): slope within -0.006 to 0.
  ScreenOptions opt;
  opt.tolerance_pH = 0.02;
  opt.challenge_mol_per_L = 0.0;  // 1 mM within 0.02 would need more than max-conc
  const ScreenJob j = job(acid_, 5.0, "sodium");  // the dose needs a real buffer to hold 0.02
  opt.target_pH = 8.0;
  opt.buffers = {"tris"};
  const ScreenResult tris = screen(lib_, j, opt).results.front();
  opt.target_pH = 7.0;
  opt.buffers = {"phosphate"};
  const ScreenResult phos = screen(lib_, j, opt).results.front();
  for (const ScreenResult* r : {&tris, &phos}) {
    ASSERT_EQ(r->status, ScreenStatus::kOk) << r->buffer;
    EXPECT_GT(*r->min_conc_mol_per_L, 1e-3) << r->buffer;  // a real buffer, not the dose alone
  }
  const double tris_slope = (tris.pH_at_40C - tris.pH_at_5C) / 35.0;
  const double phos_slope = (phos.pH_at_40C - phos.pH_at_5C) / 35.0;
  EXPECT_GE(tris_slope, -0.034);
  EXPECT_LE(tris_slope, -0.024);
  EXPECT_GE(phos_slope, -0.006);
  EXPECT_LE(phos_slope, 0.0);
  // The 25 °C value lies between the two (monotone van 't Hoff course).
  EXPECT_GT(tris.pH_at_5C, tris.pH_after_drug);
  EXPECT_LT(tris.pH_at_40C, tris.pH_after_drug);
}

TEST_F(Screen, BuffersThatHoldAtBothStorageTemperaturesRankFirst) {
  // Tris at pH 7.7 moves by about -0.03 pH per °C (dpKa/dT -0.028 from dH 47.45 kJ/mol,
  // Goldberg et al. 2002; -0.031, Good et al. 1966): some +0.5 at 5 °C, far outside +/-0.10.
  // Phosphate moves by about -0.003 per °C (Ph. Eur. 5.0 Table 2.2.3.-2, the 0.025/0.025
  // standard): +0.06 at 5 °C, inside. Both hold the target at 25 °C; the one that also holds in
  // storage ranks first although it needs the higher strength, and the other stays ok, marked.
  ScreenOptions opt;
  opt.target_pH = 7.7;
  opt.buffers = {"tris", "phosphate"};
  const ScreenReport rep = screen(lib_, job(acid_, 1.0, "sodium"), opt);
  ASSERT_EQ(rep.results.size(), 2u);
  const ScreenResult& first = rep.results[0];
  const ScreenResult& second = rep.results[1];
  ASSERT_EQ(first.buffer, "phosphate");
  ASSERT_EQ(second.buffer, "tris");
  for (const ScreenResult* r : {&first, &second}) ASSERT_EQ(r->status, ScreenStatus::kOk) << r->buffer;
  EXPECT_GT(*first.min_conc_mol_per_L, *second.min_conc_mol_per_L);
  EXPECT_TRUE(first.holds_at_storage);
  EXPECT_NEAR(first.pH_at_5C, 7.7 + 20 * 0.003, 0.04);
  EXPECT_FALSE(second.holds_at_storage);
  EXPECT_GT(second.pH_at_5C - 7.7, 0.4);
  EXPECT_LT(second.pH_at_40C - 7.7, -0.3);
  const std::string note = screen_storage_note(rep);
  EXPECT_NE(note.find("ok (25 °C): holds the target at 25 °C only"), std::string::npos) << note;
  EXPECT_NE(note.find("tris"), std::string::npos) << note;
  EXPECT_EQ(note.find("phosphate"), std::string::npos) << note;
  // With --max-drift the storage pH becomes a criterion: tris is then not achievable.
  opt.max_drift_pH = 0.1;
  const ScreenReport strict = screen(lib_, job(acid_, 1.0, "sodium"), opt);
  EXPECT_EQ(strict.results[0].buffer, "phosphate");
  EXPECT_EQ(strict.results[0].status, ScreenStatus::kOk);
  EXPECT_NE(strict.results[1].status, ScreenStatus::kOk);
}

TEST_F(Screen, DoseThatDissolvesAt25CButNotAt40CDoesNotHoldInStorage) {
  // Hand calculation (Henderson-Hasselbalch with van 't Hoff, ideal activities) for the demo
  // base, 0.9 mg/mL of the hydrochloride (2.59 mM) at pH 6.5 in maleate: at 25 °C, S = S0 (1 +
  // 10^(pKa2 - pH)) = 3.85e-5 x 80.4 = 3.10 mM, above the dose; at 40 °C, S0 = 3.85e-5 x
  // exp(18000/R (1/298.15 - 1/313.15)) = 5.45e-5 and pKa2 = 8.4 - 45000/(R ln 10) (1/298.15 -
  // 1/313.15) = 8.02, so at the buffer's pH there (about 6.48) S = 5.45e-5 x 35.5 = 1.9 mM, below
  // it. The free base comes out at 40 °C; the screen says so and does not count the buffer as
  // holding in storage. (The dose's margins, 1.2 and 0.75, are wider than the activity
  // corrections at I below 0.1.)
  const double r = 8.314462618, t25 = 298.15, t40 = 313.15;
  const double s0_40 = 3.85e-5 * std::exp(18000.0 / r * (1 / t25 - 1 / t40));
  const double pka_40 = 8.4 - 45000.0 / (r * std::log(10.0)) * (1 / t25 - 1 / t40);
  const ScreenJob j = job(base_, 0.9, "hydrochloride");
  ASSERT_GT(3.85e-5 * (1 + std::pow(10.0, 8.4 - 6.5)), 1.15 * j.dose_mol_per_L);
  ScreenOptions opt;
  opt.target_pH = 6.5;
  opt.buffers = {"maleate"};
  const ScreenResult m = screen(lib_, j, opt).results.front();
  ASSERT_EQ(m.status, ScreenStatus::kOk);
  ASSERT_LT(s0_40 * (1 + std::pow(10.0, pka_40 - m.pH_at_40C)), 0.8 * j.dose_mol_per_L);
  EXPECT_EQ(m.drug_solid, "none");
  EXPECT_EQ(m.drug_solid_at_40C, "free");
  EXPECT_EQ(m.drug_solid_at_5C, "none");
  EXPECT_LT(std::fabs(m.pH_at_40C - 6.5), 0.1);  // the pH itself holds
  EXPECT_FALSE(m.holds_at_storage);
}

// With a dilution medium each ok formulation is diluted as `dilute` dilutes it (1:1 to 1:100,
// plasma at 37 °C with open CO2): the screen's highest supersaturation ratio is that of
// analyse_dilution on the same formulation rebuilt here. At pH 5 the trivalent citrate holds the
// mixture more acid on the first dilution into plasma than acetate at the same strength (its
// capacity near pH 5-6.5 per mM is larger), so the weak base stays further from precipitating.
TEST_F(Screen, DilutionIntoPlasmaMatchesDiluteForEachOkFormulation) {
  ScreenOptions opt;
  opt.target_pH = 5.0;
  opt.route = "parenteral";
  opt.buffers = {"acetate", "citrate"};
  opt.dilution_medium = "plasma-7.4";
  const ScreenJob j = job(base_, 0.5, "hydrochloride");
  const ScreenReport rep = screen(lib_, j, opt);
  ASSERT_EQ(rep.dilution_medium, "plasma-7.4");
  std::map<std::string, double> worst;
  for (const ScreenResult& r : rep.results) {
    ASSERT_EQ(r.status, ScreenStatus::kOk) << r.buffer;
    ASSERT_TRUE(std::isfinite(r.dilution_max_supersaturation)) << r.buffer;
    const Buffer& b = lib_.buffer(r.buffer);
    const BufferPreparation prep = prepare_buffer(lib_, b, r.conc_used_mol_per_L, opt.target_pH, opt.temperature_C);
    const Mixture m = screen_mixture(lib_, b, prep, &j.compound, j.dose_mol_per_L, j.form, opt.temperature_C);
    DilutionOptions d;
    d.medium_id = "plasma-7.4";
    const DilutionResult dr = analyse_dilution(m, lib_, d);
    ASSERT_TRUE(dr.usable()) << dr.message;
    double hi = 0.0;
    for (const DilutionPoint& p : dr.points) hi = std::max(hi, p.supersaturation_ratio);
    EXPECT_NEAR(r.dilution_max_supersaturation, hi, 1e-9 * hi) << r.buffer;
    worst[r.buffer] = hi;
  }
  EXPECT_LT(worst.at("citrate"), worst.at("acetate"));
  // Without a medium nothing is diluted.
  opt.dilution_medium.clear();
  for (const ScreenResult& r : screen(lib_, j, opt).results) EXPECT_TRUE(std::isnan(r.dilution_max_supersaturation));
}

TEST_F(Screen, DoseAboveTheHendersonHasselbalchSolubilityIsNotSoluble) {
  // Ideal Henderson-Hasselbalch for the base (pKa 3.1, 8.4; S0 12 ug/mL): at pH 6.5,
  // S = S0 (1 + 10^(8.4 - 6.5) + 10^(8.4 + 3.1 - 13)) = 3.1e-3 mol/L, below a 2 mg/mL dose of
  // the hydrochloride (5.7e-3 mol/L); at pH 5.0 a 0.5 mg/mL dose (1.4e-3 mol/L) is far below S.
  const double s0 = 12e-3 / 311.4;
  const double s_hh = s0 * (1 + std::pow(10.0, 8.4 - 6.5) + std::pow(10.0, 8.4 + 3.1 - 2 * 6.5));
  const ScreenJob high = job(base_, 2.0, "hydrochloride");
  ASSERT_LT(s_hh * 1.2, high.dose_mol_per_L);  // a clear case: activity effects are below 20 %
  ScreenOptions opt;
  opt.target_pH = 6.5;
  opt.buffers = {"phosphate", "histidine", "acetate"};
  ScreenReport rep = screen(lib_, high, opt);
  for (const ScreenResult& r : rep.results) {
    EXPECT_EQ(r.status, r.buffer == "acetate" ? ScreenStatus::kOutsideRange : ScreenStatus::kDoseNotSoluble)
        << r.buffer;
  }
  EXPECT_NEAR(rep.solubility_at_target_mol_per_L, s_hh, 0.2 * s_hh);
  opt.target_pH = 5.0;
  opt.buffers = {"citrate", "acetate"};
  rep = screen(lib_, job(base_, 0.5, "hydrochloride"), opt);
  for (const ScreenResult& r : rep.results) EXPECT_EQ(r.status, ScreenStatus::kOk) << r.buffer;
}

TEST_F(Screen, OutsideRangeWhenNoPkaWithinOneUnit) {
  // outside-range when no pKa(T) lies within target +/- 1. At pH 7.4: acetate
  // (4.756), lactate (3.86), borate (9.237) are outside; phosphate (7.198), HEPES (7.564) inside.
  ScreenOptions opt;
  opt.target_pH = 7.4;
  opt.buffers = {"acetate", "lactate", "borate", "phosphate", "HEPES"};
  const ScreenReport rep = screen(lib_, job(acid_, 1.0, "sodium"), opt);
  for (const ScreenResult& r : rep.results) {
    const bool outside = r.buffer == "acetate" || r.buffer == "lactate" || r.buffer == "borate";
    EXPECT_EQ(r.status == ScreenStatus::kOutsideRange, outside) << r.buffer;
  }
  // Listed last.
  EXPECT_NE(rep.results[0].status, ScreenStatus::kOutsideRange);
  EXPECT_NE(rep.results[1].status, ScreenStatus::kOutsideRange);
  EXPECT_EQ(rep.results[2].status, ScreenStatus::kOutsideRange);
}

TEST_F(Screen, RankingPutsAchievableFirstByConcentrationThenTemperatureDrift) {
  // The ranking rule of the issue: achievable first, by concentration needed, then by pH drift
  // over 5-40 °C; outside-range last.
  ScreenOptions opt;
  opt.target_pH = 5.0;
  const ScreenReport rep = screen(lib_, job(base_, 0.5, "hydrochloride"), opt);
  ASSERT_EQ(rep.results.size(), lib_.buffers.size());
  int last_group = 0;
  for (std::size_t i = 0; i < rep.results.size(); ++i) {
    const ScreenResult& r = rep.results[i];
    const int group = r.status == ScreenStatus::kOk ? 0 : r.status == ScreenStatus::kOutsideRange ? 3 : 1;
    EXPECT_GE(group, last_group) << r.buffer;
    last_group = group;
    if (i > 0 && r.status == ScreenStatus::kOk) {
      const ScreenResult& p = rep.results[i - 1];
      EXPECT_LE(*p.min_conc_mol_per_L, *r.min_conc_mol_per_L) << p.buffer << " before " << r.buffer;
      if (*p.min_conc_mol_per_L == *r.min_conc_mol_per_L) {
        EXPECT_LE(std::fabs(p.temperature_drift_pH()), std::fabs(r.temperature_drift_pH()));
      }
    }
  }
  EXPECT_EQ(rep.results.front().status, ScreenStatus::kOk);
  EXPECT_EQ(rep.results.back().status, ScreenStatus::kOutsideRange);
}

TEST_F(Screen, DoseRangeReportsTheWorstPh) {
  // The worst pH over dose +/-10 % at the recommended strength: a base hydrochloride acidifies,
  // so the worst is at +10 %, computed here directly. The whole range is a criterion: an ok
  // buffer keeps the worst pH inside the tolerance.
  ScreenOptions opt;
  opt.target_pH = 5.0;
  opt.dose_range_fraction = 0.1;
  opt.buffers = {"citrate"};
  const ScreenJob j = job(base_, 0.5, "hydrochloride");
  const ScreenResult r = screen(lib_, j, opt).results.front();
  ASSERT_TRUE(r.worst_pH_in_dose_range);
  const Buffer& b = lib_.buffer("citrate");
  const double up = ph_after_drug(lib_, b, r.conc_used_mol_per_L, j.compound, 1.1 * j.dose_mol_per_L, j.form, opt);
  const double down = ph_after_drug(lib_, b, r.conc_used_mol_per_L, j.compound, 0.9 * j.dose_mol_per_L, j.form, opt);
  const double worst = std::fabs(up - 5.0) > std::fabs(down - 5.0) ? up : down;
  EXPECT_NEAR(*r.worst_pH_in_dose_range, worst, 1e-9);
  EXPECT_GE(std::fabs(*r.worst_pH_in_dose_range - 5.0), std::fabs(r.pH_after_drug - 5.0));
  ASSERT_EQ(r.status, ScreenStatus::kOk);
  EXPECT_TRUE(r.dose_range_within_tolerance);
  const ScreenCriterion* range = r.criterion("dose-range");
  ASSERT_TRUE(range);
  EXPECT_TRUE(range->pass);
  EXPECT_NEAR(range->value, worst, 1e-9);
  EXPECT_DOUBLE_EQ(parse_dose_range("10%"), 0.1);
  EXPECT_DOUBLE_EQ(parse_dose_range("0.1"), 0.1);
  EXPECT_DOUBLE_EQ(parse_dose_range("+/-5%"), 0.05);
  EXPECT_DOUBLE_EQ(parse_dose_range("\xC2\xB1" "10%"), 0.1);
  EXPECT_THROW(parse_dose_range("10"), InputError);
  EXPECT_THROW(parse_dose_range("ten"), InputError);
}

TEST_F(Screen, BatchInParallelIsIdenticalToSerial) {
  // Results of a parallel batch are identical to serial runs.
  ScreenOptions opt;
  opt.target_pH = 6.0;
  opt.dose_range_fraction = 0.1;
  const std::vector<ScreenJob> jobs = {job(base_, 0.5, "hydrochloride"), job(acid_, 2.0, "sodium"),
                                       job(base_, 0.1, "free"), job(acid_, 0.2, "free")};
  BatchOptions par;
  par.threads = 3;
  std::size_t calls = 0, last_done = 0;
  par.progress = [&](std::size_t done, std::size_t total) {
    ++calls;
    EXPECT_EQ(done, last_done + 1);
    EXPECT_EQ(total, jobs.size() * lib_.buffers.size());
    last_done = done;
  };
  const std::vector<ScreenReport> batch = screen_batch(lib_, jobs, opt, par);
  EXPECT_EQ(calls, jobs.size() * lib_.buffers.size());
  ASSERT_EQ(batch.size(), jobs.size());
  for (std::size_t i = 0; i < jobs.size(); ++i) {
    const ScreenReport serial = screen(lib_, jobs[i], opt);
    ASSERT_EQ(serial.results.size(), batch[i].results.size());
    for (std::size_t k = 0; k < serial.results.size(); ++k) {
      const ScreenResult &a = serial.results[k], &b = batch[i].results[k];
      EXPECT_EQ(a.buffer, b.buffer);
      EXPECT_EQ(a.status, b.status);
      EXPECT_EQ(a.min_conc_mol_per_L, b.min_conc_mol_per_L);
      EXPECT_EQ(a.pH_after_drug, b.pH_after_drug);
      EXPECT_EQ(a.pH_at_5C, b.pH_at_5C);
      EXPECT_EQ(a.pH_at_40C, b.pH_at_40C);
      EXPECT_EQ(a.capacity_mol_per_L_per_pH, b.capacity_mol_per_L_per_pH);
      EXPECT_EQ(a.worst_pH_in_dose_range, b.worst_pH_in_dose_range);
    }
  }
}

TEST_F(Screen, RouteFilterAndOptionChecks) {
  ScreenOptions opt;
  opt.target_pH = 7.0;
  opt.route = "parenteral";
  for (const Buffer* b : screen_candidates(lib_, opt)) EXPECT_TRUE(b->allows_route("parenteral")) << b->id;
  EXPECT_LT(screen_candidates(lib_, opt).size(), lib_.buffers.size());
  std::string err;
  opt.tolerance_pH = 0;
  EXPECT_FALSE(opt.is_valid(&err));
  EXPECT_NE(err.find("tolerance_pH"), std::string::npos);
  opt.tolerance_pH = 0.1;
  opt.target_pH = 14.5;
  EXPECT_FALSE(opt.is_valid(&err));
  opt.target_pH = 7;
  opt.route = "nasal";
  EXPECT_FALSE(opt.is_valid(&err));
  opt.route = "any";
  opt.buffers = {"no-such-buffer"};
  EXPECT_THROW(screen_candidates(lib_, opt), InputError);
}

// ---------------------------------------------------------------------------------------------
// The command line.

TEST(ScreenCli, JsonCarriesTheStableKeys) {
  const RunResult r = run("screen --compound compounds/demo-base.xml --dose 0.5mg/mL --form hydrochloride "
                          "--target-ph 5 --dose-range 10% --format json");
  ASSERT_EQ(r.code, 0) << r.err;
  const nlohmann::json j = nlohmann::json::parse(r.out);
  for (const char* k : {"target_pH", "tolerance_pH", "dose_mol_per_L", "results", "caution"}) {
    EXPECT_TRUE(j.contains(k)) << k;
  }
  EXPECT_DOUBLE_EQ(j["target_pH"].get<double>(), 5.0);
  EXPECT_DOUBLE_EQ(j["tolerance_pH"].get<double>(), 0.1);  // the default
  ASSERT_EQ(j["results"].size(), 20u);
  for (const auto& x : j["results"]) {
    for (const char* k : {"buffer", "status", "min_conc_mol_per_L", "pH_after_drug", "capacity_mol_per_L_per_pH",
                          "ionic_strength_mol_per_L", "osmolarity_mOsm_per_L", "pH_at_5C", "pH_at_40C",
                          "routes", "worst_pH_in_dose_range"}) {
      EXPECT_TRUE(x.contains(k)) << k;
    }
  }
  EXPECT_EQ(j["results"][0]["status"], "ok");
}

TEST(ScreenCli, TextAndCsvCarryUnitsAndTheCaution) {
  RunResult r = run("screen --compound compounds/demo-acid.xml --dose 5mg/mL --form sodium --target-ph 7.4 "
                    "--buffers phosphate,tris --route oral");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("min (mM)"), std::string::npos);
  EXPECT_NE(r.out.find("Caution"), std::string::npos);
  EXPECT_NE(r.out.find("must be"), std::string::npos);  // osmolality to be measured
  r = run("screen --compound compounds/demo-acid.xml --dose 5mg/mL --form sodium --target-ph 7.4 --format csv");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("min_conc_mol_per_L"), std::string::npos);
  r = run("screen --compound compounds/demo-acid.xml --dose 5mg/mL --form sodium --target-ph 7.4 --format csv "
          "--table notes");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("caution,"), std::string::npos);
}

// The screen's answer ends with the recipe command that makes it: pasted as printed (backslash
// line breaks), it runs and gives the formulation at the target pH with the buffer and strength
// of the screen's leading line. Demo acid, 5 mg/mL at pH 7.4, parenteral: no buffer made first
// holds it, so the command is of the adjusted fallback's leader (with --preparation adjusted and
// --isotonic, 290 mOsm/kg, the common-practice tonicity target).
TEST(ScreenCli, PrintsTheRecipeCommandOfItsAnswerAndTheCommandRuns) {
  const RunResult r = run("screen --compound compounds/demo-acid.xml --dose 5mg/mL --target-ph 7.4 --route parenteral");
  ASSERT_EQ(r.code, 0) << r.err;
  const std::size_t at = r.out.find("pkarta recipe ");
  ASSERT_NE(at, std::string::npos) << r.out;
  std::string cmd;
  for (std::size_t i = at; i < r.out.size(); ++i) {
    if (r.out.compare(i, 2, "\\\n") == 0) {  // a backslash-newline and the indentation after it
      i += 2;
      while (i < r.out.size() && r.out[i] == ' ') ++i;
      --i;
      continue;
    }
    if (r.out[i] == '\n') break;
    cmd += r.out[i];
  }
  EXPECT_NE(cmd.find("--preparation adjusted"), std::string::npos) << cmd;
  EXPECT_NE(cmd.find("--isotonic"), std::string::npos) << cmd;
  const RunResult json = run("screen --compound compounds/demo-acid.xml --dose 5mg/mL --target-ph 7.4 --route parenteral "
                             "--format json");
  ASSERT_EQ(json.code, 0) << json.err;
  const nlohmann::json j = nlohmann::json::parse(json.out);
  const nlohmann::json& lead = j["premade_fallback"]["results"][0];
  const RunResult recipe = run(cmd.substr(std::string("pkarta ").size()) + " --format json");
  ASSERT_EQ(recipe.code, 0) << cmd << "\n" << recipe.err;
  const nlohmann::json x = nlohmann::json::parse(recipe.out);
  EXPECT_EQ(x["buffer"], lead["buffer"]);
  EXPECT_NEAR(x["conc_mol_per_L"].get<double>(), lead["recommended_conc_mol_per_L"].get<double>(), 1e-9);
  EXPECT_NEAR(x["formulation"]["pH"].get<double>(), 7.4, 0.005);
  EXPECT_NEAR(x["formulation"]["osmolality_estimate_mOsm_per_kg"].get<double>(), 290.0, 1.0);
  EXPECT_EQ(j["recipe_command"], nlohmann::json(std::string(cmd)));
}

// Buffers with no pKa within 1 of the target are named on one line below the default table
// (acetate's pKa 4.76 is 2.6 from pH 7.4), and keep their rows with --wide.
TEST(ScreenCli, OutsideRangeBuffersAreNamedBelowTheDefaultTable) {
  const std::string args = "screen --compound compounds/demo-acid.xml --dose 1mg/mL --form sodium --target-ph 7.4";
  const RunResult r = run(args);
  ASSERT_EQ(r.code, 0) << r.err;
  const std::size_t line = r.out.find("outside-range (no pKa within 1 of the target");
  ASSERT_NE(line, std::string::npos) << r.out;
  EXPECT_NE(r.out.find("acetate 4.76", line), std::string::npos) << r.out;
  EXPECT_FALSE(std::regex_search(r.out, std::regex("\n  [0-9]+ +acetate +"))) << r.out;  // no row of its own
  const RunResult w = run(args + " --wide");
  ASSERT_EQ(w.code, 0) << w.err;
  EXPECT_TRUE(std::regex_search(w.out, std::regex("\n  [0-9]+ +acetate +outside-range"))) << w.out;
}

// The parenteral route dilutes each ok formulation into plasma by default (the text names the
// medium and gives each buffer's highest supersaturation ratio; JSON the medium and the values);
// --into none turns it off, and other routes dilute only when asked.
TEST(ScreenCli, ParenteralScreensDiluteIntoPlasmaUnlessToldOtherwise) {
  const std::string args = "screen --compound compounds/demo-base.xml --dose 0.5mg/mL --form hydrochloride --target-ph 5";
  const RunResult iv = run(args + " --route parenteral");
  ASSERT_EQ(iv.code, 0) << iv.err;
  EXPECT_NE(iv.out.find("diluted 1:1 to 1:100 into plasma-7.4"), std::string::npos) << iv.out;
  const RunResult json = run(args + " --route parenteral --format json");
  ASSERT_EQ(json.code, 0) << json.err;
  const nlohmann::json j = nlohmann::json::parse(json.out);
  EXPECT_EQ(j["dilution_medium"], "plasma-7.4");
  EXPECT_TRUE(j["results"][0]["dilution_max_supersaturation"].is_number());
  const RunResult off = run(args + " --route parenteral --into none");
  ASSERT_EQ(off.code, 0) << off.err;
  EXPECT_EQ(off.out.find("diluted 1:1"), std::string::npos);
  const RunResult oral = run(args + " --route oral");
  ASSERT_EQ(oral.code, 0) << oral.err;
  EXPECT_EQ(oral.out.find("diluted 1:1"), std::string::npos);
  const RunResult asked = run(args + " --route oral --into sif-6.8");
  ASSERT_EQ(asked.code, 0) << asked.err;
  EXPECT_NE(asked.out.find("diluted 1:1 to 1:100 into sif-6.8"), std::string::npos) << asked.out;
}

TEST(ScreenCli, BatchOverAFolderMatchesSingleRuns) {
  const std::string dir = temp_dir() + "/batch";
  std::filesystem::create_directories(dir);
  for (const char* f : {"demo-base.xml", "demo-acid.xml", "demo-ampholyte.xml"}) {
    std::filesystem::copy_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/" + f, dir + "/" + f,
                               std::filesystem::copy_options::overwrite_existing);
  }
  const RunResult batch = run("screen --compound " + dir + " --dose 0.2mg/mL --target-ph 6 --format json");
  ASSERT_EQ(batch.code, 0) << batch.err;
  const nlohmann::json all = nlohmann::json::parse(batch.out);
  ASSERT_EQ(all["screens"].size(), 3u);
  const RunResult one = run("screen --compound " + dir + "/demo-base.xml --dose 0.2mg/mL --target-ph 6 --format json");
  ASSERT_EQ(one.code, 0) << one.err;
  const nlohmann::json single = nlohmann::json::parse(one.out);
  // Files are taken in name order: demo-acid, demo-ampholyte, demo-base.
  EXPECT_EQ(all["screens"][2]["compound"], "demo-base");
  EXPECT_EQ(all["screens"][2]["results"], single["results"]);
}

TEST(ScreenCli, BadInputExitsTwoWithAClearMessage) {
  struct Case {
    const char* args;
    const char* expect;
  };
  const std::string base = "screen --compound compounds/demo-base.xml ";
  const Case cases[] = {
      {"--dose 1mg/mL --target-ph 6 --buffers phosphate,nonesuch", "--buffers: unknown buffer 'nonesuch'"},
      {"--dose 1mg/mL --target-ph 15", "--target-ph: value 15 is out of range"},
      {"--dose 1mg/mL --target-ph -1", "--target-ph: value -1 is out of range"},
      {"--dose 1mg/mL --target-ph seven", "--target-ph: value is not a number"},
      {"--dose 1mg/mL --target-ph 6 --tolerance 0", "--tolerance: tolerance 0 must be > 0"},
      {"--dose 1mg/mL --target-ph 6 --tolerance -0.1", "--tolerance: tolerance -0.1 must be > 0"},
      {"--dose 5 --target-ph 6", "--dose: amount \"5\" has no unit"},
      {"--dose 0mg/mL --target-ph 6", "--dose: the dose must be > 0"},
      {"--target-ph 6", "--dose: give the dose"},
      {"--dose 1mg/mL", "--target-ph: give the pH"},
      {"--dose 1mg/mL --target-ph 6 --route nasal", "--route: unknown route"},
      {"--dose 1mg/mL --target-ph 6 --dose-range 10", "--dose-range: dose range \"10\" is out of range"},
      {"--dose 1mg/mL --target-ph 6 --form tartrate", "has no salt 'tartrate'"},
      {"--dose 1mg/mL --target-ph 6 --buffers HEPES --route parenteral", "--route: none of the selected buffers"},
      {"--dose 1mg/mL --target-ph 6 --format xml", "--format: unknown format"},
      {"--dose 1mg/mL --target-ph 6 --into seawater", "--into: unknown medium 'seawater' (known: "},
  };
  for (const Case& c : cases) {
    const RunResult r = run(base + c.args);
    EXPECT_EQ(r.code, 2) << c.args << "\n" << r.err;
    EXPECT_NE(r.err.find(c.expect), std::string::npos) << c.args << "\nstderr: " << r.err;
    EXPECT_TRUE(r.out.empty()) << c.args;
  }
  const RunResult none = run("screen --dose 1mg/mL --target-ph 6");
  EXPECT_EQ(none.code, 2);
  EXPECT_NE(none.err.find("--compound"), std::string::npos);
}

}  // namespace
}  // namespace pkarta
