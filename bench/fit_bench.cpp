// Benchmarks of fit and Monte Carlo bands (Google Benchmark). Figures are quoted in docs/performance.md.
#include <benchmark/benchmark.h>

#include <cmath>
#include <random>

#include "pkarta/analyses/fit.h"
#include "pkarta/analyses/screen.h"
#include "pkarta/analyses/uncertainty.h"
#include "pkarta/io/xml_input.h"

namespace {

using namespace pkarta;

// Invented ampholyte: acid pKa 4.0 (sd 0.05), base pKa 8.5 (sd 0.08), log10 S0 -4.0 mol/L
// (log-sd 0.15), molar mass 300; a hydrochloride with Ksp 1e-3 for the profile benchmark.
Compound bench_ampholyte(bool with_salt) {
  Compound c;
  c.id = "bench-ampholyte";
  c.name = c.id;
  c.molar_mass_g_per_mol = 300.0;
  c.system.id = c.id;
  Pka a;
  a.value = 4.0;
  a.type = GroupType::kAcid;
  a.sd = 0.05;
  Pka b;
  b.value = 8.5;
  b.type = GroupType::kBase;
  b.sd = 0.08;
  c.system.pkas = {a, b};
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 1e-4;
  c.s0_log_sd = 0.15;
  if (with_salt) {
    Salt s;
    s.id = "hydrochloride";
    s.counterion = "Cl-";
    s.ksp = 1e-3;
    c.salts.push_back(s);
  }
  return c;
}

// 20 points, pH 2-11, log-normal noise 0.05 log10; 3 parameters (log S0, pKa1, pKa2) started
// 0.3-0.4 away from the truth; Davies activities, water, HCl/NaOH.
void fit_20_points_3_parameters(benchmark::State& state) {
  const Library lib = builtin_library();
  const Compound truth = bench_ampholyte(false);
  std::mt19937_64 rng(1);
  std::normal_distribution<double> noise(0.0, 0.05);
  std::vector<FitPoint> pts;
  for (int i = 0; i < 20; ++i) {
    FitPoint p;
    p.pH = 2.0 + 9.0 * i / 19.0;
    p.solubility_mol_per_L =
        solubility_at_pH(truth, lib, p.pH, ProfileConditions{}).solubility_mol_per_L * std::pow(10.0, noise(rng));
    pts.push_back(p);
  }
  Compound start = truth;
  start.s0_mol_per_L = std::pow(10.0, -4.4);
  start.system.pkas[0].value = 4.3;
  start.system.pkas[1].value = 8.2;
  const std::vector<FitParameter> params = parse_fit_parameters("s0,pka1,pka2", start);
  long evaluations = 0, fits = 0;
  for (auto _ : state) {
    const FitResult r = fit_solubility(start, lib, pts, params);
    benchmark::DoNotOptimize(r.rms_log10);
    evaluations += r.evaluations;
    ++fits;
  }
  state.counters["model_evaluations_per_fit"] = static_cast<double>(evaluations) / fits;
}
BENCHMARK(fit_20_points_3_parameters)->Unit(benchmark::kMillisecond);

// 1,000 Monte Carlo samples of a full profile (pH 1-13, step 0.05: 241 points, salt plateau
// included), all cores.
void profile_bands_1000_samples(benchmark::State& state) {
  const Library lib = builtin_library();
  const Compound c = bench_ampholyte(true);
  std::vector<double> grid;
  for (int i = 0; i <= 240; ++i) grid.push_back(1.0 + 0.05 * i);
  for (auto _ : state) {
    const ProfileBands b = profile_bands(c, lib, grid, ProfileConditions{}, 1000, 42);
    benchmark::DoNotOptimize(b.p95_log10_mol_per_L.data());
  }
  state.counters["solubility_points_per_s"] =
      benchmark::Counter(241.0 * 1000.0, benchmark::Counter::kIsIterationInvariantRate);
}
BENCHMARK(profile_bands_1000_samples)->Unit(benchmark::kSecond)->Iterations(2)->UseRealTime();

// 1,000 Monte Carlo samples of a full screen: the bench ampholyte (no salt), 1 mg/mL of the
// free form, target pH 7.0, every buffer of the built-in library (20), all cores.
void screen_bands_1000_samples(benchmark::State& state) {
  const Library lib = builtin_library();
  ScreenJob job;
  job.compound = bench_ampholyte(false);
  job.dose_mol_per_L = 1.0 / 300.0;
  ScreenOptions options;
  options.target_pH = 7.0;
  std::size_t buffers = 0;
  for (auto _ : state) {
    const ScreenBands b = screen_bands(lib, job, options, 1000, 42);
    buffers = b.buffers.size();
    benchmark::DoNotOptimize(b.buffers.data());
  }
  state.counters["buffers"] = static_cast<double>(buffers);
}
BENCHMARK(screen_bands_1000_samples)->Unit(benchmark::kSecond)->Iterations(1)->UseRealTime();

}  // namespace
