// Benchmark of the pH-solubility profile (figure quoted in docs/performance.md).
#include <benchmark/benchmark.h>

#include "pkarta/chem/mixture_builder.h"
#include "pkarta/analyses/profile.h"
#include "pkarta/io/xml_input.h"

namespace {

using namespace pkarta;

// An invented diacidic base (pKa 3.1 and 8.4, with enthalpies) with two salts, a hydrochloride
// and a mesylate, profiled at 37 °C in 0.9 % NaCl with the pH held by methanesulfonic acid or
// NaOH: both counterions are present, so both salts can limit and both pHmax are searched.
const char* kDiproticTwoSalts =
    "<compound id=\"bench-diprotic\" name=\"benchmark diprotic base\" molar-mass=\"311.4\">"
    "<pka value=\"3.1\" type=\"base\" dH=\"5\"/><pka value=\"8.4\" type=\"base\" dH=\"45\"/>"
    "<intrinsic-solubility value=\"12\" unit=\"ug/mL\" dH=\"18\"/>"
    "<salt id=\"hydrochloride\" counterion=\"Cl-\" ksp=\"4.3e-5\" dH=\"10\"/>"
    "<salt id=\"mesylate\" counterion=\"CH3SO3-\" ksp=\"2.5e-3\"/>"
    "</compound>";

void profile_241_points(benchmark::State& state) {
  const Library lib = builtin_library();
  const Compound c = parse_compound(kDiproticTwoSalts, "<bench>", lib, nullptr);
  ProfileConditions cond;
  cond.temperature_C = 37.0;
  cond.acid_titrant = "methanesulfonic-acid";
  add_medium(cond.medium, lib, "saline-0.9");
  const ProfileGrid grid;  // 1-13, step 0.05: 241 points
  std::size_t points = 0, ph_max = 0;
  for (auto _ : state) {
    const Profile p = compute_profile(c, lib, cond, grid);
    benchmark::DoNotOptimize(p.points.back().solubility_mol_per_L);
    points = p.points.size();
    ph_max = p.ph_max.size();
  }
  state.counters["points"] = static_cast<double>(points);
  state.counters["pHmax_found"] = static_cast<double>(ph_max);
}
BENCHMARK(profile_241_points)->Unit(benchmark::kMillisecond);

}  // namespace
