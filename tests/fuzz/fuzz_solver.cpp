// Fuzz target: the equilibrium solver, with the bytes decoded into a small Mixture.
// The checks are in fuzz_checks.h; a failed check aborts, so libFuzzer
// saves the input; keep it under tests/fuzz/regressions/solver/ (replayed by fuzz_regressions_test).
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>

#include "fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string problem = pkarta::fuzz::check_solver(data, size);
  if (!problem.empty()) {
    std::fprintf(stderr, "fuzz_solver: %s\n", problem.c_str());
    std::abort();
  }
  return 0;
}
