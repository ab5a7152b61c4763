// The entry point of lob_bench; the benchmarks live in the other *_bench.cpp files.
#include <benchmark/benchmark.h>

BENCHMARK_MAIN();
