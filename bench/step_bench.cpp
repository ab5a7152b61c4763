// lob/step (an engine's stepped body) against what an engine programmer writes instead: the
// engine's own loop from the launch (to a step, to the ground), and lob's continuous aim,
// which misses inside the engine. Every variant carries "max_rel_err" (position error over
// the problem's size, 1 m + |target| + distance flown) against the same recurrence stepped in
// 50 digits (Boost.Multiprecision) before timing; the aims carry "miss_m", the largest miss
// of the launch flown by the engine's loop.
// The engine: 60 Hz, semi-implicit Euler, rational damping d = 0.1/s, gravity before damping.
#include <benchmark/benchmark.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <random>
#include <vector>

#include <boost/multiprecision/cpp_bin_float.hpp>

#include "lob/lob.hpp"
#include "runner.hpp"

namespace {

using mp50 = boost::multiprecision::cpp_bin_float_50;
constexpr std::size_t n_agents = 256;

template <class T>
lob::engine_step<T> engine() {
  lob::engine_step<T> s;
  s.damping = T(0.1);
  return s;
}

template <class T>
struct agent {
  lob::shot<T> launch;
  std::int64_t step;    // a step to ask for
  lob::vec3<T> target;  // a target on the ground
};

template <class T>
std::array<agent<T>, n_agents> agents() {
  std::mt19937_64 rng(20261204);
  std::uniform_real_distribution<double> u(0, 1);
  std::array<agent<T>, n_agents> out;
  for (agent<T>& a : out) {
    const double speed = 10 + 20 * u(rng), elev = 0.2 + 0.9 * u(rng), az = 6.28 * u(rng);
    a.launch.position = lob::vec3<T>(T(0), T(0), T(1 + u(rng)));
    a.launch.velocity = (lob::vec3<double>(std::cos(elev) * std::cos(az), std::cos(elev) * std::sin(az), std::sin(elev)) *
                         speed).template cast<T>();
    a.step = static_cast<std::int64_t>(u(rng) * 240);
    const double d = 5 + 25 * u(rng);
    a.target = lob::vec3<T>(T(d * std::cos(az)), T(d * std::sin(az)), T(0));
  }
  return out;
}

// The engine loop, as an engine programmer writes it.
template <class T>
struct body {
  lob::vec3<T> x, v;
  void step(const T& dt, const T& f, const lob::vec3<T>& g) {
    for (int i = 0; i < 3; ++i) {
      v[i] = T(T(v[i] + T(dt * g[i])) * f);
      x[i] = T(x[i] + T(dt * v[i]));
    }
  }
};

// The recurrence in 50 digits from the factor the engine uses.
template <class T>
std::array<mp50, 3> exact_at(const lob::shot<T>& launch, std::int64_t n) {
  const lob::engine_step<T> rule = engine<T>();
  const mp50 dt = mp50(rule.dt), f = mp50(rule.factor()), g = mp50(lob::standard_gravity<T>());
  std::array<mp50, 3> x, v;
  for (int i = 0; i < 3; ++i) {
    x[i] = mp50(launch.position[i]);
    v[i] = mp50(launch.velocity[i]);
  }
  for (std::int64_t k = 0; k < n; ++k)
    for (int i = 0; i < 3; ++i) {
      v[i] = (v[i] + dt * (i == 2 ? mp50(-g) : mp50(0))) * f;
      x[i] = x[i] + dt * v[i];
    }
  return x;
}

template <class T>
double rel_err(const lob::vec3<T>& got, const std::array<mp50, 3>& ref, const lob::shot<T>& launch) {
  mp50 e2 = 0, d2 = 0;
  for (int i = 0; i < 3; ++i) {
    e2 += (mp50(got[i]) - ref[i]) * (mp50(got[i]) - ref[i]);
    d2 += (ref[i] - mp50(launch.position[i])) * (ref[i] - mp50(launch.position[i]));
  }
  return double(sqrt(e2) / (1 + sqrt(d2)));
}

template <class T>
void at_step_lob(benchmark::State& state) {
  static const auto in = agents<T>();
  static std::vector<lob::stepped_flight<T>> built;
  if (built.empty())
    for (const auto& a : in) built.push_back(*lob::fly(engine<T>(), lob::medium<T>{}, a.launch));
  std::size_t i = 0;
  lob_bench::time_calls(state, [&] {
    const auto s = built[i].at_step(in[i].step);
    i = i + 1 == n_agents ? 0 : i + 1;
    return s->position.z();
  });
  double worst = 0;
  for (std::size_t k = 0; k < n_agents; ++k)
    worst = std::max(worst, rel_err(built[k].at_step(in[k].step)->position, exact_at(in[k].launch, in[k].step), in[k].launch));
  state.counters["max_rel_err"] = worst;
}

template <class T>
void at_step_loop(benchmark::State& state) {
  static const auto in = agents<T>();
  const lob::engine_step<T> rule = engine<T>();
  const T f = rule.factor();
  const lob::vec3<T> g = lob::medium<T>{}.gravity;
  auto run = [&](const agent<T>& a) {
    body<T> b{a.launch.position, a.launch.velocity};
    for (std::int64_t k = 0; k < a.step; ++k) b.step(rule.dt, f, g);
    return b.x;
  };
  lob_bench::time_cycling(state, in, [&](const agent<T>& a) { return run(a).z(); });
  double worst = 0;
  for (const auto& a : in) worst = std::max(worst, rel_err(run(a), exact_at(a.launch, a.step), a.launch));
  state.counters["max_rel_err"] = worst;
}

// The landing (the first step at or below the ground, and the interpolated point).
template <class T>
void landing_lob(benchmark::State& state) {
  static const auto in = agents<T>();
  static std::vector<lob::stepped_flight<T>> built;
  if (built.empty())
    for (const auto& a : in) built.push_back(*lob::fly(engine<T>(), lob::medium<T>{}, a.launch));
  std::size_t i = 0;
  lob_bench::time_calls(state, [&] {
    const auto c = built[i].landing(T(0));
    i = i + 1 == n_agents ? 0 : i + 1;
    return c->point.position.x();
  });
  double worst = 0;
  for (std::size_t k = 0; k < n_agents; ++k) {
    const auto c = built[k].landing(T(0));
    const auto a = exact_at(in[k].launch, c->step - 1), b = exact_at(in[k].launch, c->step);
    if (!(a[2] > 0 && b[2] <= 0)) worst = 1;  // the wrong step
    const mp50 s = a[2] / (a[2] - b[2]);
    std::array<mp50, 3> p;
    for (int j = 0; j < 3; ++j) p[j] = a[j] + s * (b[j] - a[j]);
    worst = std::max(worst, rel_err(c->point.position, p, in[k].launch));
  }
  state.counters["max_rel_err"] = worst;
}

template <class T>
void landing_loop(benchmark::State& state) {
  static const auto in = agents<T>();
  const lob::engine_step<T> rule = engine<T>();
  const T f = rule.factor();
  const lob::vec3<T> g = lob::medium<T>{}.gravity;
  lob_bench::time_cycling(state, in, [&](const agent<T>& a) {
    body<T> b{a.launch.position, a.launch.velocity};
    lob::vec3<T> before = b.x;
    for (int k = 0; k < 100000 && b.x.z() > T(0); ++k) {
      before = b.x;
      b.step(rule.dt, f, g);
    }
    const T s = before.z() / (before.z() - b.x.z());
    return T(before.x() + s * (b.x.x() - before.x()));
  });
}

// Aims at 25 m/s: lob's stepped aim, and lob's continuous aim for linear drag k = d (the
// engine's damping as a continuous rate), both flown by the engine's loop.
template <class T>
T engine_miss(const agent<T>& a, const lob::vec3<T>& v, T time) {
  const lob::engine_step<T> rule = engine<T>();
  body<T> b{a.launch.position, v};
  const T steps = time / rule.dt;
  const auto n = static_cast<std::int64_t>(std::floor(double(steps)));
  lob::vec3<T> before = b.x;
  for (std::int64_t k = 0; k <= n; ++k) {
    before = b.x;
    b.step(rule.dt, rule.factor(), lob::medium<T>{}.gravity);
  }
  const T s = T(steps - T(n));
  return T((before + (b.x - before) * s - a.target).norm());
}

template <class T>
void aim_stepped(benchmark::State& state) {
  static const auto in = agents<T>();
  auto run = [&](const agent<T>& a) {
    return lob::aim(engine<T>(), lob::medium<T>{},
                    lob::stepped_aim_request<T>{a.launch.position, a.target, T(25)});
  };
  lob_bench::time_cycling(state, in, [&](const agent<T>& a) { return run(a)->count(); });
  T worst = 0;
  for (const auto& a : in) {
    const auto s = run(a);
    if (s && s->flat) worst = std::max(worst, engine_miss(a, s->flat->solution.velocity, s->flat->solution.time_of_flight));
  }
  state.counters["miss_m"] = double(worst);
}

template <class T>
void aim_continuous(benchmark::State& state) {
  static const auto in = agents<T>();
  auto run = [&](const agent<T>& a) {
    return lob::aim(lob::linear_drag<T>{T(0.1)}, lob::medium<T>{}, lob::aim_request<T>{a.launch.position, a.target, T(25)});
  };
  lob_bench::time_cycling(state, in, [&](const agent<T>& a) { return run(a)->count(); });
  T worst = 0;
  for (const auto& a : in) {
    const auto s = run(a);
    if (s && s->flat) worst = std::max(worst, engine_miss(a, s->flat->velocity, s->flat->time_of_flight));
  }
  state.counters["miss_m"] = double(worst);
}

}  // namespace

BENCHMARK(at_step_lob<float>)->Name("step_at_step_float/lob");
BENCHMARK(at_step_loop<float>)->Name("step_at_step_float/engine_loop");
BENCHMARK(at_step_lob<double>)->Name("step_at_step_double/lob");
BENCHMARK(at_step_loop<double>)->Name("step_at_step_double/engine_loop");
BENCHMARK(landing_lob<float>)->Name("step_landing_float/lob");
BENCHMARK(landing_loop<float>)->Name("step_landing_float/engine_loop");
BENCHMARK(landing_lob<double>)->Name("step_landing_double/lob");
BENCHMARK(landing_loop<double>)->Name("step_landing_double/engine_loop");
BENCHMARK(aim_stepped<float>)->Name("step_aim_float/lob");
BENCHMARK(aim_continuous<float>)->Name("step_aim_float/lob_continuous_linear_drag");
BENCHMARK(aim_stepped<double>)->Name("step_aim_double/lob");
BENCHMARK(aim_continuous<double>)->Name("step_aim_double/lob_continuous_linear_drag");
