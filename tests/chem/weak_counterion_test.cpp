// Salts whose counterion is a species of a weak acid-base system (hydrogen maleate, the
// tromethamine cation): the counterion's own equilibria enter the charge and mass balances.
// Checked against independent calculations written out here from the balances, with maleic
// acid's constants from a named compilation.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/water.h"

namespace pkarta {
namespace {

Pka pka(double value, GroupType type) {
  Pka p;
  p.value = value;
  p.type = type;
  return p;
}

// Maleic acid, pKa 1.92 and 6.27 at 25 °C and I -> 0: Goldberg, Kishore and Lennen (2002),
// J. Phys. Chem. Ref. Data 31, 231 (values recalled from that compilation, to be verified;
// the CRC Handbook's table of organic acids gives 1.92 and 6.23).
AcidBaseSystem maleate() {
  AcidBaseSystem s;
  s.id = "maleate";
  s.name = "maleate";
  s.pkas = {pka(1.92, GroupType::kAcid), pka(6.27, GroupType::kAcid)};
  return s;
}

// An invented monobasic base, pKa 8.0 (BH+ -> B), S0 1e-3 mol/L.
Compound base() {
  Compound c;
  c.id = "base1";
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  c.system.pkas = {pka(8.0, GroupType::kBase)};
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 1e-3;
  return c;
}

Salt maleate_salt(double ksp) {
  Salt s;
  s.id = "maleate";
  s.counterion = "maleate";
  s.counterion_is_system = true;
  s.counterion_charge = -1;  // hydrogen maleate HM-
  s.ksp = ksp;
  return s;
}

// Fractions of an ideal system: ka in ascending pKa order, alpha_j for j protons removed.
void ideal_fractions(const std::vector<double>& pkas, double h, double* alpha) {
  double beta = 1.0, sum = 1.0;
  alpha[0] = 1.0;
  for (std::size_t i = 0; i < pkas.size(); ++i) {
    beta *= std::pow(10.0, -pkas[i]) / h;
    alpha[i + 1] = beta;
    sum += beta;
  }
  for (std::size_t j = 0; j <= pkas.size(); ++j) alpha[j] /= sum;
}

double bisect(const std::function<double(double)>& f, double lo, double hi) {
  // f decreasing in x.
  for (int i = 0; i < 200; ++i) {
    const double mid = 0.5 * (lo + hi);
    (f(mid) > 0 ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

// The charge balance of C mol/L of BH+ HM- in water, activity coefficients 1:
//   [H+] + C a(BH+) = Kw/[H+] + C (a(HM-) + 2 a(M2-)).
double maleate_salt_ph(double c, double kw) {
  return bisect(
      [&](double pH) {
        const double h = std::pow(10.0, -pH);
        double ab[2], am[3];
        ideal_fractions({8.0}, h, ab);
        ideal_fractions({1.92, 6.27}, h, am);
        return h + c * ab[0] - kw / h - c * (am[1] + 2.0 * am[2]);
      },
      0.0, 14.0);
}

Mixture salt_solution(double c, double ksp, bool allow_solids) {
  Mixture m;
  m.activity = ActivityModel::kIdeal;
  DrugAmount d;
  d.compound = base();
  d.compound.salts.push_back(maleate_salt(ksp));
  d.dose_mol_per_L = c;
  d.form = "maleate";
  d.allow_solids = allow_solids;
  m.drug = d;
  m.add_system(maleate(), c);  // the counterion enters as its system
  return m;
}

// A maleate salt dissolved in water sets a pH of its own. Hydrogen maleate is amphiprotic and a
// stronger acid (pKa2 6.27) than the drug's BH+ (pKa 8.0), so the salt's pH lies near the mean
// of maleic acid's two pKa values, (1.92 + 6.27)/2 = 4.10, the classic result for an
// amphiprotic anion; a hydrochloride of the same base at the same strength is less acidic
// (its charge balance: [H+] + C a(BH+) = Kw/[H+] + C, pH near (8.0 - log C)/2).
TEST(WeakCounterion, MaleateSaltInWaterMatchesTheChargeBalanceByHand) {
  const double kw = std::pow(10.0, -pkw(25.0));
  for (double c : {1e-3, 1e-2, 0.1}) {
    const Equilibrium e = solve(salt_solution(c, 1.0, false));
    ASSERT_TRUE(e.usable()) << e.message;
    EXPECT_NEAR(e.pH, maleate_salt_ph(c, kw), 1e-9) << c;
    EXPECT_EQ(e.drug->solid, "none");
    EXPECT_LT(e.charge_residual_rel, 1e-10);
    EXPECT_LT(e.mass_residual_rel, 1e-10);
    // Near (1.92 + 6.27)/2 once C is well above the species it buffers.
    if (c >= 0.1) EXPECT_NEAR(e.pH, 4.095, 0.05) << c;

    Mixture hcl;
    hcl.activity = ActivityModel::kIdeal;
    DrugAmount d;
    d.compound = base();
    d.dose_mol_per_L = c;
    d.allow_solids = false;
    hcl.drug = d;
    hcl.add_ion("Cl-", -1, c);
    const Equilibrium eh = solve(hcl);
    ASSERT_TRUE(eh.usable());
    const double ph_hcl = bisect(
        [&](double pH) {
          const double h = std::pow(10.0, -pH);
          double ab[2];
          ideal_fractions({8.0}, h, ab);
          return h + c * ab[0] - kw / h - c;
        },
        0.0, 14.0);
    EXPECT_NEAR(eh.pH, ph_hcl, 1e-9) << c;
    EXPECT_GT(eh.pH - e.pH, 0.3) << c;  // the maleate salt is the more acidic
  }
}

// At a fixed pH an excess of the 1:1 maleate salt dissolves S mol/L of drug; maleate comes only
// from the salt, so its dissolved total is also S, of which a(HM-) is the counterion:
//   Ksp = a(BH+) S a(HM-) S  =>  S = sqrt(Ksp / (a(BH+) a(HM-))).
TEST(WeakCounterion, SaltSolubilityAtFixedPhUsesTheCounterionFraction) {
  const double ksp = 1e-5;
  for (double pH : {2.0, 3.0, 4.0, 5.5}) {
    Mixture m = salt_solution(0.5, ksp, true);
    EquilibriumModel model(m);
    const EquilibriumModel::Evaluation ev = model.evaluate(pH);
    const double h = std::pow(10.0, -pH);
    double ab[2], am[3];
    ideal_fractions({8.0}, h, ab);
    ideal_fractions({1.92, 6.27}, h, am);
    const double expected = std::sqrt(ksp / (ab[0] * am[1]));
    ASSERT_TRUE(ev.drug.solids.has_salt(0)) << pH;
    EXPECT_NEAR(ev.drug.dissolved / expected, 1.0, 1e-12) << pH;
    EXPECT_NEAR(ev.drug.salt_solid[0], 0.5 - expected, 1e-13) << pH;
    EXPECT_NEAR(model.system_removed(ev.drug, 0), 0.5 - expected, 1e-13) << pH;
  }
}

// A slurry of the maleate salt in water: the pH and the dissolved amount satisfy, by hand,
// a(BH+) S a(HM-) S = Ksp together with the charge balance of the dissolved salt; the state
// keeps the salt at saturation 1 and the free base undersaturated.
TEST(WeakCounterion, SlurryOfTheSaltInWaterByHand) {
  const double ksp = 1e-6, kw = std::pow(10.0, -pkw(25.0));
  const Equilibrium e = solve(salt_solution(0.2, ksp, true));
  ASSERT_TRUE(e.usable()) << e.message;
  ASSERT_EQ(e.drug->solid, "maleate");
  auto dissolved_at = [&](double pH) {
    const double h = std::pow(10.0, -pH);
    double ab[2], am[3];
    ideal_fractions({8.0}, h, ab);
    ideal_fractions({1.92, 6.27}, h, am);
    return std::sqrt(ksp / (ab[0] * am[1]));
  };
  const double pH = bisect(
      [&](double x) {
        const double h = std::pow(10.0, -x);
        double ab[2], am[3];
        ideal_fractions({8.0}, h, ab);
        ideal_fractions({1.92, 6.27}, h, am);
        const double s = dissolved_at(x);
        return h + s * ab[0] - kw / h - s * (am[1] + 2.0 * am[2]);
      },
      0.0, 14.0);
  EXPECT_NEAR(e.pH, pH, 1e-8);
  EXPECT_NEAR(e.drug->dissolved_mol_per_L / dissolved_at(pH), 1.0, 1e-8);
  EXPECT_LT(e.charge_residual_rel, 1e-10);
  EXPECT_LT(e.mass_residual_rel, 1e-10);
  // The free base stays below its intrinsic solubility.
  EXPECT_LT(e.drug->neutral_mol_per_L, 1e-3);
  // Maleate species sum to the dissolved total S.
  double maleate_total = 0.0;
  for (const Species& sp : e.species) {
    if (sp.system == "maleate") maleate_total += sp.conc_mol_per_L;
  }
  EXPECT_NEAR(maleate_total / e.drug->dissolved_mol_per_L, 1.0, 1e-9);
  // The charge balance's analytic slope with the salt held present (the counterion system's
  // fractions move with the pH too) against a central difference.
  EquilibriumModel model(salt_solution(0.2, ksp, true));
  const double step = 1e-6;
  const EquilibriumModel::Evaluation at = model.evaluate(e.pH);
  const double fd = (model.evaluate(e.pH + step).charge - model.evaluate(e.pH - step).charge) / (2 * step);
  EXPECT_NEAR(at.dcharge_dpH / fd, 1.0, 1e-5);
}

// With Davies activities the salt's Ksp is an activity product: derived from the salt's
// solubility in water and used again, the same solution is exactly saturated.
TEST(WeakCounterion, KspFromSolubilityInWaterRoundTrips) {
  Library lib;
  lib.systems["maleate"] = maleate();
  Compound c = base();
  c.s0_mol_per_L = 0.05;  // the salt's own pH (about 7.1) must not exceed its pHmax
  Salt s = maleate_salt(1.0);
  s.ksp.reset();
  s.solubility_in_water_mol_per_L = 0.02;
  c.salts.push_back(s);
  resolve_salt_ksp(c, lib);
  ASSERT_TRUE(c.salts[0].ksp.has_value());
  Mixture m;
  DrugAmount d;
  d.compound = c;
  d.dose_mol_per_L = 0.02;
  d.form = "maleate";
  m.drug = d;
  m.add_system(maleate(), 0.02);
  const Equilibrium e = solve(m);
  ASSERT_TRUE(e.usable()) << e.message;
  EXPECT_NEAR(e.drug->saturation_ratio, 1.0, 1e-9);
  EXPECT_EQ(e.drug->solid, "none");
  // A little more and the salt remains as a solid.
  m.drug->dose_mol_per_L = 0.021;
  m.systems[0].total_mol_per_L = 0.021;
  const Equilibrium e2 = solve(m);
  ASSERT_TRUE(e2.usable());
  EXPECT_EQ(e2.drug->solid, "maleate");
  EXPECT_NEAR(e2.drug->dissolved_mol_per_L / 0.02, 1.0, 0.01);
}

}  // namespace
}  // namespace pkarta
