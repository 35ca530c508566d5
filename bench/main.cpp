// Entry point of pkarta_bench; the benchmarks live in bench/*_bench.cpp.
#include <benchmark/benchmark.h>

BENCHMARK_MAIN();
