// The one shape of every lob_bench benchmark: time one query per iteration, then judge the
// same query outside the timed loop and hand the worst error over the inputs back as a counter.
#pragma once

#include <benchmark/benchmark.h>

#include <algorithm>
#include <cstddef>
#include <iterator>

namespace lob_bench {

// Times call() once per iteration; call reads its own inputs (an array, a volatile) so that the
// optimiser cannot fold it. The result is kept alive as a const value: DoNotOptimize on a
// non-const double lvalue has been seen to zero it (Google Benchmark 1.7.1 with g++ 12).
template <class Call>
void time_calls(benchmark::State& state, Call call) {
  for (auto _ : state) {
    const auto out = call();
    benchmark::DoNotOptimize(out);
  }
}

// Times query(inputs[i]) once per iteration, i cycling through the inputs (built beforehand).
template <class Inputs, class Query>
void time_cycling(benchmark::State& state, const Inputs& inputs, Query query) {
  const std::size_t n = std::size(inputs);
  std::size_t i = 0;
  for (auto _ : state) {
    const auto out = query(inputs[i]);
    benchmark::DoNotOptimize(out);
    if (++i == n) i = 0;
  }
}

// The largest error(i, query(inputs[i])) over all inputs, 0 for none.
template <class Inputs, class Query, class Error>
double worst_error(const Inputs& inputs, Query query, Error error) {
  double worst = 0;
  for (std::size_t i = 0; i < std::size(inputs); ++i) worst = std::max(worst, error(i, query(inputs[i])));
  return worst;
}

// time_cycling, then counter = worst_error over the same inputs and query.
template <class Inputs, class Query, class Error>
void time_and_measure(benchmark::State& state, const Inputs& inputs, Query query, Error error,
                      const char* counter) {
  time_cycling(state, inputs, query);
  state.counters[counter] = worst_error(inputs, query, error);
}

// time_calls, then counter = error(call()) for a query of one fixed input.
template <class Call, class Error>
void time_and_measure_one(benchmark::State& state, Call call, Error error, const char* counter) {
  time_calls(state, call);
  state.counters[counter] = error(call());
}

}  // namespace lob_bench
