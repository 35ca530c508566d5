// Benchmarks of the buffer screen (Google Benchmark). Figures are quoted in docs/performance.md.
#include <benchmark/benchmark.h>

#include <algorithm>
#include <cmath>
#include <random>

#include "pkarta/analyses/screen.h"
#include "pkarta/io/xml_input.h"

namespace {

using namespace pkarta;

// 1,000 invented compounds: 1-3 pKa values (acid or base groups, 2-11), intrinsic solubility
// 1 ug/mL-1 mg/mL (molar mass 200-600), an enthalpy of solution, and a 1:1 salt given by Ksp
// (a hydrochloride for compounds with a base group, a sodium salt otherwise). Half are dosed as
// the free form, half as the salt, at 0.1-5 mg/mL. Fixed seed: the same set every run.
std::vector<ScreenJob> invented_jobs(const Library& lib, int count) {
  std::mt19937_64 rng(20240601);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::vector<ScreenJob> jobs;
  for (int k = 0; k < count; ++k) {
    Compound c;
    c.id = "invented-" + std::to_string(k);
    c.name = c.id;
    c.molar_mass_g_per_mol = 200 + 400 * u(rng);
    c.system.id = c.id;
    const int n = 1 + static_cast<int>(3 * u(rng)) % 3;
    std::vector<double> pkas;
    for (int i = 0; i < n; ++i) pkas.push_back(2 + 9 * u(rng));
    std::sort(pkas.begin(), pkas.end());
    bool has_base = false;
    for (double v : pkas) {
      Pka p;
      p.value = v;
      p.type = u(rng) < 0.5 ? GroupType::kBase : GroupType::kAcid;
      p.dH_kJ_per_mol = p.type == GroupType::kBase ? 20 + 30 * u(rng) : 5 * u(rng);
      has_base = has_base || p.type == GroupType::kBase;
      c.system.pkas.push_back(p);
    }
    c.has_intrinsic_solubility = true;
    c.s0_mol_per_L = std::pow(10.0, -3 + 3 * u(rng)) / c.molar_mass_g_per_mol;  // mg/mL = g/L
    c.s0_dH_kJ_per_mol = 10 + 20 * u(rng);
    Salt s;
    const int zc = has_base ? -1 : +1;
    const int j = c.system.z0() + zc;
    if (j >= 0 && j <= n) {
      s.id = has_base ? "hydrochloride" : "sodium";
      s.counterion = has_base ? "Cl-" : "Na+";
      s.ksp = std::pow(10.0, -4 + 3 * u(rng));
      c.salts.push_back(s);
    }
    ScreenJob job;
    job.form = (!c.salts.empty() && u(rng) < 0.5) ? c.salts.front().id : "free";
    job.dose_mol_per_L = (0.1 + 4.9 * u(rng)) / form_molar_mass(c, job.form, lib);
    job.compound = c;
    jobs.push_back(std::move(job));
  }
  return jobs;
}

// An invented diacidic base (pKa 3.1 and 8.4, S0 12 ug/mL, molar mass 311.4) with a
// hydrochloride of Ksp 4.3e-5, like the demo base of compounds/.
Compound bench_base() {
  Compound c;
  c.id = "bench-base";
  c.name = c.id;
  c.molar_mass_g_per_mol = 311.4;
  c.system.id = c.id;
  for (double v : {3.1, 8.4}) {
    Pka p;
    p.value = v;
    p.type = GroupType::kBase;
    p.dH_kJ_per_mol = v > 5 ? 45 : 5;
    c.system.pkas.push_back(p);
  }
  c.has_intrinsic_solubility = true;
  c.s0_mol_per_L = 12e-3 / 311.4;
  c.s0_dH_kJ_per_mol = 18;
  Salt s;
  s.id = "hydrochloride";
  s.counterion = "Cl-";
  s.ksp = 4.3e-5;
  s.molar_mass_g_per_mol = 347.9;
  c.salts.push_back(s);
  return c;
}

// One compound (0.5 mg/mL of the bench base's hydrochloride) screened against all 20 buffers
// of the built-in library at pH 5.0, serially.
void screen_20_buffers_one_compound(benchmark::State& state) {
  const Library lib = builtin_library();
  ScreenJob job;
  job.compound = bench_base();
  job.form = "hydrochloride";
  job.dose_mol_per_L = 0.5 / form_molar_mass(job.compound, job.form, lib);
  ScreenOptions opt;
  opt.target_pH = 5.0;
  std::size_t buffers = 0;
  for (auto _ : state) {
    const ScreenReport rep = screen(lib, job, opt);
    buffers = rep.results.size();
    benchmark::DoNotOptimize(rep.results.front().min_conc_mol_per_L);
  }
  state.counters["buffers"] = static_cast<double>(buffers);
}
BENCHMARK(screen_20_buffers_one_compound)->Unit(benchmark::kMillisecond);

// 1,000 invented compounds x 20 buffers at pH 6.5, on every core (std::thread).
void screen_1000_compounds_x_20_buffers(benchmark::State& state) {
  const Library lib = builtin_library();
  const std::vector<ScreenJob> jobs = invented_jobs(lib, 1000);
  ScreenOptions opt;
  opt.target_pH = 6.5;
  BatchOptions batch;
  batch.threads = static_cast<int>(state.range(0));
  std::size_t ok = 0, pairs = 0;
  for (auto _ : state) {
    const std::vector<ScreenReport> reps = screen_batch(lib, jobs, opt, batch);
    ok = pairs = 0;
    for (const ScreenReport& r : reps) {
      for (const ScreenResult& x : r.results) {
        ok += x.status == ScreenStatus::kOk;
        ++pairs;
      }
    }
  }
  state.counters["pairs"] = static_cast<double>(pairs);
  state.counters["ok_fraction"] = pairs ? static_cast<double>(ok) / pairs : 0.0;
}
BENCHMARK(screen_1000_compounds_x_20_buffers)->Arg(0)->Arg(1)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();

}  // namespace
