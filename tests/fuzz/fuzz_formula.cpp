// Fuzz target: the formula parser (molar_mass_g_per_mol).
// The checks are in fuzz_checks.h; a failed check aborts, so libFuzzer
// saves the input; keep it under tests/fuzz/regressions/formula/ (replayed by fuzz_regressions_test).
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string_view>

#include "fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  const std::string problem = pkarta::fuzz::check_formula(text);
  if (!problem.empty()) {
    std::fprintf(stderr, "fuzz_formula: %s\n", problem.c_str());
    std::abort();
  }
  return 0;
}
