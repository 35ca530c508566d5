// Lack-of-fit statistics: chi-square upper tail against closed forms, exact runs distribution
// against hand counts; and the fit's use of them (reduced chi-square, runs test, warnings) and
// the holding of an undetermined pKa.
#include "pkarta/analyses/fit_statistics.h"

#include <gtest/gtest.h>

#include <cmath>

#include "pkarta/analyses/fit.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

// Closed forms of the chi-square upper tail (Bevington and Robinson 2003, ch. 11; common
// practice): dof 2: exp(-x/2); dof 3: 2 (1 - Phi(sqrt x)) + sqrt(2x/pi) exp(-x/2).
double tail_dof2(double x) { return std::exp(-x / 2); }
double tail_dof3(double x) {
  return std::erfc(std::sqrt(x / 2)) + std::sqrt(2 * x / M_PI) * std::exp(-x / 2);
}

TEST(ChiSquareTail, ClosedFormsAndTableValues) {
  for (double x : {0.1, 1.0, 2.0, 5.0, 6.0, 20.0, 60.0}) {
    EXPECT_NEAR(chi_square_upper_tail(x, 2), tail_dof2(x), 1e-13 + 1e-11 * tail_dof2(x)) << x;
    EXPECT_NEAR(chi_square_upper_tail(x, 3), tail_dof3(x), 1e-13 + 1e-11 * tail_dof3(x)) << x;
  }
  // Tables of the chi-square distribution: 3.841 (1 dof) and 18.307 (10 dof) at p = 0.05.
  EXPECT_NEAR(chi_square_upper_tail(3.841459, 1), 0.05, 1e-6);
  EXPECT_NEAR(chi_square_upper_tail(18.307038, 10), 0.05, 1e-6);
  EXPECT_EQ(chi_square_upper_tail(0.0, 4), 1.0);
  EXPECT_TRUE(std::isnan(chi_square_upper_tail(1.0, 0)));
}

TEST(RunsTest, ExactDistributionByHand) {
  // ++++----: 2 runs; of the C(8,4) = 70 orders only 2 have 2 runs.
  RunsTest t = runs_test({1, 2, 3, 4, -1, -2, -3, -4});
  EXPECT_EQ(t.runs, 2);
  EXPECT_EQ(t.positive, 4);
  EXPECT_EQ(t.negative, 4);
  EXPECT_DOUBLE_EQ(t.expected_runs, 5.0);
  EXPECT_NEAR(t.p, 2.0 / 70.0, 1e-12);
  // +++-+---: 4 runs; orders with 3 runs: 2 C(3,1) C(3,0) = 6, with 4: 2 C(3,1)^2 = 18.
  t = runs_test({1, 1, 1, -1, 1, -1, -1, -1});
  EXPECT_EQ(t.runs, 4);
  EXPECT_NEAR(t.p, (2.0 + 6.0 + 18.0) / 70.0, 1e-12);
  // Zeros are skipped; one sign only: no test.
  t = runs_test({1, 0, 1});
  EXPECT_EQ(t.runs, 1);
  EXPECT_TRUE(std::isnan(t.p));
}

FitPoint point(double pH, double log10_s, double sd = 0.0) {
  FitPoint p;
  p.pH = pH;
  p.solubility_mol_per_L = std::pow(10.0, log10_s);
  p.log10_sd = sd;
  p.where = SourceLocation{"test-data", 0, 0};
  return p;
}

Compound acid_compound(double pka, double log10_s0) {
  Compound c;
  c.id = c.name = "test-acid";
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  Pka k;
  k.value = pka;
  k.type = GroupType::kAcid;
  c.system.pkas = {k};
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = std::pow(10.0, log10_s0);
  return c;
}

FitOptions ideal_options() {
  FitOptions o;
  o.conditions.activity = ActivityModel::kIdeal;
  return o;
}

bool has_warning(const FitResult& r, const std::string& text) {
  for (const std::string& w : r.warnings) {
    if (w.find(text) != std::string::npos) return true;
  }
  return false;
}

// A plateau fitted by log S0 alone (pKa 12, pH 1-2.5: the ionised fraction is < 1e-9), with
// sd 0.1 on every point. By hand: the weighted mean is -4.05, chi^2 = (0.05^2 + 0.15^2 + 0.15^2
// + 0.05^2) / 0.1^2 = 5.0 on 3 degrees of freedom, reduced 5/3, p = 0.1718.
TEST(FitLackOfFit, ReducedChiSquareAgainstTheStatedSd) {
  const Library lib = builtin_library();
  const Compound c = acid_compound(12.0, -4.0);
  const double logs[] = {-4.0, -4.2, -3.9, -4.1};
  std::vector<FitPoint> pts;
  for (int i = 0; i < 4; ++i) pts.push_back(point(1.0 + 0.5 * i, logs[i], 0.1));
  FitResult r = fit_solubility(c, lib, pts, parse_fit_parameters("s0", c), ideal_options());
  ASSERT_TRUE(r.usable());
  EXPECT_EQ(r.lack_of_fit_test, "chi-square");
  EXPECT_NEAR(r.parameters[0].estimate, -4.05, 1e-7);
  EXPECT_NEAR(r.reduced_chi_square, 5.0 / 3.0, 1e-6);
  EXPECT_NEAR(r.lack_of_fit_p, tail_dof3(5.0), 1e-6);
  EXPECT_NEAR(r.lack_of_fit_p, 0.1718, 1e-4);
  EXPECT_FALSE(has_warning(r, "poor fit"));
  // Halve the stated sd: chi^2 = 20, p = 1.7e-4 < 0.05: a warning.
  for (FitPoint& p : pts) p.log10_sd = 0.05;
  r = fit_solubility(c, lib, pts, parse_fit_parameters("s0", c), ideal_options());
  EXPECT_NEAR(r.reduced_chi_square, 20.0 / 3.0, 1e-5);
  EXPECT_NEAR(r.lack_of_fit_p, tail_dof3(20.0), 1e-7);
  EXPECT_TRUE(has_warning(r, "poor fit: reduced chi-square")) << ::testing::PrintToString(r.warnings);
}

// Without sd: eight plateau points, the first four high and the last four low, give two runs
// of residual signs; p = 2 / 70 (hand count above) < 0.05: a warning.
TEST(FitLackOfFit, RunsTestWithoutSd) {
  const Library lib = builtin_library();
  const Compound c = acid_compound(12.0, -4.0);
  std::vector<FitPoint> pts;
  for (int i = 0; i < 8; ++i) pts.push_back(point(1.0 + 0.2 * i, i < 4 ? -3.9 : -4.1));
  const FitResult r = fit_solubility(c, lib, pts, parse_fit_parameters("s0", c), ideal_options());
  ASSERT_TRUE(r.usable());
  EXPECT_EQ(r.lack_of_fit_test, "runs");
  EXPECT_TRUE(std::isnan(r.reduced_chi_square));
  EXPECT_EQ(r.runs.runs, 2);
  EXPECT_NEAR(r.lack_of_fit_p, 2.0 / 70.0, 1e-12);
  EXPECT_TRUE(has_warning(r, "poor fit: 2 runs of residual signs")) << ::testing::PrintToString(r.warnings);
}

// An acid (pKa 6) measured only below pH 4 = pKa - 2: log S = log S0 + log10(1 + 10^(pH - pKa))
// changes by < 0.01 per unit of pKa, so the data do not determine the pKa; it is held at its
// starting value with a warning naming it, and log S0 is the mean of the points corrected
// for the ionised fraction at that pKa.
TEST(FitHeld, PkaWithEveryPointBelowPkaMinusTwoIsHeld) {
  const Library lib = builtin_library();
  const Compound c = acid_compound(6.0, -4.0);
  const double noise[] = {0.03, -0.02, 0.01, -0.04, 0.02, 0.0};
  std::vector<FitPoint> pts;
  double mean = 0;
  for (int i = 0; i < 6; ++i) {
    const double pH = 1.0 + 0.5 * i;  // 1.0 .. 3.5
    const double ionised = std::log10(1 + std::pow(10.0, pH - 6.0));
    pts.push_back(point(pH, -4.0 + ionised + noise[i]));
    mean += (-4.0 + noise[i]) / 6;
  }
  const FitResult r = fit_solubility(c, lib, pts, parse_fit_parameters("s0,pka1", c), ideal_options());
  ASSERT_TRUE(r.usable()) << r.message;
  EXPECT_TRUE(has_warning(r, "pKa1 is not determined by the data")) << ::testing::PrintToString(r.warnings);
  ASSERT_EQ(r.held.size(), 1u);
  EXPECT_EQ(r.held[0], "pKa1");
  ASSERT_EQ(r.parameters.size(), 2u);
  EXPECT_EQ(r.parameters[1].name, "pKa1");
  EXPECT_EQ(r.parameters[1].estimate, 6.0);
  EXPECT_TRUE(std::isnan(r.parameters[1].std_error));
  EXPECT_NEAR(r.parameters[0].estimate, mean, 1e-6);
  EXPECT_TRUE(std::isfinite(r.parameters[0].std_error));
  EXPECT_EQ(r.degrees_of_freedom, 5);
  EXPECT_EQ(r.fitted.system.pkas[0].value, 6.0);
}

}  // namespace
}  // namespace pkarta
