// Property test of the closed-system solver at the extremes of its input ranges: pKa -5 to 20,
// intrinsic solubility 1e-15 to 10 mol/L, totals up to 5 mol/L, 0-80 °C, up to 8 pKa values
// per system and up to 50 systems in one mixture. Every solve either converges to a state
// whose every number is finite, or refuses with a message; never NaN or infinity.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <random>
#include <string>

#include "pkarta/chem/equilibrium.h"

namespace pkarta {
namespace {

constexpr int kSingleSystemCases = 100000;
constexpr int kDrugCases = 100000;
constexpr int kFiftySystemCases = 5000;
constexpr double kMaxResidual = 1e-10;         // every returned state (docs/model.md, Solver)

class Generator {
 public:
  explicit Generator(unsigned seed) : rng_(seed) {}

  double uniform(double lo, double hi) { return std::uniform_real_distribution<double>(lo, hi)(rng_); }
  double log_uniform(double lo, double hi) { return std::pow(10.0, uniform(std::log10(lo), std::log10(hi))); }
  int integer(int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(rng_); }
  bool coin() { return integer(0, 1) == 1; }

  /// A system with 1..max_pka ascending pKa values in [-5, 20] of random acid/base type.
  AcidBaseSystem system(const std::string& id, int max_pka) {
    AcidBaseSystem s;
    s.id = id;
    const int n = integer(1, max_pka);
    std::vector<double> values(n);
    for (double& v : values) v = uniform(-5.0, 20.0);
    std::sort(values.begin(), values.end());
    for (int i = 0; i < n; ++i) {
      Pka p;
      p.value = values[i] + 1e-3 * i;  // strictly ascending
      p.type = coin() ? GroupType::kAcid : GroupType::kBase;
      p.dH_kJ_per_mol = uniform(-60.0, 60.0);
      p.dCp_J_per_K_mol = uniform(-300.0, 300.0);
      s.pkas.push_back(p);
    }
    return s;
  }

  double total() { return log_uniform(1e-9, 5.0); }
  double temperature() { return uniform(0.0, 80.0); }

 private:
  std::mt19937_64 rng_;
};

struct Tally {
  int cases = 0;
  int converged = 0;
  int refused = 0;
  int failures = 0;
  int residual_above = 0;
  double max_charge_residual = 0.0;
  double max_mass_residual = 0.0;
  double max_ionic_strength = 0.0;
  std::string first_failure;
  std::string worst_residual;

  void fail(const std::string& what) {
    if (failures++ == 0) first_failure = what;
  }
};

bool finite(double x) { return std::isfinite(x); }

void worst_residual_note(Tally* t, const std::string& label, const Equilibrium& e) {
  t->worst_residual = label + ": charge " + std::to_string(e.charge_residual_rel) + " mass " +
                      std::to_string(e.mass_residual_rel) + " pH " + std::to_string(e.pH) + " I " +
                      std::to_string(e.ionic_strength_mol_per_L);
}

/// Sum of every total and concentration of the mixture (mol/L).
double sum_of_totals(const Mixture& m) {
  double sum = m.drug ? m.drug->dose_mol_per_L : 0.0;
  for (const SystemAmount& s : m.systems) sum += s.total_mol_per_L;
  for (const IonAmount& i : m.ions) sum += i.conc_mol_per_L;
  return sum;
}

/// Checks one solve: usable with finite numbers, or refused with a message. A refusal is a
/// failure unless the mixture holds more than 10 mol/L of solutes in all (beyond what the
/// model, or water, covers) or the drug would need more than one salt as solid, which the
/// model does not cover; both must say so in the message.
void check(const Mixture& m, Tally* t, const std::string& label) {
  ++t->cases;
  const Equilibrium e = solve(m);
  if (!e.usable()) {
    ++t->refused;
    const bool concentrated = sum_of_totals(m) > 10.0 && e.message.find("too concentrated") != std::string::npos;
    const bool two_salts = e.message.find("more than one salt") != std::string::npos;
    if (!concentrated && !two_salts) t->fail(label + ": refused: " + e.message);
    if (e.pH != 0.0 && !finite(e.pH)) t->fail(label + ": refused with a non-finite pH");
    return;
  }
  ++t->converged;
  if (!finite(e.pH) || !finite(e.ionic_strength_mol_per_L) || !finite(e.osmolarity_mOsm_per_L) ||
      !finite(e.charge_residual_rel) || !finite(e.mass_residual_rel)) {
    t->fail(label + ": non-finite pH, ionic strength, osmolarity or residual");
    return;
  }
  t->max_ionic_strength = std::max(t->max_ionic_strength, e.ionic_strength_mol_per_L);
  if (!(e.charge_residual_rel <= kMaxResidual) || !(e.mass_residual_rel <= kMaxResidual)) {
    if (t->residual_above++ == 0) worst_residual_note(t, label, e);
    t->fail(label + ": residual above " + std::to_string(kMaxResidual) + ": " + t->worst_residual);
  }
  t->max_charge_residual = std::max(t->max_charge_residual, e.charge_residual_rel);
  t->max_mass_residual = std::max(t->max_mass_residual, e.mass_residual_rel);
  if (e.pH < -3.0 || e.pH > 17.0) t->fail(label + ": pH " + std::to_string(e.pH) + " outside [-3, 17]");
  for (const Species& s : e.species) {
    if (!finite(s.conc_mol_per_L) || !finite(s.activity_coefficient) || s.conc_mol_per_L < 0 ||
        !(s.activity_coefficient > 0)) {
      t->fail(label + ": species " + s.name + " has conc " + std::to_string(s.conc_mol_per_L) +
              ", activity coefficient " + std::to_string(s.activity_coefficient));
      return;
    }
  }
  if (e.drug) {
    const DrugState& d = *e.drug;
    for (double x : {d.dissolved_mol_per_L, d.dissolved_mg_per_mL, d.free_solid_mol_per_L,
                     d.salt_solid_mol_per_L, d.neutral_mol_per_L, d.saturation_ratio}) {
      if (!finite(x)) {
        t->fail(label + ": non-finite drug state");
        return;
      }
    }
    for (double f : d.fractions) {
      if (!finite(f)) {
        t->fail(label + ": non-finite drug fraction");
        return;
      }
    }
  }
  const bool outside = m.temperature_C > 60.0;
  bool warned = false;
  for (const std::string& w : e.warnings) warned = warned || w.find("outside 0-60 C") != std::string::npos;
  if (outside != warned) t->fail(label + ": temperature warning missing or spurious");
}

void report(const char* name, const Tally& t) {
  std::printf("[ extremes ] %s: %d cases, %d converged, %d refused with a message, %d failures; "
              "max residuals charge %.2g mass %.2g (%d above 1e-10), max I %.3g mol/L\n",
              name, t.cases, t.converged, t.refused, t.failures, t.max_charge_residual,
              t.max_mass_residual, t.residual_above, t.max_ionic_strength);
  if (!t.worst_residual.empty()) std::printf("[ extremes ] first residual above 1e-10: %s\n", t.worst_residual.c_str());
}

TEST(Extremes, SingleSystemsWithStrongIons) {
  Generator g(20240601);
  Tally t;
  for (int k = 0; k < kSingleSystemCases; ++k) {
    Mixture m;
    m.temperature_C = g.temperature();
    m.activity = g.integer(0, 4) == 0 ? ActivityModel::kIdeal : ActivityModel::kDavies;
    m.add_system(g.system("s", kMaxPka), g.total());
    if (g.coin()) m.add_ion("Na+", +1, g.total());
    if (g.coin()) m.add_ion("Cl-", -1, g.total());
    check(m, &t, "case " + std::to_string(k));
  }
  report("single systems", t);
  EXPECT_EQ(t.failures, 0) << t.first_failure;
}

TEST(Extremes, DrugWithSaltsAndBuffer) {
  Generator g(777);
  Tally t;
  for (int k = 0; k < kDrugCases; ++k) {
    Mixture m;
    m.temperature_C = g.temperature();
    m.add_system(g.system("buffer", 3), g.total());
    DrugAmount d;
    d.compound.id = "drug";
    d.compound.molar_mass_g_per_mol = g.uniform(50.0, 2000.0);
    d.compound.system = g.system("drug", kMaxPka);
    d.compound.system.permanent_charge = g.integer(0, 5) == 0 ? 1 : 0;
    const int z0 = d.compound.system.z0();
    const int n = static_cast<int>(d.compound.system.pkas.size());
    d.compound.has_intrinsic_solubility = d.compound.system.neutral_index() >= 0;
    d.compound.s0_mol_per_L = g.log_uniform(1e-15, 10.0);
    if (g.coin()) d.compound.s0_dH_kJ_per_mol = g.uniform(-50.0, 50.0);
    // A salt with each counterion the compound can pair with 1:1.
    if (z0 - 1 >= 0 && z0 - 1 <= n && g.coin()) {  // species of charge +1 pairs with Cl-
      Salt s;
      s.id = "hydrochloride";
      s.counterion = "Cl-";
      s.ksp = g.log_uniform(1e-12, 10.0);
      s.dH_kJ_per_mol = g.uniform(-30.0, 30.0);
      d.compound.salts.push_back(s);
      m.add_ion("Cl-", -1, g.total());
    }
    if (z0 + 1 >= 0 && z0 + 1 <= n && g.coin()) {  // species of charge -1 pairs with Na+
      Salt s;
      s.id = "sodium";
      s.counterion = "Na+";
      s.ksp = g.log_uniform(1e-12, 10.0);
      d.compound.salts.push_back(s);
      m.add_ion("Na+", +1, g.total());
    }
    d.dose_mol_per_L = g.total();
    d.allow_solids = g.integer(0, 9) != 0;
    m.drug = d;
    check(m, &t, "drug case " + std::to_string(k));
  }
  report("drug with salts", t);
  EXPECT_EQ(t.failures, 0) << t.first_failure;
}

TEST(Extremes, FiftySystemsInOneMixture) {
  Generator g(42);
  Tally t;
  for (int k = 0; k < kFiftySystemCases; ++k) {
    Mixture m;
    m.temperature_C = g.temperature();
    // Totals up to 5 mol/L split over 50 systems, or each system up to 5 mol/L on some cases.
    const bool concentrated = g.integer(0, 3) == 0;
    for (int s = 0; s < 50; ++s) {
      m.add_system(g.system("s" + std::to_string(s), kMaxPka), concentrated ? g.total() : g.total() / 50.0);
    }
    m.add_ion("Na+", +1, g.total());
    m.add_ion("Cl-", -1, g.total());
    check(m, &t, "50-system case " + std::to_string(k));
  }
  report("fifty systems", t);
  EXPECT_EQ(t.failures, 0) << t.first_failure;
}

}  // namespace
}  // namespace pkarta
