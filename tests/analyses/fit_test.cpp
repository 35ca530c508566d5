// Fitting pKa, intrinsic solubility and Ksp to measured solubilities: recovery of known
// parameters, published drug constants, warnings, CSV input, the fitted file and bad input.
#include "pkarta/analyses/fit.h"

#include <gtest/gtest.h>

#include "cli_run.h"
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <random>
#include <sstream>

#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

using pkarta_test::RunResult;
using pkarta_test::run;
using pkarta_test::temp_dir;
using pkarta_test::write_file;
using pkarta_test::slurp;

// ----- helpers -----------------------------------------------------------------------------

Pka make_pka(double value, GroupType type) {
  Pka p;
  p.value = value;
  p.type = type;
  return p;
}

// A compound built in code: pKa values (ascending), types, log10 S0 (mol/L).
Compound make_compound(const std::string& id, std::vector<Pka> pkas, double log10_s0) {
  Compound c;
  c.id = id;
  c.name = id;
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = id;
  c.system.pkas = std::move(pkas);
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = std::pow(10.0, log10_s0);
  return c;
}

FitPoint point(double pH, double log10_s) {
  FitPoint p;
  p.pH = pH;
  p.solubility_mol_per_L = std::pow(10.0, log10_s);
  p.where = SourceLocation{"test-data", 0, 0};
  return p;
}

const FitParameter& param(const FitResult& r, const std::string& name) {
  for (const FitParameter& p : r.parameters) {
    if (p.name == name) return p;
  }
  throw std::runtime_error("no parameter " + name);
}

bool has_warning(const FitResult& r, const std::string& text) {
  for (const std::string& w : r.warnings) {
    if (w.find(text) != std::string::npos) return true;
  }
  return false;
}

FitOptions ideal_options() {
  FitOptions o;
  o.conditions.activity = ActivityModel::kIdeal;
  return o;
}

// Invented ampholyte for the synthetic-data checks: acid pKa 4.0, base pKa 8.5 (zwitterionic
// neutral form), log10 S0 -4.0; no salts. The true values are these; data are made from them.
constexpr double kTrueLogS0 = -4.0;
constexpr double kTruePka1 = 4.0;
constexpr double kTruePka2 = 8.5;

Compound synthetic_ampholyte(double log_s0, double pka1, double pka2) {
  return make_compound("synthetic-ampholyte", {make_pka(pka1, GroupType::kAcid), make_pka(pka2, GroupType::kBase)},
                       log_s0);
}

// 20 points over pH 2-11 from the model (Davies, water, HCl/NaOH) with log-normal noise of
// sd `sigma` in log10, from `rng`.
std::vector<FitPoint> synthetic_data(const Library& lib, std::mt19937_64& rng, double sigma) {
  const Compound truth = synthetic_ampholyte(kTrueLogS0, kTruePka1, kTruePka2);
  std::normal_distribution<double> noise(0.0, sigma);
  std::vector<FitPoint> pts;
  ProfileConditions cond;
  for (int i = 0; i < 20; ++i) {
    const double pH = 2.0 + 9.0 * i / 19.0;
    const double s = solubility_at_pH(truth, lib, pH, cond).solubility_mol_per_L;
    pts.push_back(point(pH, std::log10(s) + noise(rng)));
  }
  return pts;
}

// ----- synthetic recovery ------------------------------------------------------------------

// Known parameters, seeded log-normal noise (sd 0.05 log10): the estimates lie within two
// standard errors of the truth, starting away from it.
TEST(FitRecovery, SyntheticAmpholyteWithinTwoStandardErrors) {
  const Library lib = builtin_library();
  std::mt19937_64 rng(20240611);
  const std::vector<FitPoint> data = synthetic_data(lib, rng, 0.05);
  const Compound start = synthetic_ampholyte(-4.4, 4.4, 8.1);
  const FitResult r = fit_solubility(start, lib, data, parse_fit_parameters("s0,pka1,pka2", start));
  ASSERT_TRUE(r.usable()) << r.message;
  const double truth[] = {kTrueLogS0, kTruePka1, kTruePka2};
  for (int k = 0; k < 3; ++k) {
    const FitParameter& p = r.parameters[k];
    ASSERT_TRUE(std::isfinite(p.std_error)) << p.name;
    EXPECT_LT(std::fabs(p.estimate - truth[k]), 2.0 * p.std_error) << p.name << " " << p.estimate;
  }
  EXPECT_EQ(r.degrees_of_freedom, 17);
  EXPECT_EQ(r.rank, 3);
  EXPECT_NEAR(r.rms_log10, 0.05, 0.025);  // the noise level
}

// Over 200 data sets the scatter of the estimates matches the reported standard errors within
// 25 %, and about 95 % of the estimates lie within two standard errors (a property of least
// squares with normal errors; common practice of regression statistics).
TEST(FitRecovery, ReportedErrorsMatchScatterOver200Repeats) {
  const Library lib = builtin_library();
  std::mt19937_64 rng(7);
  const int kRepeats = 200;
  const double truth[] = {kTrueLogS0, kTruePka1, kTruePka2};
  double sum[3] = {0, 0, 0}, sum2[3] = {0, 0, 0}, se2[3] = {0, 0, 0};
  int within[3] = {0, 0, 0};
  const Compound start = synthetic_ampholyte(-4.2, 4.2, 8.3);
  const std::vector<FitParameter> params = parse_fit_parameters("s0,pka1,pka2", start);
  for (int rep = 0; rep < kRepeats; ++rep) {
    const std::vector<FitPoint> data = synthetic_data(lib, rng, 0.08);
    const FitResult r = fit_solubility(start, lib, data, params);
    ASSERT_TRUE(r.usable()) << r.message;
    for (int k = 0; k < 3; ++k) {
      const FitParameter& p = r.parameters[k];
      sum[k] += p.estimate;
      sum2[k] += p.estimate * p.estimate;
      se2[k] += p.std_error * p.std_error;
      within[k] += std::fabs(p.estimate - truth[k]) < 2.0 * p.std_error;
    }
  }
  for (int k = 0; k < 3; ++k) {
    const double mean = sum[k] / kRepeats;
    const double scatter = std::sqrt((sum2[k] - kRepeats * mean * mean) / (kRepeats - 1));
    const double reported = std::sqrt(se2[k] / kRepeats);
    std::printf("parameter %d: mean %.4f (true %.2f), scatter %.4f, rms reported se %.4f, ratio %.3f, "
                "within 2 se %d/%d\n",
                k, mean, truth[k], scatter, reported, reported / scatter, within[k], kRepeats);
    EXPECT_NEAR(reported / scatter, 1.0, 0.25) << "parameter " << k << ": reported " << reported
                                               << ", scatter " << scatter;
    EXPECT_NEAR(mean, truth[k], 3.0 * scatter / std::sqrt(kRepeats)) << "parameter " << k << " biased";
    EXPECT_GE(within[k], 0.90 * kRepeats) << "parameter " << k;
  }
}

// One parameter at a plateau is a mean: estimate = mean of log10 S, standard error =
// sample sd / sqrt(m) (standard error of the mean; common practice).
TEST(FitRecovery, PlateauOnlyIsTheMeanWithItsStandardError) {
  const Library lib = builtin_library();
  const Compound acid = make_compound("plateau-acid", {make_pka(9.0, GroupType::kAcid)}, -4.0);
  const double logs[] = {-4.10, -3.95, -4.02, -3.88, -4.05};
  std::vector<FitPoint> pts;
  for (int i = 0; i < 5; ++i) pts.push_back(point(1.0 + 0.5 * i, logs[i]));
  const FitResult r = fit_solubility(acid, lib, pts, parse_fit_parameters("s0", acid), ideal_options());
  ASSERT_TRUE(r.usable());
  double mean = 0, ss = 0;
  for (double v : logs) mean += v / 5;
  for (double v : logs) ss += (v - mean) * (v - mean);
  const double sd = std::sqrt(ss / 4);
  // The acid's ionized fraction at pH <= 3 (pKa 9) shifts log S by < 3e-6.
  EXPECT_NEAR(r.parameters[0].estimate, mean, 1e-5);
  EXPECT_NEAR(r.parameters[0].std_error, sd / std::sqrt(5.0), 1e-5);
}

// ----- published drugs ---------------------------------------------------------------------

// Ciprofloxacin, ampholyte: pKa 6.16 (acid) and 8.62 (base), log S0 -3.72 (Avdeef 2003,
// Absorption and Drug Development, Fig. 6.3a). Data: the
// Henderson-Hasselbalch points computed from those published constants (rounded
// to 0.001). The fit, started away from them, must return the published constants within the
// precision they are given to (0.01).
TEST(FitPublished, CiprofloxacinAvdeef2003) {
  const Library lib = builtin_library();
  const Compound start = make_compound("ciprofloxacin-check",
                                       {make_pka(6.6, GroupType::kAcid), make_pka(8.1, GroupType::kBase)}, -4.2);
  const std::vector<FitPoint> pts = {point(5.0, -2.531), point(6.16, -3.418), point(7.39, -3.672),
                                     point(8.62, -3.418), point(10.0, -2.322)};
  const FitResult r = fit_solubility(start, lib, pts, parse_fit_parameters("s0,pka1,pka2", start), ideal_options());
  ASSERT_TRUE(r.usable()) << r.message;
  EXPECT_NEAR(param(r, "pKa1").estimate, 6.16, 0.01);
  EXPECT_NEAR(param(r, "pKa2").estimate, 8.62, 0.01);
  EXPECT_NEAR(param(r, "log10_S0_mol_per_L").estimate, -3.72, 0.01);
  EXPECT_LT(r.rms_log10, 0.002);  // the rounding of the data
  for (const FitParameter& p : r.parameters) std::printf("%s %.4f +- %.4f\n", p.name.c_str(), p.estimate, p.std_error);
  for (const FitParameter& p : r.parameters) EXPECT_LT(p.std_error, 0.01) << p.name;
}

// Indomethacin (acid, pKa 4.42, log S0 -5.58) and miconazole (base, pKa 6.07, log S0 -5.85):
// Avdeef 2003, Figs. 6.1a and 6.2a; points computed from the published constants.
TEST(FitPublished, IndomethacinAndMiconazoleAvdeef2003) {
  const Library lib = builtin_library();
  {
    const Compound start = make_compound("indomethacin-check", {make_pka(5.0, GroupType::kAcid)}, -5.0);
    const std::vector<FitPoint> pts = {point(2.0, -5.578), point(4.42, -5.279), point(6.0, -3.989),
                                       point(7.4, -2.600)};
    const FitResult r = fit_solubility(start, lib, pts, parse_fit_parameters("s0,pka1", start), ideal_options());
    ASSERT_TRUE(r.usable());
    EXPECT_NEAR(param(r, "pKa1").estimate, 4.42, 0.01);
    EXPECT_NEAR(param(r, "log10_S0_mol_per_L").estimate, -5.58, 0.01);
  }
  {
    const Compound start = make_compound("miconazole-check", {make_pka(5.5, GroupType::kBase)}, -5.5);
    const std::vector<FitPoint> pts = {point(2.0, -1.780), point(6.07, -5.549), point(7.4, -5.830)};
    const FitResult r = fit_solubility(start, lib, pts, parse_fit_parameters("s0,pka1", start), ideal_options());
    ASSERT_TRUE(r.usable());
    EXPECT_NEAR(param(r, "pKa1").estimate, 6.07, 0.01);
    EXPECT_NEAR(param(r, "log10_S0_mol_per_L").estimate, -5.85, 0.01);
  }
}

// Ibuprofen exercise with a salt plateau (Avdeef 2003, published inputs): pKa 4.43,
// S(pH 0.5) = S0 = 5.52e-5 M, S(pH 10) = 4.39e-3 M (sodium salt plateau), and the HH value at
// pH 4 computed there, 7.57e-5 M. Three points, three parameters: the fit is exact and must
// give pKa 4.43, S0 5.52e-5 M and pHmax 6.33 (computed from the inputs),
// with the warning that no standard errors can be estimated.
TEST(FitPublished, IbuprofenExerciseWithSaltPlateau) {
  const Library lib = builtin_library();
  Compound start = make_compound("ibuprofen-check", {make_pka(4.8, GroupType::kAcid)}, std::log10(3e-5));
  Salt na;
  na.id = "sodium";
  na.counterion = "Na+";
  na.ksp = 1e-6;
  start.salts.push_back(na);
  const std::vector<FitPoint> pts = {point(0.5, std::log10(5.52e-5)), point(4.0, std::log10(7.57e-5)),
                                     point(10.0, std::log10(4.39e-3))};
  const FitResult r = fit_solubility(start, lib, pts, parse_fit_parameters("s0,pka1,ksp:sodium", start),
                                     ideal_options());
  ASSERT_TRUE(r.usable()) << r.message;
  EXPECT_NEAR(param(r, "pKa1").estimate, 4.43, 0.01);
  EXPECT_NEAR(std::pow(10.0, param(r, "log10_S0_mol_per_L").estimate), 5.52e-5, 0.01 * 5.52e-5);
  EXPECT_EQ(r.residuals[2].limiting_solid, "sodium");
  EXPECT_TRUE(has_warning(r, "no standard errors"));
  // pHmax: where the limiting solid changes from the free acid to the salt.
  ProfileConditions cond;
  cond.activity = ActivityModel::kIdeal;
  double lo = 5.0, hi = 8.0;
  for (int i = 0; i < 50; ++i) {
    const double mid = 0.5 * (lo + hi);
    (solubility_at_pH(r.fitted, lib, mid, cond).limiting_solid == "free" ? lo : hi) = mid;
  }
  EXPECT_NEAR(lo, 6.33, 0.02);
}

// ----- what the data do not determine -----------------------------------------------------

TEST(FitWarnings, PkaWithoutNearbyPointsAndRankDeficiency) {
  const Library lib = builtin_library();
  // An acid measured only far above its pKa: log S = log S0 + pH - pKa (to 1e-7), so only
  // log S0 - pKa is determined (the Jacobian has rank 1).
  const Compound acid = make_compound("far-acid", {make_pka(2.0, GroupType::kAcid)}, -10.0);
  std::vector<FitPoint> pts;
  for (int i = 0; i < 6; ++i) {
    const double pH = 9.0 + 0.4 * i;
    pts.push_back(point(pH, -10.0 + (pH - 2.0) + (i % 2 ? 0.02 : -0.02)));
  }
  const FitResult r = fit_solubility(acid, lib, pts, parse_fit_parameters("s0,pka1", acid), ideal_options());
  EXPECT_TRUE(has_warning(r, "rank-deficient")) << ::testing::PrintToString(r.warnings);
  EXPECT_TRUE(has_warning(r, "pKa1 = ")) << ::testing::PrintToString(r.warnings);
  EXPECT_EQ(r.rank, 1);
  EXPECT_FALSE(std::isfinite(param(r, "pKa1").std_error));

  // A parameter with no effect at all: a pKa of 12 seen only at pH 1-3.
  const Compound acid2 = make_compound("high-acid", {make_pka(12.0, GroupType::kAcid)}, -4.0);
  std::vector<FitPoint> low;
  for (int i = 0; i < 5; ++i) low.push_back(point(1.0 + 0.5 * i, -4.0 + (i % 2 ? 0.01 : -0.01)));
  const FitResult r2 = fit_solubility(acid2, lib, low, parse_fit_parameters("s0,pka1", acid2), ideal_options());
  // It is held at its starting value, named in a warning, instead of wandering.
  EXPECT_TRUE(has_warning(r2, "pKa1 is not determined by the data")) << ::testing::PrintToString(r2.warnings);
  ASSERT_EQ(r2.held.size(), 1u);
  EXPECT_EQ(r2.held[0], "pKa1");
  EXPECT_EQ(param(r2, "pKa1").estimate, 12.0);
  EXPECT_DOUBLE_EQ(r2.fitted.system.pkas[0].value, 12.0);
  EXPECT_TRUE(std::isfinite(param(r2, "log10_S0_mol_per_L").std_error));
}

TEST(FitWarnings, SaltNeverLimitingIsFlagged) {
  const Library lib = builtin_library();
  Compound base = make_compound("soluble-salt-base", {make_pka(8.0, GroupType::kBase)}, -4.0);
  Salt hcl;
  hcl.id = "hydrochloride";
  hcl.counterion = "Cl-";
  hcl.ksp = 10.0;  // far too soluble to limit
  base.salts.push_back(hcl);
  std::vector<FitPoint> pts;
  ProfileConditions cond;
  for (int i = 0; i < 8; ++i) {
    const double pH = 5.0 + 0.6 * i;
    pts.push_back(point(pH, std::log10(solubility_at_pH(base, lib, pH, cond).solubility_mol_per_L)));
  }
  const FitResult r = fit_solubility(base, lib, pts, parse_fit_parameters("s0,pka1,ksp:hydrochloride", base));
  // Its Ksp moves no point, so it is held at its starting value.
  EXPECT_TRUE(has_warning(r, "log10_Ksp:hydrochloride is not determined by the data"))
      << ::testing::PrintToString(r.warnings);
  EXPECT_EQ(param(r, "log10_Ksp:hydrochloride").estimate, 1.0);
  // The default set leaves the salt out, since it limits no point.
  const std::vector<FitParameter> def = default_fit_parameters(base, lib, pts, FitOptions{});
  ASSERT_EQ(def.size(), 2u);
  EXPECT_EQ(def[0].name, "log10_S0_mol_per_L");
  EXPECT_EQ(def[1].name, "pKa1");
}

TEST(FitInput, FewerPointsThanParametersNamesTheData) {
  const Library lib = builtin_library();
  const Compound c = synthetic_ampholyte(-4, 4, 8.5);
  std::vector<FitPoint> pts = {point(3, -3), point(5, -4)};
  pts[1].where = SourceLocation{"x.csv", 3, 1};
  try {
    fit_solubility(c, lib, pts, parse_fit_parameters("s0,pka1,pka2", c));
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.where().file, "x.csv");
    EXPECT_EQ(e.where().line, 3);
    EXPECT_NE(e.message().find("2 measured points for 3 parameters"), std::string::npos) << e.message();
  }
}

// Points given through the API are held to the readers' limits: a solubility that underflowed
// to 0 or overflowed, or a log10 sd so small its weight 1/sd^2 overflows, is refused at the
// point rather than "converged" with an infinite rms.
TEST(FitInput, DegeneratePointsAreRefusedAtThePoint) {
  const Library lib = builtin_library();
  const Compound c = synthetic_ampholyte(-4, 4, 8.5);
  const std::vector<FitParameter> params = parse_fit_parameters("s0", c);
  for (int k = 0; k < 4; ++k) {
    std::vector<FitPoint> pts = {point(3, -3), point(5, -4), point(6, -4)};
    pts[1].where = SourceLocation{"x.csv", 3, 5};
    if (k == 0) pts[1].solubility_mol_per_L = 0.0;
    if (k == 1) pts[1].solubility_mol_per_L = std::numeric_limits<double>::infinity();
    if (k == 2) pts[1].log10_sd = 1e-300;
    if (k == 3) pts[1].log10_sd = std::numeric_limits<double>::quiet_NaN();
    try {
      fit_solubility(c, lib, pts, params);
      ADD_FAILURE() << "case " << k << ": no error";
    } catch (const InputError& e) {
      EXPECT_EQ(e.where().str(), "x.csv:3:5") << k;
    }
  }
  std::vector<FitPoint> ok = {point(3, -3), point(5, -4), point(6, -4)};
  ok[1].log10_sd = 1e-4;  // the smallest sd accepted
  EXPECT_TRUE(fit_solubility(c, lib, ok, params).usable());
}

TEST(FitInput, ParameterNamesAreChecked) {
  const Compound c = synthetic_ampholyte(-4, 4, 8.5);
  EXPECT_EQ(parse_fit_parameters("S0, pKa2", c)[1].name, "pKa2");
  EXPECT_THROW(parse_fit_parameters("pka3", c), InputError);
  EXPECT_THROW(parse_fit_parameters("s0,s0", c), InputError);
  EXPECT_THROW(parse_fit_parameters("ksp:mesylate", c), InputError);
  EXPECT_THROW(parse_fit_parameters("slope", c), InputError);
  try {
    parse_fit_parameters("pka0", c);
  } catch (const InputError& e) {
    EXPECT_EQ(e.where().file, "--params");
  }
}

// ----- command line ------------------------------------------------------------------------

TEST(FitCli, BadDataFilesExitTwoNamingFileAndLine) {
  const std::string base = "fit --compound compounds/demo-base.xml --data ";
  const std::string missing = write_file("missing.csv", "pH,value\n2.0,21.7\n");
  RunResult r = run(base + missing);
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find(missing + ":1:"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("unit"), std::string::npos) << r.err;

  const std::string text = write_file("text.csv", "pH,value,unit\n2.0,21.7,mg/mL\n3.0,n.d.,mg/mL\n");
  r = run(base + text);
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find(text + ":3:"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("not a number"), std::string::npos) << r.err;

  const std::string negative = write_file("negative.csv", "pH,value,unit\n2.0,21.7,mg/mL\n3.0,-3.3,mg/mL\n");
  r = run(base + negative);
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find(negative + ":3:"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("> 0"), std::string::npos) << r.err;

  const std::string few = write_file("few.csv", "pH,value,unit\n7.0,0.3,mg/mL\n9.0,17.7,ug/mL\n");
  r = run(base + few + " --params s0,pka1,pka2");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find(few + ":3"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("2 measured points for 3 parameters"), std::string::npos) << r.err;

  r = run("fit --compound compounds/demo-base.xml --params s0,pka7");
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("--params"), std::string::npos) << r.err;
}

TEST(FitCli, JsonKeysAndFittedFileKeepsTheRest) {
  RunResult r = run("fit --compound compounds/demo-acid.xml --format json");
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* key : {"\"parameters\"", "\"name\": \"log10_S0_mol_per_L\"", "\"name\": \"pKa1\"",
                          "\"estimate\"", "\"std_error\"", "\"correlation\"", "\"rms_log10\"",
                          "\"residuals\"", "\"observed_log10\"", "\"fitted_log10\"", "\"warnings\""}) {
    EXPECT_NE(r.out.find(key), std::string::npos) << key;
  }
  // -o: the fitted compound file loads, carries the estimates and keeps the comments.
  const std::string out = temp_dir() + "/fitted-acid.xml";
  r = run("fit --compound compounds/demo-acid.xml -o " + out);
  ASSERT_EQ(r.code, 0) << r.err;
  const std::string written = slurp(out);
  EXPECT_NE(written.find("INVENTED for"), std::string::npos);
  EXPECT_NE(written.find("Fitted by pkarta fit"), std::string::npos);
  EXPECT_NE(written.find("<measured-solubility>"), std::string::npos);
  const Library lib = builtin_library();
  const Compound original = load_compound_file(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-acid.xml", lib, nullptr);
  const Compound fitted = load_compound_file(out, lib, nullptr);
  const FitResult direct = fit_solubility(original, lib, fit_points_from_compound(original),
                                          default_fit_parameters(original, lib, fit_points_from_compound(original), {}));
  EXPECT_NEAR(fitted.system.pkas[0].value, param(direct, "pKa1").estimate, 6e-4);
  EXPECT_NEAR(std::log10(fitted.s0_mol_per_L), param(direct, "log10_S0_mol_per_L").estimate, 1e-3);
  EXPECT_NEAR(fitted.system.pkas[0].sd, param(direct, "pKa1").std_error, 0.01 * param(direct, "pKa1").std_error + 1e-3);
  ASSERT_EQ(fitted.salts.size(), 1u);
  EXPECT_NEAR(std::log10(*fitted.salts[0].ksp), param(direct, "log10_Ksp:sodium").estimate, 1e-3);
  EXPECT_FALSE(fitted.salts[0].solubility_in_water_mol_per_L.has_value());
  EXPECT_FALSE(direct.fitted.salts[0].solubility_in_water_mol_per_L.has_value());
  // Every line of the original outside the edited elements is kept byte for byte.
  std::istringstream orig(slurp(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-acid.xml"));
  for (std::string line; std::getline(orig, line);) {
    if (line.find("<pka ") != std::string::npos || line.find("<intrinsic-solubility ") != std::string::npos ||
        line.find("<salt ") != std::string::npos) {
      continue;
    }
    EXPECT_NE(written.find(line + "\n"), std::string::npos) << "lost: " << line;
  }
  // The fitted curve passes through the fitted values at the measured pH.
  const std::vector<double> curve = fitted_curve_log10(direct, lib, {direct.residuals[3].pH}, FitOptions{});
  EXPECT_NEAR(curve[0], direct.residuals[3].fitted_log10, 1e-12);

  // Refuses to overwrite its input.
  const std::string copy = temp_dir() + "/acid-copy.xml";
  std::ofstream(copy) << slurp(std::string(PKARTA_SOURCE_DIR) + "/compounds/demo-acid.xml");
  r = run("fit --compound " + copy + " -o " + copy);
  EXPECT_EQ(r.code, 2);
  EXPECT_NE(r.err.find("refusing"), std::string::npos) << r.err;
}

TEST(FitCli, CsvDataAndTextReport) {
  const std::string data = write_file("acid.csv",
                                      "pH,value,unit,temperature\n"
                                      "1.5,23.6,ug/mL,25\n2.5,24.0,ug/mL,25\n3.5,31.2,ug/mL,25\n"
                                      "4.3,35.2,ug/mL,25\n5.0,0.107,mg/mL,25\n6.0,1.04,mg/mL,25\n");
  const RunResult r = run("fit --compound compounds/demo-acid.xml --data " + data + " --params s0,pka1");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_NE(r.out.find("pKa1"), std::string::npos);
  EXPECT_NE(r.out.find("rms"), std::string::npos);
  EXPECT_NE(r.out.find("Caution"), std::string::npos);
}

}  // namespace
}  // namespace pkarta
