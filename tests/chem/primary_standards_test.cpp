// IUPAC 2002 / NIST primary pH standards rebuilt from built-in reagents by molality.
//
// Source of pH(PS): Buck et al., "Measurement of pH. Definition, standards, and procedures
// (IUPAC Recommendations 2002)", Pure Appl. Chem. 74, 2169 (2002), primary-standard table
// (grid values recalled from that table, to be verified; cross-checked at 25 °C by Staples
// & Bates 1969, J. Res. NBS 73A, 37 (citrate 3.776, carbonate 10.012, borax 9.180), Hamer,
// Pinching & Acree 1946 (KHP 4.005), Bower, Paabo & Bates 1961 (7.414 at 25 °C, 7.382 at
// 38 °C) and Ph. Eur. 5.0 Table 2.2.3.-2 to two decimals). The standards are defined on the
// Bates-Guggenheim convention; pkarta's default uses Davies for every ion, so the test
// tolerance of the default is 0.02 pH at 25 °C and 0.03 at 5, 37 and 50 °C. The NBS scale
// itself is internally consistent within 0.006 at 25 °C and 0.013 at 10 and 40 °C (Hetzer,
// Durst, Robinson and Bates 1977, below, introduction).
//
// KH phthalate at every temperature: Hamer, Pinching and Acree 1946, J. Res. NBS 36, 47, the
// equation of its abstract for 0.05 mol/kg, pH = 4.000 + 0.0000479 (t - 15)^2 (0-60 °C; 4.005
// at 25 °C as in the IUPAC table); the redetermination of Hetzer, Durst, Robinson and Bates
// 1977, J. Res. NBS 81A, doi 10.6028/jres.081A.005 (equation of its abstract) gives 4.004,
// 4.006, 4.025 and 4.057 at 5, 25, 37 and 50 °C, within 0.003. (The 3.998 at 5 °C recalled
// earlier for the IUPAC table agrees with neither.)
//
// Buffer values: J. A. Dean, Lange's Handbook of Chemistry, 15th ed. (1999), §8.3, text after
// Table 8.15 (mol/L per pH, two significant figures): tolerance 15 %.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <utility>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

struct Standard {
  const char* name;
  std::vector<std::pair<const char*, double>> molal;  // reagent id, mol/kg
  double ph5, ph25, ph37;                             // NaN where not defined
  double ph50;                                        // pH(S) at 50 °C
  double capacity;                                    // Lange, mol/L per pH (NaN: not used)
};

const double kNa = std::nan("");

const std::vector<Standard>& standards() {
  static const std::vector<Standard> s = {
      {"KH tartrate (sat. at 25 C, 0.0341 mol/kg)", {{"potassium-hydrogen-tartrate", 0.0341}}, kNa, 3.557, 3.548, 3.549, 0.027},
      {"KH2 citrate 0.05 mol/kg", {{"potassium-dihydrogen-citrate", 0.05}}, 3.840, 3.776, 3.756, 3.749, 0.034},
      {"KH phthalate 0.05 mol/kg", {{"potassium-hydrogen-phthalate", 0.05}}, 4.005, 4.005, 4.023, 4.059, 0.016},
      {"phosphate 0.025/0.025 mol/kg", {{"KH2PO4", 0.025}, {"Na2HPO4", 0.025}}, 6.951, 6.865, 6.841, 6.833, 0.029},
      {"phosphate 0.008695/0.03043 mol/kg", {{"KH2PO4", 0.008695}, {"Na2HPO4", 0.03043}}, 7.500, 7.413, 7.386, 7.367, 0.016},
      {"borax 0.01 mol/kg", {{"borax", 0.01}}, 9.395, 9.180, 9.088, 9.011, 0.020},
      {"carbonate 0.025/0.025 mol/kg", {{"NaHCO3", 0.025}, {"Na2CO3", 0.025}}, 10.245, 10.012, 9.910, 9.828, 0.029},
  };
  return s;
}

Mixture build(const Library& lib, const Standard& s, double t) {
  Mixture m;
  m.temperature_C = t;
  Amount a;
  a.unit = AmountUnit::kMolal;
  for (const auto& [id, molal] : s.molal) {
    a.value = molal;
    add_reagent(m, lib, id, reagent_conc_mol_per_L(lib, id, a, t));
  }
  return m;
}

// The IUPAC value of a standard at each temperature it is given for (5, 25, 37, 50 °C; NaN
// where the table has none).
std::vector<std::pair<double, double>> values_by_temperature(const Standard& s) {
  return {{5.0, s.ph5}, {25.0, s.ph25}, {37.0, s.ph37}, {50.0, s.ph50}};
}

// The standard at temperature t under an activity model.
Equilibrium solve_standard(const Library& lib, const Standard& s, double t, ActivityModel model) {
  Mixture m = build(lib, s, t);
  m.activity = model;
  return solve(m);
}

class PrimaryStandards : public ::testing::Test {
 protected:
  Library lib_ = builtin_library();
};

TEST_F(PrimaryStandards, PhAt25CWithin002) {
  for (const Standard& s : standards()) {
    const Equilibrium e = solve(build(lib_, s, 25.0));
    ASSERT_TRUE(e.usable()) << s.name;
    std::printf("  %-40s 25 C: pkarta %.3f  IUPAC %.3f  (I = %.4f)\n", s.name, e.pH, s.ph25,
                e.ionic_strength_mol_per_L);
    EXPECT_NEAR(e.pH, s.ph25, 0.02) << s.name;
  }
}

TEST_F(PrimaryStandards, PhAt37CWithin003) {
  for (const Standard& s : standards()) {
    const Equilibrium e = solve(build(lib_, s, 37.0));
    ASSERT_TRUE(e.usable()) << s.name;
    std::printf("  %-40s 37 C: pkarta %.3f  IUPAC %.3f\n", s.name, e.pH, s.ph37);
    EXPECT_NEAR(e.pH, s.ph37, 0.03) << s.name;
  }
}

TEST_F(PrimaryStandards, PhAt5CWithin003) {
  for (const Standard& s : standards()) {
    if (std::isnan(s.ph5)) continue;  // tartrate is defined from 25 °C only
    const Equilibrium e = solve(build(lib_, s, 5.0));
    ASSERT_TRUE(e.usable()) << s.name;
    std::printf("  %-40s  5 C: pkarta %.3f  IUPAC %.3f\n", s.name, e.pH, s.ph5);
    EXPECT_NEAR(e.pH, s.ph5, 0.03) << s.name;
  }
}

// The specific ion interaction model (SIT) from 5 to 50 °C. Its Debye-Hückel term,
// A sqrt(I)/(1 + 1.5 sqrt(I)), is the Bates-Guggenheim convention on which pH(S) is defined;
// the interaction coefficients of carbonate (eps(Na+, CO3 2-) = -0.08) put the carbonate
// standard 0.02 low, which is why SIT is not the default (docs/model.md, "Activities").
// Tolerance 0.03 as for Davies at 5 and 37 °C. 50 °C values recalled from the same IUPAC 2002
// table, to be verified.
TEST_F(PrimaryStandards, SitWithin003From5To50C) {
  for (const Standard& s : standards()) {
    for (const auto& [t, ph] : values_by_temperature(s)) {
      if (std::isnan(ph)) continue;
      const Equilibrium e = solve_standard(lib_, s, t, ActivityModel::kSit);
      ASSERT_TRUE(e.usable()) << s.name;
      std::printf("  %-40s %2.0f C: sit %.3f  IUPAC %.3f  (%+.3f)\n", s.name, t, e.pH, ph, e.pH - ph);
      EXPECT_NEAR(e.pH, ph, 0.03) << s.name << " at " << t << " C";
    }
  }
}

// Davies with ion pairs (docs/model.md, "Activities") from 5 to 50 °C: the pairs of Na+ and
// K+ with the phosphate, citrate and carbonate species (constants in docs/data-sources.md,
// "Activity coefficients") take part of the standards' sodium and potassium out of solution.
// Tolerance 0.015 at every temperature, near the scale's own consistency at the ends of the
// range (0.013 at 10 and 40 °C, Hetzer et al. 1977); and at 25 °C the mean |pH - pH(S)| over
// the seven standards may not exceed that of Davies by more than 0.001, the last digit to which
// pH(S) is given.
TEST_F(PrimaryStandards, IonPairsWithin0015From5To50CAndAtLeastAsGoodAsDaviesAt25C) {
  double mean_pairs = 0.0, mean_davies = 0.0;
  for (const Standard& s : standards()) {
    for (const auto& [t, ph] : values_by_temperature(s)) {
      if (std::isnan(ph)) continue;
      const Equilibrium e = solve_standard(lib_, s, t, ActivityModel::kIonPairs);
      ASSERT_TRUE(e.usable()) << s.name;
      std::printf("  %-40s %2.0f C: ion-pairs %.3f  IUPAC %.3f  (%+.3f)\n", s.name, t, e.pH, ph, e.pH - ph);
      EXPECT_NEAR(e.pH, ph, 0.015) << s.name << " at " << t << " C";
      EXPECT_LT(e.charge_residual_rel, 1e-10) << s.name;
      EXPECT_LT(e.mass_residual_rel, 1e-10) << s.name;
      if (t == 25.0) {
        const Equilibrium d = solve(build(lib_, s, t));
        ASSERT_TRUE(d.usable()) << s.name;
        mean_pairs += std::fabs(e.pH - ph) / static_cast<double>(standards().size());
        mean_davies += std::fabs(d.pH - ph) / static_cast<double>(standards().size());
      }
    }
  }
  std::printf("  25 C mean |dpH|: ion-pairs %.4f  davies %.4f\n", mean_pairs, mean_davies);
  EXPECT_LE(mean_pairs, mean_davies + 0.001);
}

TEST_F(PrimaryStandards, DaviesAt50CWithin003) {
  for (const Standard& s : standards()) {
    const Equilibrium e = solve(build(lib_, s, 50.0));
    ASSERT_TRUE(e.usable()) << s.name;
    std::printf("  %-40s 50 C: pkarta %.3f  IUPAC %.3f\n", s.name, e.pH, s.ph50);
    EXPECT_NEAR(e.pH, s.ph50, 0.03) << s.name;
  }
}

TEST_F(PrimaryStandards, BufferValuesMatchLangesHandbook) {
  for (const Standard& s : standards()) {
    const Mixture m = build(lib_, s, 25.0);
    const double beta = buffer_capacity(m);
    std::printf("  %-40s capacity %.4f  Lange %.3f\n", s.name, beta, s.capacity);
    // Borax: the model has boric acid and borate only; polyborate ions, which Lange's
    // measured value includes, are not modelled, and the ideal van Slyke value for 0.04 M
    // boron at pH = pKa is 0.023. Tolerance 20 % there.
    const double tol = std::string(s.name).rfind("borax", 0) == 0 ? 0.20 : 0.15;
    EXPECT_NEAR(beta / s.capacity, 1.0, tol) << s.name;
  }
}

TEST_F(PrimaryStandards, ResidualsBelow1e10) {
  for (const Standard& s : standards()) {
    for (double t : {5.0, 25.0, 37.0}) {
      const Equilibrium e = solve(build(lib_, s, t));
      EXPECT_LT(e.charge_residual_rel, 1e-10) << s.name;
      EXPECT_LT(e.mass_residual_rel, 1e-10) << s.name;
    }
  }
}

}  // namespace
}  // namespace pkarta
