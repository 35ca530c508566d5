// Monte Carlo bands: zero width without uncertainty, widening with it, normal quantiles,
// reproducibility whatever the thread count.
#include "pkarta/analyses/uncertainty.h"

#include <gtest/gtest.h>

#include <cmath>
#include <stdexcept>

#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

// Invented monoprotic acid: pKa 4.5, log10 S0 -4.0 mol/L; sds set per test.
Compound invented_acid(double pka_sd, double log_sd) {
  Compound c;
  c.id = "mc-acid";
  c.name = c.id;
  c.molar_mass_g_per_mol = 250.0;
  c.system.id = c.id;
  Pka p;
  p.value = 4.5;
  p.type = GroupType::kAcid;
  p.sd = pka_sd;
  c.system.pkas.push_back(p);
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 1e-4;
  c.s0_log_sd = log_sd;
  return c;
}

std::vector<double> grid() {
  std::vector<double> g;
  for (double pH = 1.0; pH <= 7.0 + 1e-9; pH += 0.5) g.push_back(pH);
  return g;
}

TEST(Uncertainty, ZeroSdGivesZeroWidthBands) {
  const Library lib = builtin_library();
  const ProfileBands b = profile_bands(invented_acid(0, 0), lib, grid(), ProfileConditions{}, 200, 3);
  ASSERT_EQ(b.pH.size(), grid().size());
  for (std::size_t i = 0; i < b.pH.size(); ++i) {
    EXPECT_EQ(b.p05_log10_mol_per_L[i], b.p95_log10_mol_per_L[i]);
    EXPECT_EQ(b.p50_log10_mol_per_L[i], b.nominal_log10_mol_per_L[i]);
  }
}

TEST(Uncertainty, BandsWidenMonotonicallyWithSd) {
  const Library lib = builtin_library();
  std::vector<double> previous(grid().size(), 0.0);
  for (double sd : {0.02, 0.05, 0.1, 0.2, 0.4}) {
    const ProfileBands b = profile_bands(invented_acid(sd, sd), lib, grid(), ProfileConditions{}, 400, 11);
    for (std::size_t i = 0; i < b.pH.size(); ++i) {
      const double width = b.p95_log10_mol_per_L[i] - b.p05_log10_mol_per_L[i];
      EXPECT_GT(width, previous[i]) << "sd " << sd << " pH " << b.pH[i];
      previous[i] = width;
    }
  }
}

// Where log S = log S0 (pH well below the pKa of an acid), the band is that of a normal
// variable: 5-95 % width 2 x 1.6449 x log-sd (standard normal quantile; common practice).
TEST(Uncertainty, PlateauBandIsTheNormalQuantileRange) {
  const Library lib = builtin_library();
  const double log_sd = 0.2;
  const ProfileBands b = profile_bands(invented_acid(0.0, log_sd), lib, {1.0}, ProfileConditions{}, 4000, 5);
  const double width = b.p95_log10_mol_per_L[0] - b.p05_log10_mol_per_L[0];
  EXPECT_NEAR(width, 2.0 * 1.6449 * log_sd, 0.05 * width);
  EXPECT_NEAR(b.p50_log10_mol_per_L[0], b.nominal_log10_mol_per_L[0], 0.02);
}

TEST(Uncertainty, SameSeedSameBandsWhateverTheThreads) {
  const Library lib = builtin_library();
  const Compound c = invented_acid(0.1, 0.15);
  MonteCarloRun one, two, five;
  one.threads = 1;
  two.threads = 2;
  five.threads = 5;
  const ProfileBands a = profile_bands(c, lib, grid(), ProfileConditions{}, 300, 99, one);
  const ProfileBands b = profile_bands(c, lib, grid(), ProfileConditions{}, 300, 99, two);
  const ProfileBands d = profile_bands(c, lib, grid(), ProfileConditions{}, 300, 99, five);
  EXPECT_EQ(a.p05_log10_mol_per_L, b.p05_log10_mol_per_L);
  EXPECT_EQ(a.p95_log10_mol_per_L, b.p95_log10_mol_per_L);
  EXPECT_EQ(a.p50_log10_mol_per_L, d.p50_log10_mol_per_L);
  EXPECT_EQ(a.p95_log10_mol_per_L, d.p95_log10_mol_per_L);
  const ProfileBands other = profile_bands(c, lib, grid(), ProfileConditions{}, 300, 100, two);
  EXPECT_NE(a.p95_log10_mol_per_L, other.p95_log10_mol_per_L);
}

TEST(Uncertainty, SamplesFollowTheGivenSd) {
  const Compound c = invented_acid(0.1, 0.0);
  double sum = 0, sum2 = 0;
  const int n = 5000;
  for (int i = 0; i < n; ++i) {
    const double d = sample_compound(c, 17, i).system.pkas[0].value - 4.5;
    sum += d;
    sum2 += d * d;
  }
  const double mean = sum / n, sd = std::sqrt(sum2 / n - mean * mean);
  EXPECT_NEAR(mean, 0.0, 4 * 0.1 / std::sqrt(n));
  EXPECT_NEAR(sd, 0.1, 0.005);
  EXPECT_EQ(sample_compound(c, 17, 3).system.pkas[0].value, sample_compound(c, 17, 3).system.pkas[0].value);
}

TEST(Uncertainty, PercentileInterpolatesAndErrorsPropagate) {
  EXPECT_DOUBLE_EQ(percentile({3, 1, 2, 4, 5}, 0.5), 3.0);
  EXPECT_DOUBLE_EQ(percentile({1, 2}, 0.25), 1.25);
  EXPECT_TRUE(std::isnan(percentile({}, 0.5)));
  const Compound c = invented_acid(0.1, 0.1);
  EXPECT_THROW(monte_carlo_bands(c, 1, 50, 1, [](const Compound&, double*) { throw std::runtime_error("x"); }),
               std::runtime_error);
  EXPECT_THROW(monte_carlo_bands(c, 1, 0, 1, [](const Compound&, double* v) { v[0] = 0; }), std::invalid_argument);
  int calls = 0;
  MonteCarloRun run;
  run.threads = 2;
  run.progress = [&](int done, int total) {
    EXPECT_LE(done, total);
    ++calls;
  };
  const Bands b = monte_carlo_bands(c, 2, 40, 1, [](const Compound& s, double* v) {
    v[0] = s.system.pkas[0].value;
    v[1] = std::nan("");
  }, run);
  EXPECT_GT(calls, 0);
  EXPECT_EQ(b.finite_samples[0], 40);
  EXPECT_EQ(b.finite_samples[1], 0);
}

// ----- screen ------------------------------------------------------------------------------

// Invented weak base: pKa 5.5 (sd given), log10 S0 -2.5 mol/L, molar mass 300; 0.5 mg/mL of the
// free form screened at pH 5.0 in three buffers.
ScreenJob invented_screen_job(double pka_sd) {
  ScreenJob job;
  Compound& c = job.compound;
  c.id = "mc-base";
  c.name = c.id;
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  Pka p;
  p.value = 5.5;
  p.type = GroupType::kBase;
  p.sd = pka_sd;
  c.system.pkas.push_back(p);
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = std::pow(10.0, -2.5);
  job.dose_mol_per_L = 0.5 / 300.0;
  return job;
}

ScreenOptions screen_options() {
  ScreenOptions o;
  o.target_pH = 5.0;
  o.buffers = {"acetate", "citrate", "succinate"};
  return o;
}

TEST(UncertaintyScreen, ZeroSdGivesZeroWidthAndBandsWidenWithSd) {
  const Library lib = builtin_library();
  const ScreenBands zero = screen_bands(lib, invented_screen_job(0.0), screen_options(), 50, 1);
  ASSERT_EQ(zero.buffers.size(), 3u);
  for (const ScreenBand& b : zero.buffers) {
    ASSERT_EQ(b.nominal_status, "ok") << b.buffer;
    EXPECT_EQ(b.p05_mol_per_L, b.nominal_min_conc_mol_per_L) << b.buffer;
    EXPECT_EQ(b.p95_mol_per_L, b.nominal_min_conc_mol_per_L) << b.buffer;
    EXPECT_EQ(b.ok_fraction, 1.0);
  }
  std::vector<double> previous(3, 0.0);
  for (double sd : {0.02, 0.05, 0.1}) {
    const ScreenBands b = screen_bands(lib, invented_screen_job(sd), screen_options(), 200, 1);
    for (std::size_t k = 0; k < b.buffers.size(); ++k) {
      EXPECT_EQ(b.buffers[k].buffer, zero.buffers[k].buffer);
      const double width = std::log10(b.buffers[k].p95_mol_per_L / b.buffers[k].p05_mol_per_L);
      EXPECT_GT(width, previous[k]) << b.buffers[k].buffer << " sd " << sd;
      EXPECT_LE(b.buffers[k].p05_mol_per_L, b.buffers[k].nominal_min_conc_mol_per_L);
      EXPECT_GE(b.buffers[k].p95_mol_per_L, b.buffers[k].nominal_min_conc_mol_per_L);
      previous[k] = width;
    }
  }
  MonteCarloRun one, two;
  one.threads = 1;
  two.threads = 2;
  const ScreenBands a = screen_bands(lib, invented_screen_job(0.05), screen_options(), 40, 9, one);
  const ScreenBands c = screen_bands(lib, invented_screen_job(0.05), screen_options(), 40, 9, two);
  for (std::size_t k = 0; k < a.buffers.size(); ++k) {
    EXPECT_EQ(a.buffers[k].p05_mol_per_L, c.buffers[k].p05_mol_per_L);
    EXPECT_EQ(a.buffers[k].p95_mol_per_L, c.buffers[k].p95_mol_per_L);
  }
}

}  // namespace
}  // namespace pkarta
