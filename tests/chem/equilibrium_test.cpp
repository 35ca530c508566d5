// The closed-system solver against closed-form results and its own invariants.
#include "pkarta/chem/equilibrium.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "pkarta/chem/water.h"

namespace pkarta {
namespace {

AcidBaseSystem monoprotic_acid(double pka, const std::string& id = "ha") {
  AcidBaseSystem s;
  s.id = id;
  Pka p;
  p.value = pka;
  p.type = GroupType::kAcid;
  s.pkas.push_back(p);
  return s;
}

Mixture ideal_buffer(double pka, double acid, double base) {
  Mixture m;
  m.activity = ActivityModel::kIdeal;
  m.add_system(monoprotic_acid(pka), acid + base);
  m.add_ion("Na+", +1, base);  // the conjugate base as its sodium salt
  return m;
}

TEST(IdealLimit, ReproducesHendersonHasselbalchExactly) {
  // Henderson-Hasselbalch with the proton and hydroxide terms (charge balance form):
  // pH = pKa + log10((Cb + [H+] - [OH-]) / (Ca - [H+] + [OH-])), activities 1.
  for (double pka : {3.5, 4.756, 7.2, 9.3}) {
    for (double ratio : {0.1, 0.5, 1.0, 2.0, 10.0}) {
      const double ca = 0.05, cb = 0.05 * ratio;
      const Equilibrium e = solve(ideal_buffer(pka, ca, cb));
      ASSERT_TRUE(e.usable());
      const double h = std::pow(10.0, -e.pH);
      const double oh = std::pow(10.0, -pkw(25)) / h;
      const double hh = pka + std::log10((cb + h - oh) / (ca - h + oh));
      EXPECT_NEAR(e.pH, hh, 1e-9) << "pKa " << pka << " ratio " << ratio;
    }
  }
}

TEST(IdealLimit, EqualAcidAndBaseGivesPkaCommonPractice) {
  // Equal acid and conjugate base: pH = pKa (common practice; exact when [H+], [OH-] << C).
  const Equilibrium e = solve(ideal_buffer(6.9975, 0.5, 0.5));  // pKa = pKw/2: H and OH cancel
  ASSERT_TRUE(e.usable());
  EXPECT_NEAR(e.pH, 6.9975, 1e-9);
}

TEST(IdealLimit, VanSlykeMaximumCapacityAtPka) {
  // van Slyke (1922): beta_max = (ln10/4) C at pH = pKa for a monoprotic buffer.
  const double c = 0.1;
  const Mixture m = ideal_buffer(6.9975, c / 2, c / 2);
  const double beta = buffer_capacity(m);
  const double h = std::pow(10.0, -6.9975);
  const double water = kLn10 * (h + std::pow(10.0, -pkw(25)) / h);
  EXPECT_NEAR(beta, kLn10 / 4 * c + water, 1e-7);
  EXPECT_NEAR(van_slyke_capacity(m, 6.9975), kLn10 / 4 * c + water, 1e-12);
}

TEST(IdealLimit, BufferIsEffectiveWithinPkaPlusMinusOneCommonPractice) {
  // At pH = pKa +/- 1 the capacity is ln10 C r/(1+r)^2 with r = 10: 33 % of the maximum,
  // the usual "effective range" of a buffer (common practice).
  const double c = 0.1, pka = 6.0;
  for (double r : {10.0, 0.1}) {
    const Mixture m = ideal_buffer(pka, c / (1 + r), c * r / (1 + r));
    const Equilibrium e = solve(m);
    const double beta = buffer_capacity(m);
    const double h = std::pow(10.0, -e.pH);
    const double ka = std::pow(10.0, -pka);
    const double expected =
        kLn10 * (h + std::pow(10.0, -pkw(25)) / h + c * ka * h / ((ka + h) * (ka + h)));
    EXPECT_NEAR(beta / expected, 1.0, 1e-6);
    EXPECT_NEAR(beta / (kLn10 / 4 * c), 4.0 * 10 / 121, 0.01);
  }
}

TEST(Activity, CapacityStaysWithinTenPercentOfVanSlykeAtI01) {
  // With activity coefficients recomputed as base is added, the capacity of an equimolar
  // acetate buffer at I = 0.1 differs from the ideal van Slyke value by a few percent
  // (adding NaOH raises I, which lowers the apparent pKa and so the pH step).
  Mixture m;
  m.add_system(monoprotic_acid(4.756), 0.2);
  m.add_ion("Na+", 1, 0.1);
  const Equilibrium e = solve(m);
  const double beta = buffer_capacity(m);
  const double ideal = van_slyke_capacity(m, e.pH);
  EXPECT_NEAR(ideal / beta, 1.0, 0.10);
  EXPECT_NE(ideal, beta);
}

Compound weak_base(double pka, double s0) {
  Compound c;
  c.id = "base";
  c.molar_mass_g_per_mol = 300;
  c.system.id = "base";
  Pka p;
  p.value = pka;
  p.type = GroupType::kBase;
  c.system.pkas.push_back(p);
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = s0;
  return c;
}

TEST(Solids, FreeBaseSaturatesAtIntrinsicSolubility) {
  Mixture m;
  DrugAmount d;
  d.compound = weak_base(8.0, 1e-4);
  d.dose_mol_per_L = 0.01;
  m.drug = d;
  const Equilibrium e = solve(m);
  ASSERT_TRUE(e.usable());
  ASSERT_TRUE(e.drug);
  EXPECT_EQ(e.drug->solid, "free");
  EXPECT_NEAR(e.drug->neutral_mol_per_L, 1e-4, 1e-16);
  EXPECT_LT(e.mass_residual_rel, 1e-12);
  EXPECT_LT(e.charge_residual_rel, 1e-10);
  EXPECT_GT(e.drug->saturation_ratio, 1.0);
}

TEST(Solids, HydrochlorideSaltLimitsAtKsp) {
  Compound c = weak_base(8.0, 1e-2);
  Salt s;
  s.id = "hydrochloride";
  s.counterion = "Cl-";
  s.ksp = 1e-4;
  c.salts.push_back(s);
  Mixture m;
  DrugAmount d;
  d.compound = c;
  d.dose_mol_per_L = 0.1;
  d.form = "hydrochloride";
  m.drug = d;
  m.add_ion("Cl-", -1, 0.1);
  m.add_ion("Na+", 1, 0.05);  // plus NaCl: common ion
  m.add_ion("Cl-", -1, 0.05);
  const Equilibrium e = solve(m);
  ASSERT_TRUE(e.usable());
  EXPECT_EQ(e.drug->solid, "hydrochloride");
  double cation = 0, chloride = 0;
  for (const Species& sp : e.species) {
    if (sp.name == "base HA+") cation = sp.conc_mol_per_L * sp.activity_coefficient;
    if (sp.name == "Cl-") chloride = sp.conc_mol_per_L * sp.activity_coefficient;
  }
  EXPECT_NEAR(cation * chloride / 1e-4, 1.0, 1e-9);
  EXPECT_LT(e.mass_residual_rel, 1e-12);
  EXPECT_LT(e.charge_residual_rel, 1e-10);
}

// Property test: random valid mixtures converge with tiny residuals, and the pH rises with
// every addition of strong base.
TEST(Property, RandomMixturesConvergeAndPhIsMonotoneInStrongBase) {
  std::mt19937_64 rng(20261201);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  int cases = 0, failures = 0, monotone_failures = 0;
  for (int t = 0; t < 10000; ++t) {
    Mixture m;
    m.temperature_C = 5 + 35 * u(rng);
    const int nsys = 1 + static_cast<int>(u(rng) * 3);
    for (int k = 0; k < nsys; ++k) {
      AcidBaseSystem s;
      s.id = "s" + std::to_string(k);
      const int n = 1 + static_cast<int>(u(rng) * 3);
      double pk = 1 + 4 * u(rng);
      for (int i = 0; i < n; ++i) {
        Pka p;
        p.value = pk;
        p.type = u(rng) < 0.3 ? GroupType::kBase : GroupType::kAcid;
        p.dH_kJ_per_mol = -10 + 60 * u(rng);
        s.pkas.push_back(p);
        pk += 0.5 + 4 * u(rng);
      }
      m.add_system(s, std::pow(10.0, -4 + 3.5 * u(rng)));
    }
    m.add_ion("Na+", 1, std::pow(10.0, -5 + 4.5 * u(rng)));
    m.add_ion("Cl-", -1, std::pow(10.0, -5 + 4.5 * u(rng)));
    if (u(rng) < 0.5) {
      Compound c = weak_base(3 + 8 * u(rng), std::pow(10.0, -6 + 4 * u(rng)));
      Salt s;
      s.id = "hydrochloride";
      s.counterion = "Cl-";
      s.ksp = std::pow(10.0, -6 + 4 * u(rng));
      c.salts.push_back(s);
      DrugAmount d;
      d.compound = c;
      d.dose_mol_per_L = std::pow(10.0, -5 + 4 * u(rng));
      m.drug = d;
    }
    ++cases;
    double last = -100;
    for (double added : {0.0, 1e-4, 1e-3, 1e-2}) {
      Mixture mm = m;
      mm.add_ion("Na+", 1, added);
      const Equilibrium e = solve(mm);
      const bool ok = e.usable() && std::isfinite(e.pH) && e.charge_residual_rel < 1e-10 &&
                      e.mass_residual_rel < 1e-10;
      if (!ok) {
        ++failures;
        ADD_FAILURE() << "case " << t << " pH " << e.pH << " charge " << e.charge_residual_rel
                      << " mass " << e.mass_residual_rel;
        break;
      }
      if (e.pH < last - 1e-12) ++monotone_failures;
      last = e.pH;
    }
  }
  std::printf("property test: %d random mixtures x 4 additions of base, %d failures, %d non-monotone\n",
              cases, failures, monotone_failures);
  EXPECT_EQ(failures, 0);
  EXPECT_EQ(monotone_failures, 0);
}

TEST(Solver, InvalidOptionsAreReportedNotThrown) {
  SolverOptions o;
  o.max_ph_iterations = 0;
  const Equilibrium e = solve(ideal_buffer(4.7, 0.1, 0.1), o);
  EXPECT_FALSE(e.usable());
  EXPECT_NE(e.message.find("max_ph_iterations"), std::string::npos);
}

}  // namespace
}  // namespace pkarta
