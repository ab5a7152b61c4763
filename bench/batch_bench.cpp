// lob/batch against what a user writes instead: the scalar loop over the bodies (a flight
// built beforehand per body, then `at(t)` or `at_step(n)`), and, for 10^6 bodies, the
// memory bandwidth bound: copying the same columns (6 read, 6 written) with std::copy.
// "max_rel_err": the largest difference from the scalar query over the bodies, relative to
// 1 m + the distance flown (0: equal to the last bit, as tests/batch checks).
#include <benchmark/benchmark.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <vector>

#include "lob/lob.hpp"

namespace {

template <class T>
struct columns {
  std::vector<T> in[6], out[6];
  explicit columns(std::size_t n) {
    std::mt19937 rng(5);
    std::uniform_real_distribution<double> u(-1, 1);
    for (auto& c : in) c.resize(n);
    for (auto& c : out) c.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
      in[0][i] = T(30 * u(rng)), in[1][i] = T(30 * u(rng)), in[2][i] = T(1.5 + u(rng));
      in[3][i] = T(20 * u(rng)), in[4][i] = T(20 * u(rng)), in[5][i] = T(8 + 6 * u(rng));
    }
  }
  lob::shot_columns<T> shots() const { return {in[0], in[1], in[2], in[3], in[4], in[5]}; }
  lob::state_columns<T> states() { return {out[0], out[1], out[2], out[3], out[4], out[5]}; }
  lob::shot<T> launch(std::size_t i) const {
    return {lob::vec3<T>(in[0][i], in[1][i], in[2][i]), lob::vec3<T>(in[3][i], in[4][i], in[5][i])};
  }
};

template <class T>
lob::engine_step<T> engine() {
  lob::engine_step<T> s;
  s.damping = T(0.1);
  return s;
}

template <class T>
double worst_vs_scalar(const columns<T>& c, const std::vector<lob::vec3<T>>& scalar) {
  double worst = 0;
  for (std::size_t i = 0; i < scalar.size(); ++i) {
    const lob::vec3<T> p(c.out[0][i], c.out[1][i], c.out[2][i]);
    worst = std::max(worst, double((p - scalar[i]).norm() / (T(1) + (scalar[i] - c.launch(i).position).norm())));
  }
  return worst;
}

// kind 0: linear drag at t; kind 1: engine step at n.
template <class T, int kind>
void batch(benchmark::State& state) {
  columns<T> c(static_cast<std::size_t>(state.range(0)));
  const lob::medium<T> air{};
  const lob::linear_drag<T> drag{T(0.15)};
  for (auto _ : state) {
    const lob::status ok = kind == 0 ? lob::states_at(drag, air, c.shots(), T(1.25), c.states())
                                     : lob::states_at_step(engine<T>(), air, c.shots(), 75, c.states());
    benchmark::DoNotOptimize(ok.has_value());
    benchmark::ClobberMemory();
  }
  std::vector<lob::vec3<T>> scalar;
  for (std::size_t i = 0; i < c.in[0].size() && i < 4096; ++i)
    scalar.push_back(kind == 0 ? lob::fly(drag, air, c.launch(i))->at(T(1.25))->position
                               : lob::fly(engine<T>(), air, c.launch(i))->at_step(75)->position);
  state.counters["max_rel_err"] = worst_vs_scalar(c, scalar);
  state.SetItemsProcessed(state.iterations() * state.range(0));
}

template <class T, int kind>
void scalar_loop(benchmark::State& state) {
  columns<T> c(static_cast<std::size_t>(state.range(0)));
  const lob::medium<T> air{};
  const lob::linear_drag<T> drag{T(0.15)};
  using flight = std::conditional_t<kind == 0, lob::linear_flight<T>, lob::stepped_flight<T>>;
  std::vector<flight> flights;
  for (std::size_t i = 0; i < c.in[0].size(); ++i) {
    if constexpr (kind == 0) flights.push_back(*lob::fly(drag, air, c.launch(i)));
    else flights.push_back(*lob::fly(engine<T>(), air, c.launch(i)));
  }
  for (auto _ : state) {
    for (std::size_t i = 0; i < flights.size(); ++i) {
      if constexpr (kind == 0) {
        const auto s = flights[i].at(T(1.25));
        c.out[0][i] = s->position.x(), c.out[1][i] = s->position.y(), c.out[2][i] = s->position.z();
        c.out[3][i] = s->velocity.x(), c.out[4][i] = s->velocity.y(), c.out[5][i] = s->velocity.z();
      } else {
        const auto s = flights[i].at_step(75);
        c.out[0][i] = s->position.x(), c.out[1][i] = s->position.y(), c.out[2][i] = s->position.z();
        c.out[3][i] = s->velocity.x(), c.out[4][i] = s->velocity.y(), c.out[5][i] = s->velocity.z();
      }
    }
    benchmark::ClobberMemory();
  }
  state.counters["max_rel_err"] = 0;  // the scalar query itself
  state.SetItemsProcessed(state.iterations() * state.range(0));
}

template <class T>
void copy_columns(benchmark::State& state) {
  columns<T> c(static_cast<std::size_t>(state.range(0)));
  for (auto _ : state) {
    for (int k = 0; k < 6; ++k) std::copy(c.in[k].begin(), c.in[k].end(), c.out[k].begin());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
}

}  // namespace

BENCHMARK(batch<float, 0>)->Name("batch_linear_at_1000_float/lob")->Arg(1000);
BENCHMARK(scalar_loop<float, 0>)->Name("batch_linear_at_1000_float/scalar_loop")->Arg(1000);
BENCHMARK(batch<double, 0>)->Name("batch_linear_at_1000_double/lob")->Arg(1000);
BENCHMARK(scalar_loop<double, 0>)->Name("batch_linear_at_1000_double/scalar_loop")->Arg(1000);
BENCHMARK(batch<float, 1>)->Name("batch_step_1000_float/lob")->Arg(1000);
BENCHMARK(scalar_loop<float, 1>)->Name("batch_step_1000_float/scalar_loop")->Arg(1000);
BENCHMARK(batch<double, 1>)->Name("batch_step_1000_double/lob")->Arg(1000);
BENCHMARK(scalar_loop<double, 1>)->Name("batch_step_1000_double/scalar_loop")->Arg(1000);
BENCHMARK(batch<double, 0>)->Name("batch_linear_at_1e6_double/lob")->Arg(1000000);
BENCHMARK(copy_columns<double>)->Name("batch_linear_at_1e6_double/copy_same_columns")->Arg(1000000);
BENCHMARK(batch<float, 0>)->Name("batch_linear_at_1e6_float/lob")->Arg(1000000);
BENCHMARK(copy_columns<float>)->Name("batch_linear_at_1e6_float/copy_same_columns")->Arg(1000000);
