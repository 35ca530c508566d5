// Benchmarks (Google Benchmark). Figures are quoted in docs/performance.md.
#include <benchmark/benchmark.h>

#include <random>
#include <vector>

#include "pkarta/chem/equilibrium.h"
#include "pkarta/chem/mixture_builder.h"
#include "pkarta/io/xml_input.h"

namespace {

using namespace pkarta;

// A monoprotic weak base (pKa 8.3, dH 40 kJ/mol, S0 20 ug/mL with dH of solution 18 kJ/mol,
// molar mass 320.4) added as free form at random doses 0.01-5 mg/mL to 25 mM KH2PO4 +
// 25 mM Na2HPO4 at random temperatures 5-40 °C, Davies activities; some states saturate.
Compound bench_base() {
  Compound c;
  c.id = "bench-base";
  c.name = "benchmark base";
  c.molar_mass_g_per_mol = 320.4;
  c.system.id = c.id;
  Pka p;
  p.value = 8.3;
  p.type = GroupType::kBase;
  p.dH_kJ_per_mol = 40;
  c.system.pkas.push_back(p);
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 20e-3 / 320.4;
  c.s0_dH_kJ_per_mol = 18.0;
  return c;
}

void solve_states(benchmark::State& state, ActivityModel activity) {
  const Library lib = builtin_library();
  const Compound base = bench_base();
  std::mt19937_64 rng(42);
  std::uniform_real_distribution<double> dose_mg(0.01, 5.0), temp(5.0, 40.0);
  Mixture m;
  add_reagent(m, lib, "KH2PO4", 0.025);
  add_reagent(m, lib, "Na2HPO4", 0.025);
  add_drug(m, lib, base, 1e-3, "free");
  m.activity = activity;
  SolverOptions opt;
  long evaluations = 0, saturated = 0, states = 0;
  for (auto _ : state) {
    m.temperature_C = temp(rng);
    m.drug->dose_mol_per_L = dose_mg(rng) / 320.4;
    EquilibriumModel model(m);
    const StateSummary s = model.solve(opt);
    benchmark::DoNotOptimize(s.pH);
    evaluations += s.evaluations;
    saturated += !s.solids.empty();
    ++states;
  }
  state.counters["evaluations_per_state"] = static_cast<double>(evaluations) / states;
  state.counters["saturated_fraction"] = static_cast<double>(saturated) / states;
  state.counters["states_per_s"] = benchmark::Counter(static_cast<double>(states), benchmark::Counter::kIsRate);
}
void closed_system_solve(benchmark::State& state) { solve_states(state, ActivityModel::kDavies); }
BENCHMARK(closed_system_solve);

// The same states under the specific ion interaction model (per-species coefficients).
void closed_system_solve_sit(benchmark::State& state) { solve_states(state, ActivityModel::kSit); }
BENCHMARK(closed_system_solve_sit);

// The same states with Davies coefficients and explicit ion pairs (NaHPO4-, NaH2PO4: the free
// Na+ from its mass balance at every charge-balance evaluation).
void closed_system_solve_ion_pairs(benchmark::State& state) { solve_states(state, ActivityModel::kIonPairs); }
BENCHMARK(closed_system_solve_ion_pairs);

// A formulation at the top of the SIT range: citrate-phosphate (McIlvaine-like, random share of
// 0.2 M Na2HPO4 against 0.1 M citric acid) with 0-150 mM NaCl and the weak base above at
// 0.01-5 mg/mL, 5-40 °C, I 0.05-0.75 mol/L; `model` 0 Davies, 1 SIT, 2 Davies with ion pairs.
void citrate_phosphate_saline(benchmark::State& state) {
  const Library lib = builtin_library();
  const Compound base = bench_base();
  const ActivityModel activity = state.range(0) == 0   ? ActivityModel::kDavies
                                 : state.range(0) == 1 ? ActivityModel::kSit
                                                       : ActivityModel::kIonPairs;
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> share(0.0, 1.0), nacl(0.0, 0.150), dose_mg(0.01, 5.0),
      temp(5.0, 40.0);
  SolverOptions opt;
  long evaluations = 0, states = 0;
  std::vector<Mixture> mixtures;
  for (int k = 0; k < 256; ++k) {
    Mixture m;
    m.activity = activity;
    const double x = share(rng);
    add_reagent(m, lib, "Na2HPO4", 0.2 * x);
    add_reagent(m, lib, "citric-acid", 0.1 * (1.0 - x));
    add_reagent(m, lib, "NaCl", nacl(rng));
    add_drug(m, lib, base, dose_mg(rng) / 320.4, "free");
    m.temperature_C = temp(rng);
    mixtures.push_back(m);
  }
  std::size_t k = 0;
  for (auto _ : state) {
    EquilibriumModel model(mixtures[k++ % mixtures.size()]);
    const StateSummary s = model.solve(opt);
    benchmark::DoNotOptimize(s.pH);
    evaluations += s.evaluations;
    ++states;
  }
  state.counters["evaluations_per_state"] = static_cast<double>(evaluations) / states;
}
BENCHMARK(citrate_phosphate_saline)->ArgName("model")->Arg(0)->Arg(1)->Arg(2);

// Up to three candidate solids: a dibasic base (pKa 6.0 and 9.0, S0 0.1 mg/mL, molar mass
// 300) with a hydrochloride (1:1, Ksp 1e-3) and a dihydrochloride (1:2, Ksp 1e-5), at random
// doses 1-50 mg/mL in random HCl 0-3 equivalents plus 0.15 M NaCl, random temperatures
// 5-40 °C, Davies activities; states hold none, one or two solids.
void three_candidate_solids(benchmark::State& state) {
  const Library lib = builtin_library();
  Compound c;
  c.id = "bench-dibase";
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  for (double v : {6.0, 9.0}) {
    Pka p;
    p.value = v;
    p.type = GroupType::kBase;
    p.dH_kJ_per_mol = 40;
    c.system.pkas.push_back(p);
  }
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 0.1 / 300.0;
  Salt hcl;
  hcl.id = "hydrochloride";
  hcl.counterion = "Cl-";
  hcl.ksp = 1e-3;
  Salt dihcl = hcl;
  dihcl.id = "dihydrochloride";
  dihcl.counterion_count = 2;
  dihcl.ksp = 1e-5;
  c.salts = {hcl, dihcl};
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> dose_mg(1.0, 50.0), eq(0.0, 3.0), temp(5.0, 40.0);
  Mixture m;
  add_reagent(m, lib, "NaCl", 0.15);
  add_drug(m, lib, c, 0.01, "free");
  m.add_ion("Cl-", -1, 0.0);  // HCl adds chloride; its protons follow from the charge balance
  SolverOptions opt;
  long evaluations = 0, saturated = 0, two = 0, states = 0;
  std::size_t cl = 0;
  for (std::size_t k = 0; k < m.ions.size(); ++k) {
    if (m.ions[k].id == "Cl-") cl = k;
  }
  for (auto _ : state) {
    m.temperature_C = temp(rng);
    const double dose = dose_mg(rng) / 300.0;
    const double acid = eq(rng) * dose;
    m.drug->dose_mol_per_L = dose;
    m.ions[cl].conc_mol_per_L = 0.15 + acid;
    EquilibriumModel model(m);
    const StateSummary s = model.solve(opt);
    benchmark::DoNotOptimize(s.pH);
    evaluations += s.evaluations;
    saturated += !s.solids.empty();
    two += s.solids.count() >= 2;
    ++states;
  }
  state.counters["evaluations_per_state"] = static_cast<double>(evaluations) / states;
  state.counters["saturated_fraction"] = static_cast<double>(saturated) / states;

  state.counters["two_solids_fraction"] = static_cast<double>(two) / states;
  state.counters["states_per_s"] = benchmark::Counter(static_cast<double>(states), benchmark::Counter::kIsRate);
}
BENCHMARK(three_candidate_solids);
// Fixed state counts for instruction counts under callgrind (tools/instructions-per-state):
// the difference of the two runs over 10,000 states leaves out the setup.
BENCHMARK(three_candidate_solids)->Name("three_candidate_solids/states:1000")->Iterations(1000);
BENCHMARK(three_candidate_solids)->Name("three_candidate_solids/states:11000")->Iterations(11000);

}  // namespace

