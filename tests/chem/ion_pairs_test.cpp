// The ion-pair activity model (`--activity ion-pairs`, docs/model.md, "Activities"): Davies
// coefficients for every species, pairs included, and ion pairs of the metal ions with the
// species of the acid-base systems in the mass balances of both. Constants: docs/data-sources.md,
// "Activity coefficients".
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {
namespace {

const Species* find(const Equilibrium& e, const std::string& name) {
  for (const Species& s : e.species) {
    if (s.name == name) return &s;
  }
  return nullptr;
}

Mixture ion_pair_mixture(const Library& lib, std::initializer_list<std::pair<const char*, double>> reagents) {
  Mixture m;
  m.activity = ActivityModel::kIonPairs;
  for (const auto& [id, c] : reagents) add_reagent(m, lib, id, c);
  return m;
}

// 0.1 M Na2HPO4 at 25 °C, by hand. The constant: K(Na+ + HPO4 2- = NaHPO4-) = 10^0.62 at
// I = 0 (Migneault and Forcé 1988, J. Solution Chem. 17, 987: 1.3 L/mol at I = 0.7, put at
// I = 0 with Davies; docs/data-sources.md). Nearly all the phosphate is HPO4 2- at this pH
// (about 9), so with x = [NaHPO4-]: [Na+] = 0.2 - x, [HPO4 2-] = 0.1 - x, and
// I = 1/2 ((0.2 - x) + 4 (0.1 - x) + x) = 0.3 - 2x. Davies gives gamma(NaHPO4-) = gamma(Na+),
// so K' = [NaHPO4-]/([Na+][HPO4 2-]) = K gamma(HPO4 2-) = 10^(0.62 - 4 A f(I)), with
// A = 0.5108 and f(I) = sqrt(I)/(1 + sqrt(I)) - 0.3 I. Solving x = K' (0.2 - x)(0.1 - x) with
// I by repeated substitution: x = 0.03 -> I 0.240, K' 1.245, x 0.0184 -> I 0.263, K' 1.226,
// x 0.01823 -> I 0.2635, K' 1.2259, x 0.01822 mol/L: 18.2 % of the phosphate paired, free
// Na+ 0.1818 mol/L. The hand calculation leaves out H2PO4- and PO4 3- (together under 1 % of
// the phosphate) and NaH2PO4: tolerance 2 % of x.
TEST(IonPairs, DisodiumPhosphateByHand) {
  const Library lib = builtin_library();
  const Equilibrium e = solve(ion_pair_mixture(lib, {{"Na2HPO4", 0.1}}));
  ASSERT_TRUE(e.usable()) << e.message;
  const Species* pair = find(e, "Na.phosphate HA-");
  const Species* na = find(e, "Na+");
  const Species* hpo4 = find(e, "phosphate HA2-");
  ASSERT_TRUE(pair && na && hpo4);
  EXPECT_NEAR(pair->conc_mol_per_L, 0.01822, 0.02 * 0.01822);
  EXPECT_NEAR(e.ionic_strength_mol_per_L, 0.2635, 0.005);
  // The mass action law at the solved state, with Davies coefficients computed here.
  const double I = e.ionic_strength_mol_per_L;
  const double k_cond = std::pow(10.0, 0.62) * davies_gamma(1, I, 25.0) * davies_gamma(-2, I, 25.0) /
                        davies_gamma(-1, I, 25.0);
  EXPECT_NEAR(pair->conc_mol_per_L / (na->conc_mol_per_L * hpo4->conc_mol_per_L), k_cond, 1e-9 * k_cond);
  // Sodium's mass balance: free and in both pairs.
  const Species* neutral = find(e, "Na.phosphate H2A");
  ASSERT_TRUE(neutral);
  EXPECT_NEAR(na->conc_mol_per_L + pair->conc_mol_per_L + neutral->conc_mol_per_L, 0.2, 1e-12);
  EXPECT_LT(e.mass_residual_rel, 1e-10);
}

// The mass balances of the metals and the systems, with several metals (the Newton on the free
// metals over more than one unknown) and hydroxo complexes: every species the state lists is
// summed back to the totals put in.
TEST(IonPairs, MassBalancesOfMetalsAndSystems) {
  const Library lib = builtin_library();
  Mixture m = ion_pair_mixture(lib, {{"Na2HPO4", 0.05}, {"citric-acid", 0.02}, {"KH2PO4", 0.02},
                                     {"CaCl2.2H2O", 0.002}, {"MgCl2.6H2O", 0.003}, {"NaOH", 0.03}});
  for (double t : {5.0, 25.0, 50.0}) {
    m.temperature_C = t;
    const Equilibrium e = solve(m);
    ASSERT_TRUE(e.usable()) << e.message;
    EXPECT_LT(e.charge_residual_rel, 1e-10);
    EXPECT_LT(e.mass_residual_rel, 1e-10);
    auto metal_total = [&](const std::string& prefix, const std::string& free_id) {
      double sum = 0.0;
      for (const Species& s : e.species) {
        if (s.name == free_id || s.name.rfind(prefix + ".", 0) == 0 || s.name == prefix + "OH+") sum += s.conc_mol_per_L;
      }
      return sum;
    };
    EXPECT_NEAR(metal_total("Na", "Na+"), 2 * 0.05 + 0.03, 1e-8);
    EXPECT_NEAR(metal_total("K", "K+"), 0.02, 1e-8);
    EXPECT_NEAR(metal_total("Ca", "Ca2+"), 0.002, 1e-11);
    EXPECT_NEAR(metal_total("Mg", "Mg2+"), 0.003, 1e-11);
    auto system_total = [&](const std::string& sys) {
      double sum = 0.0;
      for (const Species& s : e.species) {
        const bool paired = s.name.find("." + sys + " ") != std::string::npos;
        if (s.system == sys || paired) sum += s.conc_mol_per_L;
      }
      return sum;
    };
    EXPECT_NEAR(system_total("phosphate"), 0.07, 1e-11);
    EXPECT_NEAR(system_total("citrate"), 0.02, 1e-11);
    // Ion pairs lower the free Na+ and the ionic strength against Davies without pairs.
    Mixture d = m;
    d.activity = ActivityModel::kDavies;
    const Equilibrium ed = solve(d);
    ASSERT_TRUE(ed.usable());
    EXPECT_LT(e.ionic_strength_mol_per_L, ed.ionic_strength_mol_per_L);
    EXPECT_LT(find(e, "Na+")->conc_mol_per_L, 0.13);
  }
}

// The slope of the charge balance that the Newton steps use: the derivative at fixed free
// metals plus their response through the mass balances (implicit differentiation), against a
// central difference of the charge itself; for several metals and systems (Newton on the free
// metals) and for one metal with one system (the free metal as the root of a quadratic).
TEST(IonPairs, ChargeSlopeMatchesCentralDifference) {
  const Library lib = builtin_library();
  const Mixture several = ion_pair_mixture(lib, {{"Na2HPO4", 0.12}, {"citric-acid", 0.04}, {"CaCl2.2H2O", 0.002},
                                                 {"MgCl2.6H2O", 0.001}, {"sodium-sulfate", 0.01}});
  const Mixture one = ion_pair_mixture(lib, {{"Na2HPO4", 0.1}, {"NaH2PO4", 0.05}});
  for (const Mixture& m : {several, one}) {
    EquilibriumModel model(m);
    model.set_ionic_strength(0.3);
    for (double pH : {3.0, 5.0, 6.5, 8.0, 11.0}) {
      const double step = 1e-5;
      const double numeric = (model.evaluate(pH + step).charge - model.evaluate(pH - step).charge) / (2 * step);
      const double analytic = model.evaluate(pH).dcharge_dpH;
      EXPECT_NEAR(analytic, numeric, 1e-6 * std::fabs(numeric)) << "pH " << pH;
    }
  }
}

// With no metal that forms a pair the model is Davies itself.
TEST(IonPairs, WithoutPairsTheSameAsDavies) {
  const Library lib = builtin_library();
  Mixture m = ion_pair_mixture(lib, {{"acetic-acid", 0.05}, {"NaCl", 0.1}, {"HCl", 0.001}});
  const Equilibrium e = solve(m);
  m.activity = ActivityModel::kDavies;
  const Equilibrium d = solve(m);
  ASSERT_TRUE(e.usable() && d.usable());
  EXPECT_DOUBLE_EQ(e.pH, d.pH);
  EXPECT_DOUBLE_EQ(e.ionic_strength_mol_per_L, d.ionic_strength_mol_per_L);
}

}  // namespace
}  // namespace pkarta
