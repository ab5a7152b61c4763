// The hodograph fast path (lob/integrate/hodograph.hpp) against what a user would write
// instead, side by side in one run: the range of a ball of terminal speed 33 m/s
// (c = g / 33^2) launched at 40 m/s and 35 degrees over level ground, in still air.
//   quadratic_range_double/lob_hodograph            lob::detail::hodograph_crossing, double
//   quadratic_range_double/odeint_dopri5_1e-9_ref   Boost.Odeint runge_kutta_dopri5 with dense
//       output, rtol = atol = 1e-9, the landing located on its dense output by TOMS 748
//   quadratic_range_float/lob_hodograph             the same in float
//   quadratic_range_float/odeint_dopri5_1e-6_ref    odeint in float at 1e-6 (float cannot
//       hold 1e-9)
// Counter "max_rel_err": relative error of the range against the mpmath reference
// 82.10497222416477104478283 m (scripts/hodograph_reference.py's Taylor-series integration
// of the equations of motion at 30 and 36 digits, the same digits as row ball_vt33 of
// tests/data/integrate_quadratic_reference.csv from scripts/integrate_reference.py),
// computed once outside the timed loop.
#include <benchmark/benchmark.h>

#include <array>
#include <cmath>
#include <cstdint>

#include <boost/math/tools/toms748_solve.hpp>
#include <boost/numeric/odeint.hpp>

#include "lob/core/units.hpp"
#include "lob/integrate/hodograph.hpp"

namespace {

// Inputs read through volatile so that the optimiser cannot fold the computation.
volatile double hodograph_input_speed = 40.0;
volatile double hodograph_input_elevation_deg = 35.0;
volatile double hodograph_input_terminal_speed = 33.0;

constexpr long double hodograph_reference_range = 82.10497222416477104478283L;

template <class T>
struct ball_inputs {
  T c, g, v0, theta;
};

template <class T>
ball_inputs<T> read_ball() {
  const T g = lob::standard_gravity<T>();
  const T vt = static_cast<T>(hodograph_input_terminal_speed);
  return {T(g / (vt * vt)), g, static_cast<T>(hodograph_input_speed),
          lob::deg(static_cast<T>(hodograph_input_elevation_deg))};
}

template <class T>
double range_rel_err(T range) {
  return static_cast<double>(std::fabs(static_cast<long double>(range) - hodograph_reference_range) /
                             hodograph_reference_range);
}

template <class T>
T hodograph_range(const ball_inputs<T>& b) {
  const lob::result<lob::detail::hodograph_point<T>> p =
      lob::detail::hodograph_crossing(b.c, b.g, b.v0, b.theta, T(0), lob::side::falling);
  return p ? p->distance : T(NAN);
}

// What a user would write with Boost.Odeint: x, y, vx, vy under a = g - c |v| v, the
// controlled dense-output Dormand–Prince stepper, steps until the body is below the ground
// and falling, then TOMS 748 on the dense output for y = 0.
template <class T>
T odeint_range(const ball_inputs<T>& b, T tol) {
  namespace ode = boost::numeric::odeint;
  using state = std::array<T, 4>;
  const T c = b.c, g = b.g;
  const auto rhs = [c, g](const state& u, state& du, T) {
    const T s = std::sqrt(u[2] * u[2] + u[3] * u[3]);
    du[0] = u[2];
    du[1] = u[3];
    du[2] = -c * s * u[2];
    du[3] = -g - c * s * u[3];
  };
  auto stepper = ode::make_dense_output(tol, tol, ode::runge_kutta_dopri5<state, T>());
  stepper.initialize(state{T(0), T(0), b.v0 * std::cos(b.theta), b.v0 * std::sin(b.theta)}, T(0),
                     T(1) / T(100));
  for (int i = 0; i < 100000; ++i) {
    stepper.do_step(rhs);
    const state& now = stepper.current_state();
    if (now[1] < T(0) && now[3] < T(0)) break;
  }
  state tmp;
  const auto height = [&](T t) {
    stepper.calc_state(t, tmp);
    return tmp[1];
  };
  std::uintmax_t iterations = 60;
  const std::pair<T, T> r =
      boost::math::tools::toms748_solve(height, stepper.previous_time(), stepper.current_time(),
                                        boost::math::tools::eps_tolerance<T>(), iterations);
  stepper.calc_state((r.first + r.second) / 2, tmp);
  return tmp[0];
}

template <class T>
void BM_hodograph_range(benchmark::State& state) {
  T r = 0;
  for (auto _ : state) {
    r = hodograph_range(read_ball<T>());
    benchmark::DoNotOptimize(r);
  }
  state.counters["max_rel_err"] = range_rel_err(hodograph_range(read_ball<T>()));
}

template <class T>
void BM_odeint_range(benchmark::State& state, double tol) {
  T r = 0;
  for (auto _ : state) {
    r = odeint_range(read_ball<T>(), T(tol));
    benchmark::DoNotOptimize(r);
  }
  state.counters["max_rel_err"] = range_rel_err(odeint_range(read_ball<T>(), T(tol)));
}

void BM_odeint_range_double(benchmark::State& state) { BM_odeint_range<double>(state, 1e-9); }
void BM_odeint_range_float(benchmark::State& state) { BM_odeint_range<float>(state, 1e-6); }

}  // namespace

BENCHMARK_TEMPLATE(BM_hodograph_range, double)->Name("quadratic_range_double/lob_hodograph");
BENCHMARK(BM_odeint_range_double)->Name("quadratic_range_double/odeint_dopri5_1e-9_ref");
BENCHMARK_TEMPLATE(BM_hodograph_range, float)->Name("quadratic_range_float/lob_hodograph");
BENCHMARK(BM_odeint_range_float)->Name("quadratic_range_float/odeint_dopri5_1e-6_ref");
