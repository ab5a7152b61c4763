// The hodograph fast path (lob/integrate/hodograph.hpp) against what a user would write
// instead, side by side in one run: the range of a ball of terminal speed 33 m/s
// (c = g / 33^2) launched at 40 m/s and 35 degrees over level ground, in still air.
//   quadratic_range_double/lob_hodograph            lob::detail::hodograph_crossing, double
//   quadratic_range_double/odeint_dopri5_1e-9_ref   Boost.Odeint runge_kutta_dopri5 with dense
//       output, rtol = atol = 1e-9, the landing located on its dense output by TOMS 748
//   quadratic_range_float/lob_hodograph             the same in float
//   quadratic_range_float/odeint_dopri5_1e-6_ref    odeint in float at 1e-6 (float cannot
//       hold 1e-9)
// Counter "max_rel_err": relative error of the range against the mpmath reference of
// ball_vt33.hpp, computed once outside the timed loop.
#include <benchmark/benchmark.h>

#include <array>
#include <cmath>

#include "ball_vt33.hpp"
#include "lob/core/units.hpp"
#include "lob/integrate/hodograph.hpp"
#include "odeint_landing.hpp"
#include "runner.hpp"

namespace {

template <class T>
struct ball_inputs {
  T c, g, v0, theta;
};

template <class T>
ball_inputs<T> read_ball() {
  const T g = lob::standard_gravity<T>();
  const T vt = static_cast<T>(lob_bench::ball_terminal_speed);
  return {T(g / (vt * vt)), g, static_cast<T>(lob_bench::ball_speed),
          lob::deg(static_cast<T>(lob_bench::ball_elevation_deg))};
}

template <class T>
T hodograph_range(const ball_inputs<T>& b) {
  const lob::result<lob::detail::hodograph_point<T>> p =
      lob::detail::hodograph_crossing(b.c, b.g, b.v0, b.theta, T(0), lob::side::falling);
  return p ? p->distance : T(NAN);
}

// What a user would write with Boost.Odeint: x, y, vx, vy under a = g - c |v| v, stepped
// until the body is below the ground and falling (odeint_landing.hpp).
template <class T>
T odeint_range(const ball_inputs<T>& b, T tol) {
  using state = std::array<T, 4>;
  const T c = b.c, g = b.g;
  const auto rhs = [c, g](const state& u, state& du, T) {
    const T s = std::sqrt(u[2] * u[2] + u[3] * u[3]);
    du[0] = u[2];
    du[1] = u[3];
    du[2] = -c * s * u[2];
    du[3] = -g - c * s * u[3];
  };
  const lob_bench::odeint_setup<T> setup{tol, T(1) / T(100), 100000, 1, {}, 60};
  return lob_bench::odeint_landing(rhs, state{T(0), T(0), b.v0 * std::cos(b.theta), b.v0 * std::sin(b.theta)},
                                   setup, [](const state& now) { return now[1] < T(0) && now[3] < T(0); })
      .state[0];
}

template <class T>
void BM_hodograph_range(benchmark::State& state) {
  lob_bench::time_and_measure_one(
      state, [] { return hodograph_range(read_ball<T>()); }, &lob_bench::ball_range_rel_err<T>, "max_rel_err");
}

template <class T>
void BM_odeint_range(benchmark::State& state, double tol) {
  lob_bench::time_and_measure_one(
      state, [tol] { return odeint_range(read_ball<T>(), T(tol)); }, &lob_bench::ball_range_rel_err<T>,
      "max_rel_err");
}

void BM_odeint_range_double(benchmark::State& state) { BM_odeint_range<double>(state, 1e-9); }
void BM_odeint_range_float(benchmark::State& state) { BM_odeint_range<float>(state, 1e-6); }

}  // namespace

BENCHMARK_TEMPLATE(BM_hodograph_range, double)->Name("quadratic_range_double/lob_hodograph");
BENCHMARK(BM_odeint_range_double)->Name("quadratic_range_double/odeint_dopri5_1e-9_ref");
BENCHMARK_TEMPLATE(BM_hodograph_range, float)->Name("quadratic_range_float/lob_hodograph");
BENCHMARK(BM_odeint_range_float)->Name("quadratic_range_float/odeint_dopri5_1e-6_ref");
