// Profiles of a dibasic base with a hydrochloride (1:1) and a dihydrochloride (1:2): each
// salt-limited point against the balances solved by hand, the salt-to-salt transition, and
// every point rebuilt as a closed mixture for the equilibrium solver.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>

#include "pkarta/analyses/profile.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/chem/water.h"
#include "pkarta/io/xml_input.h"

namespace {

using namespace pkarta;

const Library& lib() {
  static const Library l = builtin_library();
  return l;
}

// Invented dibasic base: pKa 2.5 (BH2++ -> BH+) and 7.0 (BH+ -> B), S0 1e-4 mol/L, molar mass
// 300; hydrochloride Ksp1 = [BH+][Cl-] = 2e-3, dihydrochloride Ksp2 = [BH2++][Cl-]^2 = 2e-4.
const char* const kDibasic =
    "<compound id='b2' name='b2' molar-mass='300'>"
    "<pka value='2.5' type='base'/><pka value='7.0' type='base'/>"
    "<intrinsic-solubility value='1e-4' unit='M'/>"
    "<salt id='hydrochloride' counterion='Cl-' ksp='2e-3'/>"
    "<salt id='dihydrochloride' counterion='Cl-' stoichiometry='1:2' ksp='2e-4'/>"
    "</compound>";

double bisect_log(const std::function<double(double)>& f, double lo, double hi) {
  // f decreasing in x > 0; bisection on log x.
  for (int i = 0; i < 300; ++i) {
    const double mid = std::sqrt(lo * hi);
    (f(mid) > 0 ? lo : hi) = mid;
  }
  return std::sqrt(lo * hi);
}

struct HandPoint {
  double d = 0.0;  // dissolved drug, mol/L
  double u = 0.0;  // chloride, mol/L
};

// Activity coefficients 1, water, pH held by HCl (Cl- is both titrant and counterion). With a
// salt limiting, the dissolved drug follows from its Ksp at [Cl-] = u, and u from the charge
// balance [H+] + D (2 a0 + a1) = [OH-] + u, a_j the species fractions of the base:
//   hydrochloride:    D = Ksp1 / (a1 u);   dihydrochloride: D = Ksp2 / (a0 u^2).
HandPoint by_hand(double pH, bool di) {
  const double h = std::pow(10.0, -pH), kw = std::pow(10.0, -pkw(25.0));
  const double k1 = std::pow(10.0, -2.5), k2 = std::pow(10.0, -7.0);
  const double den = 1.0 + k1 / h + k1 * k2 / (h * h);
  const double a0 = 1.0 / den, a1 = (k1 / h) / den;
  auto dissolved = [&](double u) { return di ? 2e-4 / (a0 * u * u) : 2e-3 / (a1 * u); };
  HandPoint p;
  p.u = bisect_log([&](double u) { return h + dissolved(u) * (2 * a0 + a1) - kw / h - u; }, 1e-12, 100.0);
  p.d = dissolved(p.u);
  return p;
}

TEST(ProfileSalts, DibasicBaseHydrochlorideAndDihydrochlorideByHand) {
  const Compound c = parse_compound(kDibasic, "b2.xml", lib(), nullptr);
  ProfileConditions cond;
  cond.activity = ActivityModel::kIdeal;
  ProfileGrid g;
  g.from_pH = 0.5;
  g.to_pH = 5.0;
  g.step_pH = 0.05;
  const Profile p = compute_profile(c, lib(), cond, g);
  bool seen_di = false, seen_mono = false;
  for (const ProfilePoint& pt : p.points) {
    if (pt.limiting_solid == "free") continue;
    const bool di = pt.limiting_solid == "dihydrochloride";
    ASSERT_TRUE(di || pt.limiting_solid == "hydrochloride") << pt.pH << " " << pt.limiting_solid;
    (di ? seen_di : seen_mono) = true;
    const HandPoint hand = by_hand(pt.pH, di);
    EXPECT_NEAR(pt.solubility_mol_per_L / hand.d, 1.0, 1e-9) << pt.pH;
    // The profile's solid is the less soluble of the two salts there.
    EXPECT_LE(hand.d, by_hand(pt.pH, !di).d * (1.0 + 1e-9)) << pt.pH;
  }
  EXPECT_TRUE(seen_di);
  EXPECT_TRUE(seen_mono);
  // The dihydrochloride limits at the acid end, the hydrochloride above it: one transition,
  // where both salts give the same dissolved drug (hand bisection on D_di - D_mono).
  ASSERT_EQ(p.salt_transitions.size(), 1u);
  EXPECT_EQ(p.salt_transitions[0].below, "dihydrochloride");
  EXPECT_EQ(p.salt_transitions[0].above, "hydrochloride");
  double lo = 0.5, hi = 5.0;
  for (int i = 0; i < 100; ++i) {
    const double mid = 0.5 * (lo + hi);
    (by_hand(mid, true).d < by_hand(mid, false).d ? lo : hi) = mid;
  }
  EXPECT_NEAR(p.salt_transitions[0].pH, 0.5 * (lo + hi), 1e-7);
  // And the hydrochloride's pHmax with the free base, above the transition.
  ASSERT_FALSE(p.ph_max.empty());
  bool found = false;
  for (const PhMax& m : p.ph_max) {
    if (m.salt == "hydrochloride" && m.on_profile) {
      found = true;
      EXPECT_GT(m.pH, p.salt_transitions[0].pH);
      // At pHmax S0/a_B = Ksp1/(a1 u): the hydrochloride's limit meets the free base's.
      const HandPoint hand = by_hand(m.pH, false);
      EXPECT_NEAR(m.solubility_mol_per_L / hand.d, 1.0, 1e-6);
    }
  }
  EXPECT_TRUE(found);
}

// Each salt-limited point of the Davies profile rebuilt as a closed mixture: the free form
// dosed at twice S, the titrant, plus the chloride the precipitated salt took (n per formula
// unit); the solver must find the same pH, dissolved drug and solid.
TEST(ProfileSalts, EachDibasicPointIsAClosedSystemEquilibrium) {
  const Compound c = parse_compound(kDibasic, "b2.xml", lib(), nullptr);
  ProfileConditions cond;
  SolubilityScanner scanner(c, lib(), cond);
  int salt_points = 0;
  for (double pH = 0.8; pH <= 6.0; pH += 0.1) {
    const SolubilityAtPh r = scanner.at(pH);
    if (r.capped || r.ionic_strength_mol_per_L > 0.5) continue;
    Mixture m = cond.medium;
    const double dose = 2.0 * r.solubility_mol_per_L;
    add_drug(m, lib(), c, dose, "free");
    if (r.titrant_mol_per_L < 0) add_reagent(m, lib(), "HCl", -r.titrant_mol_per_L);
    if (r.titrant_mol_per_L > 0) add_reagent(m, lib(), "NaOH", r.titrant_mol_per_L);
    if (const Salt* salt = c.salt(r.limiting_solid)) {
      ++salt_points;
      add_reagent(m, lib(), "HCl", salt->counterion_count * (dose - r.solubility_mol_per_L));
    }
    const Equilibrium e = solve(m);
    ASSERT_TRUE(e.usable()) << pH << ": " << e.message;
    EXPECT_NEAR(e.pH, pH, 1e-8);
    EXPECT_NEAR(e.drug->dissolved_mol_per_L / r.solubility_mol_per_L, 1.0, 1e-7) << pH;
    EXPECT_EQ(e.drug->solid, r.limiting_solid) << pH;
  }
  EXPECT_GT(salt_points, 10);
}

}  // namespace
