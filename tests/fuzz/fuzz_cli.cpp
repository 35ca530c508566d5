// Fuzz target: the command line, with argument vectors built from the input (fuzz_cli_checks.h).
// Run from the repository root (the demo compounds are read from compounds/). A failing input
// aborts; keep it under tests/fuzz/regressions/cli/ (replayed by fuzz_regressions_test).
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string_view>

#include "fuzz_cli_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  const std::string problem = pkarta::fuzz::check_cli(text, "compounds");
  if (!problem.empty()) {
    std::fprintf(stderr, "fuzz_cli: %s\n", problem.c_str());
    std::abort();
  }
  return 0;
}
