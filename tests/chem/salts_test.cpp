// Salts of any stoichiometry and several drug solids at once, against closed forms derived by
// hand from the solubility product and the mass and charge balances.
#include <gtest/gtest.h>

#include <cmath>
#include <cstring>
#include <random>
#include <string>

#include "pkarta/chem/equilibrium.h"

namespace pkarta {
namespace {

Pka pka(double value, GroupType type) {
  Pka p;
  p.value = value;
  p.type = type;
  return p;
}

// A dibasic base (pKa 9.0 and 6.0, both amines) of molar mass 300, S0 1e-4 mol/L.
Compound dibasic_base() {
  Compound c;
  c.id = "base2";
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  c.system.pkas = {pka(6.0, GroupType::kBase), pka(9.0, GroupType::kBase)};
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 1e-4;
  return c;
}

Compound monobasic_base(double pk, double s0) {
  Compound c;
  c.id = "base1";
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  c.system.pkas = {pka(pk, GroupType::kBase)};
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = s0;
  return c;
}

Salt salt(const std::string& id, const std::string& ion, int m, int n, double ksp) {
  Salt s;
  s.id = id;
  s.counterion = ion;
  s.drug_count = m;
  s.counterion_count = n;
  s.ksp = ksp;
  return s;
}

// Fraction of species j of an ideal system at h (Ka ascending: beta_j = prod_{i<j} Ka_i / h).
double fraction(const AcidBaseSystem& s, double pH, int j) {
  const double h = std::pow(10.0, -pH);
  double beta = 1.0, sum = 1.0, bj = 1.0;
  for (std::size_t i = 0; i < s.pkas.size(); ++i) {
    beta *= std::pow(10.0, -s.pkas[i].value) / h;
    sum += beta;
    if (static_cast<int>(i) + 1 == j) bj = beta;
  }
  return (j == 0 ? 1.0 : bj) / sum;
}

// The drug alone (dose in mol/L, of the form named) with activity coefficients 1; ions are
// added by each check.
Mixture ideal_with_drug(const Compound& c, double dose_mol_per_L, const std::string& form) {
  Mixture m;
  m.activity = ActivityModel::kIdeal;
  DrugAmount d;
  d.compound = c;
  d.dose_mol_per_L = dose_mol_per_L;
  d.form = form;
  m.drug = d;
  return m;
}

// Dihydrochloride B.2HCl, Ksp = [BH2++][Cl-]^2 (activity coefficients 1). Held at a fixed pH
// (the partition at that pH), an excess dose D of the salt dissolves to S mol/L of drug, of
// which the fraction f = alpha_0 is BH2++. Chloride comes only from the salt: the mass
// balance of chloride with the charge balance of the dissolved salt gives [Cl-] = 2 S (two
// chlorides leave the solid with each drug ion). Hence Ksp = f S (2 S)^2 = 4 f S^3 and
//   S = (Ksp / (4 f))^(1/3).
TEST(Stoichiometry, DihydrochlorideSolubilityAtFixedPhIsTheCubeRoot) {
  Compound c = dibasic_base();
  c.salts.push_back(salt("dihydrochloride", "Cl-", 1, 2, 1e-6));
  for (double pH : {2.0, 3.0, 4.0, 5.0}) {
    Mixture m = ideal_with_drug(c, 0.2, "dihydrochloride");
    m.add_ion("Cl-", -1, 0.4);
    EquilibriumModel model(m);
    const EquilibriumModel::Evaluation ev = model.evaluate(pH);
    const double f = fraction(c.system, pH, 0);
    const double expected = std::cbrt(1e-6 / (4.0 * f));
    EXPECT_TRUE(ev.drug.solids.has_salt(0) && !ev.drug.solids.free) << pH;
    EXPECT_NEAR(ev.drug.dissolved / expected, 1.0, 1e-12) << pH;
    EXPECT_NEAR(ev.drug.salt_solid[0], 0.2 - expected, 1e-14) << pH;
  }
}

// 2:1 sulfate (BH+)2 SO4--, Ksp = [BH+]^2 [SO4--] (activity coefficients 1). At a fixed pH
// with the fraction f = alpha_0 as BH+, an excess of the salt dissolves S mol/L of drug and,
// by the mass balance of sulfate (one per two drug ions), [SO4--] = S/2:
//   Ksp = (f S)^2 S/2  =>  S = (2 Ksp / f^2)^(1/3).
TEST(Stoichiometry, TwoToOneSulfateSolubilityAtFixedPh) {
  Compound c = monobasic_base(8.0, 1e-2);
  c.salts.push_back(salt("sulfate", "SO4--", 2, 1, 1e-9));
  for (double pH : {3.0, 5.0, 6.5}) {
    Mixture m = ideal_with_drug(c, 0.1, "sulfate");
    m.add_ion("SO4--", -2, 0.05);
    EquilibriumModel model(m);
    const EquilibriumModel::Evaluation ev = model.evaluate(pH);
    const double f = fraction(c.system, pH, 0);
    const double expected = std::cbrt(2.0 * 1e-9 / (f * f));
    EXPECT_TRUE(ev.drug.solids.has_salt(0)) << pH;
    EXPECT_NEAR(ev.drug.dissolved / expected, 1.0, 1e-12) << pH;
    // Formula units precipitated: half the drug that left solution.
    EXPECT_NEAR(ev.drug.salt_solid[0], 0.5 * (0.1 - expected), 1e-14) << pH;
  }
}

// Root of an increasing function on [lo, hi] by bisection (the test's own solver, independent of
// the model's).
template <typename F>
double bisect(F&& f, double lo, double hi) {
  for (int i = 0; i < 400 && hi - lo > 1e-300; ++i) {
    const double mid = 0.5 * (lo + hi);
    if (f(mid) > 0) hi = mid; else lo = mid;
  }
  return 0.5 * (lo + hi);
}

// A lone 1:2 salt away from its own stoichiometry, at a fixed pH (activity coefficients 1, no
// free form possible). Drug dose D, chloride total X; s formula units precipitate, leaving
// S = D - s dissolved and [Cl-] = X - 2 s = X - 2 D + 2 S, so (hand derivation)
//   Ksp = f S (X - 2 D + 2 S)^2,  f = alpha_0 (BH2++),  S in (max(0, D - X/2), D].
// Chloride in excess (common-ion effect, X > 2 D) and short of it (X < 2 D) both; each pH is
// evaluated on one model in sequence (each partition starts from the one before) and on a fresh
// model, which must agree.
TEST(Stoichiometry, DihydrochlorideOffStoichiometryAtFixedPhSolvesTheCubic) {
  Compound c = dibasic_base();
  c.has_intrinsic_solubility = false;
  const double ksp = 1e-6, dose = 0.05;
  c.salts.push_back(salt("dihydrochloride", "Cl-", 1, 2, ksp));
  for (double chloride : {0.15, 0.3, 0.06, 0.02}) {
    Mixture m = ideal_with_drug(c, dose, "free");
    m.add_ion("Cl-", -1, chloride);
    const EquilibriumModel sequence(m);
    for (double pH : {2.0, 2.5, 3.0, 4.0, 5.0, 5.5}) {
      const double f = fraction(c.system, pH, 0);
      const double lo = std::max(0.0, dose - 0.5 * chloride);
      auto excess_product = [&](double s) {
        const double x = chloride - 2.0 * dose + 2.0 * s;
        return f * s * x * x - ksp;
      };
      // Saturated only when the whole dose dissolved exceeds Ksp.
      if (!(excess_product(dose) > 0)) continue;
      const double expected = bisect(excess_product, lo, dose);
      const EquilibriumModel fresh(m);
      for (const EquilibriumModel* model : {&sequence, &fresh}) {
        const EquilibriumModel::Evaluation ev = model->evaluate(pH);
        EXPECT_TRUE(ev.drug.solids.has_salt(0) && !ev.drug.solids.free) << chloride << " " << pH;
        EXPECT_NEAR(ev.drug.dissolved / expected, 1.0, 1e-12) << chloride << " " << pH;
        EXPECT_NEAR(ev.drug.salt_solid[0], dose - expected, 1e-14) << chloride << " " << pH;
        EXPECT_NEAR(ev.drug.dissolved + ev.drug.salt_drug, dose, 1e-15) << chloride << " " << pH;
      }
    }
  }
}

// A lone 2:1 sulfate (BH+)2 SO4-- with sulfate in excess, at a fixed pH (activity coefficients
// 1): dose D, sulfate total Y, s formula units precipitate, S = D - 2 s dissolved and
// [SO4--] = Y - s = Y - (D - S)/2, so (hand derivation) Ksp = (f S)^2 (Y - (D - S)/2).
TEST(Stoichiometry, TwoToOneSulfateWithExcessSulfateAtFixedPh) {
  Compound c = monobasic_base(8.0, 1e-2);
  c.has_intrinsic_solubility = false;
  const double ksp = 1e-9, dose = 0.1, sulfate = 0.2;
  c.salts.push_back(salt("sulfate", "SO4--", 2, 1, ksp));
  Mixture m = ideal_with_drug(c, dose, "free");
  m.add_ion("SO4--", -2, sulfate);
  const EquilibriumModel model(m);
  for (double pH : {3.0, 5.0, 6.5, 7.5}) {
    const double f = fraction(c.system, pH, 0);
    auto excess_product = [&](double s) { return f * s * f * s * (sulfate - 0.5 * (dose - s)) - ksp; };
    const double expected = bisect(excess_product, 0.0, dose);
    const EquilibriumModel::Evaluation ev = model.evaluate(pH);
    EXPECT_TRUE(ev.drug.solids.has_salt(0)) << pH;
    EXPECT_NEAR(ev.drug.dissolved / expected, 1.0, 1e-12) << pH;
    EXPECT_NEAR(ev.drug.salt_solid[0], 0.5 * (dose - expected), 1e-14) << pH;
  }
}

// The closed system: the dihydrochloride in water sets its own pH; the returned state holds
// the activity product at Ksp and closes the balances.
TEST(Stoichiometry, DihydrochlorideInWaterHoldsItsActivityProduct) {
  Compound c = dibasic_base();
  c.salts.push_back(salt("dihydrochloride", "Cl-", 1, 2, 1e-6));
  Mixture m;
  DrugAmount d;
  d.compound = c;
  d.dose_mol_per_L = 0.5;
  d.form = "dihydrochloride";
  m.drug = d;
  m.add_ion("Cl-", -1, 1.0);
  const Equilibrium e = solve(m);
  ASSERT_TRUE(e.usable()) << e.message;
  EXPECT_EQ(e.drug->solid, "dihydrochloride");
  double cation = 0, chloride = 0;
  for (const Species& sp : e.species) {
    if (sp.name == "base2 H2A2+") cation = sp.conc_mol_per_L * sp.activity_coefficient;
    if (sp.name == "Cl-") chloride = sp.conc_mol_per_L * sp.activity_coefficient;
  }
  EXPECT_NEAR(cation * chloride * chloride / 1e-6, 1.0, 1e-9);
  EXPECT_LT(e.mass_residual_rel, 1e-12);
  EXPECT_LT(e.charge_residual_rel, 1e-10);
}

// Activity product / Ksp of each candidate solid in a returned state, by the compound's index
// (-1 the free form), from the species list.
double saturation_of(const Equilibrium& e, const Mixture& m, int salt_index) {
  const Compound& c = m.drug->compound;
  auto activity = [&](const std::string& name) {
    for (const Species& sp : e.species) {
      if (sp.name == name) return sp.conc_mol_per_L * sp.activity_coefficient;
    }
    return 0.0;
  };
  const int jn = c.system.neutral_index();
  if (salt_index < 0) return e.drug->fractions[jn] * e.drug->dissolved_mol_per_L / c.s0_mol_per_L;
  const Salt& s = c.salts[salt_index];
  int zc = 0;
  for (const IonAmount& i : m.ions) {
    if (i.id == s.counterion) zc = i.charge;
  }
  const int zd = s.drug_charge(zc);
  const int j = c.system.z0() - zd;
  const double ad = activity(c.id + " " + c.system.species_label(j));
  const double ax = activity(s.counterion);
  return std::pow(ad, s.drug_count) * std::pow(ax, s.counterion_count) / *s.ksp;
}

// Property test: random compounds (one to three pKa values) with two or three salts of
// varied stoichiometry, in random media, at random doses. Every state converges with
// residuals below 1e-10; every solid present is at saturation ratio 1 within 1e-9; every
// solid absent is undersaturated (at most 1 + 1e-9: a solid exactly at its boundary with
// zero amount is absent).
TEST(Property, SeveralSolidsRandomCompoundsConvergeAtSaturation) {
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  struct Option {
    const char* ion;
    int charge;
    int m, n;
  };
  const Option options[] = {{"Cl-", -1, 1, 1}, {"Cl-", -1, 1, 2}, {"Br-", -1, 1, 1},
                            {"SO4--", -2, 2, 1}, {"SO4--", -2, 1, 1}, {"Cl-", -1, 1, 3},
                            {"Na+", 1, 1, 1},   {"Ca2+", 2, 2, 1},   {"K+", 1, 1, 2}};
  int states = 0, multi = 0, slopes = 0;
  for (int trial = 0; trial < 10000; ++trial) {
    Compound c;
    c.id = "drug";
    c.molar_mass_g_per_mol = 300.0;
    c.system.id = c.id;
    const int npk = 1 + static_cast<int>(u(rng) * 3);
    double pk = 1.5 + u(rng) * 3.0;
    for (int i = 0; i < npk; ++i) {
      c.system.pkas.push_back(pka(pk, u(rng) < 0.6 ? GroupType::kBase : GroupType::kAcid));
      pk += 1.0 + u(rng) * 3.0;
    }
    if (c.system.neutral_index() < 0) continue;
    c.has_intrinsic_solubility = true;
    c.s0_mol_per_L = std::pow(10.0, -6.0 + 4.0 * u(rng));
    const int want = 2 + static_cast<int>(u(rng) * 2);
    for (int tries = 0; tries < 20 && static_cast<int>(c.salts.size()) < want; ++tries) {
      const Option& o = options[static_cast<int>(u(rng) * 9)];
      Salt s = salt("s" + std::to_string(c.salts.size()), o.ion, o.m, o.n,
                    std::pow(10.0, -(o.m + o.n) * (1.0 + 2.5 * u(rng))));
      const int bal = -o.charge * o.n;
      if (bal % o.m != 0) continue;
      const int j = c.system.z0() - bal / o.m;
      if (j < 0 || j > npk) continue;
      bool dup = false;
      for (const Salt& t : c.salts) dup = dup || (t.counterion == s.counterion && t.drug_count == s.drug_count && t.counterion_count == s.counterion_count);
      if (!dup) c.salts.push_back(s);
    }
    if (c.salts.size() < 2) continue;
    Mixture m;
    if (u(rng) < 0.5) m.activity = ActivityModel::kIdeal;
    m.temperature_C = 5.0 + 40.0 * u(rng);
    DrugAmount d;
    d.compound = c;
    d.dose_mol_per_L = std::pow(10.0, -4.0 + 3.5 * u(rng));
    m.drug = d;
    // Medium: every counterion at a random level, with acid or base to move the pH.
    for (const char* ion : {"Cl-", "Br-", "SO4--", "Na+", "Ca2+", "K+"}) {
      const int z = std::string(ion) == "SO4--" ? -2 : std::string(ion) == "Ca2+" ? 2
                    : (ion[std::strlen(ion) - 1] == '-' ? -1 : 1);
      m.add_ion(ion, z, u(rng) < 0.3 ? 0.0 : std::pow(10.0, -4.0 + 3.3 * u(rng)));
    }
    double balance = 0.0;
    for (const IonAmount& i : m.ions) balance += i.charge * i.conc_mol_per_L;
    // Make the strong ions neutral (an acid or base adds H+ or OH-, here as their excess).
    const double tilt = std::pow(10.0, -5.0 + 4.0 * u(rng)) * (u(rng) < 0.5 ? -1.0 : 1.0);
    if (balance - tilt > 0) m.add_ion("Cl-", -1, balance - tilt); else m.add_ion("Na+", 1, tilt - balance);
    const Equilibrium e = solve(m);
    ++states;
    ASSERT_TRUE(e.usable()) << trial << ": " << e.message;
    ASSERT_LT(e.charge_residual_rel, 1e-10) << trial;
    ASSERT_LT(e.mass_residual_rel, 1e-10) << trial;
    const SolidSet& sol = e.drug->solids;
    if (sol.count() >= 2) ++multi;
    // The charge balance's analytic slope (solids held, implicit differentiation) against a
    // central difference, where the same solids stay present on both sides.
    if (sol.salts != 0) {
      EquilibriumModel model(m);
      model.set_ionic_strength(e.ionic_strength_mol_per_L);
      const double step = 1e-6;
      const EquilibriumModel::Evaluation at = model.evaluate(e.pH);
      const EquilibriumModel::Evaluation up = model.evaluate(e.pH + step);
      const EquilibriumModel::Evaluation down = model.evaluate(e.pH - step);
      if (up.drug.solids == sol && down.drug.solids == sol && at.drug.solids == sol) {
        const double fd = (up.charge - down.charge) / (2 * step);
        ASSERT_NEAR(at.dcharge_dpH / fd, 1.0, 1e-4) << trial << " " << e.drug->solid;
        ++slopes;
      }
    }
    for (int k = -1; k < static_cast<int>(c.salts.size()); ++k) {
      const bool present = k < 0 ? sol.free : sol.has_salt(k);
      const double ratio = saturation_of(e, m, k);
      if (present) {
        ASSERT_NEAR(ratio, 1.0, 1e-9) << trial << " solid " << k << " " << e.drug->solid;
      } else {
        ASSERT_LT(ratio, 1.0 + 1e-9) << trial << " solid " << k << " " << e.drug->solid;
      }
    }
  }
  EXPECT_GT(states, 5000);
  EXPECT_GT(multi, 100);  // the test does reach states of two or more solids
  EXPECT_GT(slopes, 1000);  // and checks the slope with salts present
}

}  // namespace
}  // namespace pkarta
