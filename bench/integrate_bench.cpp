// Range of a quadratic-drag flight (a ball of terminal speed 33 m/s, launched at 40 m/s and
// 35 degrees from the ground, still air) by lob's paths and by what a user would use
// instead, side by side in one run:
//   lob_fly_hodograph        lob::fly() with default options (the hodograph fast path, through
//                            fly() and the 3-D state; engineer "hodograph"s lob_hodograph row
//                            times the quadrature alone)
//   lob_adaptive_<tol>       lob's Dormand–Prince 5(4) path, rtol = atol = tol
//   odeint_dopri5_<tol>      Boost.Odeint runge_kutta_dopri5 with dense output at the same
//                            tolerances, the landing located on its dense output by TOMS 748
//   odeint_dopri5_vector_1e-9  the same with std::vector<double> state, as odeint's own
//                            tutorials write it (context; the std::array peer is the fair one)
//   lob_semi_implicit_euler_60hz   lob's fixed-step mode at 1/60 s (landing on the Hermite
//                            interpolant between steps)
//   semi_implicit_euler_60hz the loop as game engines step it at 1/60 s, the landing
//                            interpolated linearly between the last two steps
//
// Names are "<group>/<variant>"; bench/ratio_table.py prints each variant's time relative
// to the group's "lob" variant. Counter "max_rel_err": relative error of the range against
// the 25-digit mpmath reference, row ball_vt33 of tests/data/integrate_quadratic_reference.csv
// (scripts/integrate_reference.py: mpmath odefun at 40 digits, checked at 50), computed
// before timing.
#include <benchmark/benchmark.h>

#include <array>
#include <cmath>
#include <cstdint>
#include <vector>

#include <boost/math/tools/toms748_solve.hpp>
#include <boost/numeric/odeint.hpp>

#include "lob/lob.hpp"

namespace {

// Inputs read through volatile so that the optimiser cannot fold the computation.
volatile double input_speed = 40.0;
volatile double input_elevation_deg = 35.0;
volatile double input_terminal_speed = 33.0;

// Range [m] of row ball_vt33 (c = g / 33^2, g = 9.80665) from the mpmath reference.
constexpr long double reference_range = 82.10497222416477104478283L;

struct ball {
  double c;
  double vx, vz;
};

ball read_inputs() {
  const double g = lob::standard_gravity<double>();
  const double vt = input_terminal_speed;
  const double v0 = input_speed;
  const double th = lob::deg(double(input_elevation_deg));
  return {g / (vt * vt), v0 * std::cos(th), v0 * std::sin(th)};
}

double rel_err(double value) {
  return static_cast<double>(std::fabs(static_cast<long double>(value) - reference_range) / reference_range);
}

// lob, through fly() (default options: the hodograph fast path).
double lob_range(const ball& b, const lob::flight_options<double>& o) {
  const lob::quadratic_drag<double> m{.coefficient = b.c};
  lob::shot<double> s;
  s.velocity = lob::vec3<double>(b.vx, 0.0, b.vz);
  const auto f = lob::fly(m, lob::medium<double>{}, s, o);
  if (!f) return NAN;
  return f->range().value_or(NAN);
}

lob::flight_options<double> adaptive(double tol) {
  lob::flight_options<double> o;
  o.relative_tolerance = tol;
  o.absolute_tolerance = tol;
  o.use_fast_paths = false;
  return o;
}

void run_lob(benchmark::State& state, const lob::flight_options<double>& o) {
  double r = 0;
  for (auto _ : state) {
    r = lob_range(read_inputs(), o);
    benchmark::DoNotOptimize(r);
  }
  state.counters["max_rel_err"] = rel_err(lob_range(read_inputs(), o));
}

// Boost.Odeint: the dense-output Dormand–Prince stepper, stepped until the height turns
// negative, then the landing located on its dense output (calc_state) with TOMS 748.
using odeint_state = std::array<double, 6>;

template <class State = odeint_state>
double odeint_range(const ball& b, double tol) {
  namespace odeint = boost::numeric::odeint;
  const double g = lob::standard_gravity<double>();
  const auto rhs = [&](const State& x, State& dx, double) {
    const double s = std::sqrt(x[3] * x[3] + x[4] * x[4] + x[5] * x[5]);
    dx[0] = x[3];
    dx[1] = x[4];
    dx[2] = x[5];
    dx[3] = -b.c * s * x[3];
    dx[4] = -b.c * s * x[4];
    dx[5] = -b.c * s * x[5] - g;
  };
  auto stepper = odeint::make_dense_output(tol, tol, odeint::runge_kutta_dopri5<State>());
  stepper.initialize(State{0, 0, 0, b.vx, 0, b.vz}, 0.0, 0.01);
  for (int i = 0; i < 100000; ++i) {
    stepper.do_step(rhs);
    if (stepper.current_state()[2] <= 0 && stepper.current_time() > 0) {
      State x = stepper.current_state();
      const auto height = [&](double t) {
        stepper.calc_state(t, x);
        return x[2];
      };
      std::uintmax_t it = 100;
      const auto r =
          boost::math::tools::toms748_solve(height, stepper.previous_time(), stepper.current_time(),
                                            boost::math::tools::eps_tolerance<double>(), it);
      stepper.calc_state((r.first + r.second) / 2, x);
      return std::hypot(x[0], x[1]);
    }
  }
  return NAN;
}

template <class State>
void run_odeint(benchmark::State& state, double tol) {
  double r = 0;
  for (auto _ : state) {
    r = odeint_range<State>(read_inputs(), tol);
    benchmark::DoNotOptimize(r);
  }
  state.counters["max_rel_err"] = rel_err(odeint_range<State>(read_inputs(), tol));
}

// Semi-implicit Euler as an engine steps it: velocity first, then position, at 60 Hz;
// the landing between the last two steps by a straight line.
double engine_range(const ball& b) {
  const double g = lob::standard_gravity<double>();
  const double h = 1.0 / 60.0;
  double x = 0, z = 0, vx = b.vx, vz = b.vz;
  for (int i = 0; i < 100000; ++i) {
    const double s = std::sqrt(vx * vx + vz * vz);
    vx += h * (-b.c * s * vx);
    vz += h * (-b.c * s * vz - g);
    const double x1 = x + h * vx;
    const double z1 = z + h * vz;
    if (z1 <= 0) return x + (x1 - x) * (z / (z - z1));
    x = x1;
    z = z1;
  }
  return NAN;
}

void BM_lob_hodograph(benchmark::State& state) { run_lob(state, lob::flight_options<double>{}); }
void BM_lob_adaptive(benchmark::State& state, double tol) { run_lob(state, adaptive(tol)); }
void BM_odeint(benchmark::State& state, double tol) { run_odeint<odeint_state>(state, tol); }
void BM_odeint_vector(benchmark::State& state, double tol) { run_odeint<std::vector<double>>(state, tol); }
void BM_lob_euler(benchmark::State& state) {
  lob::flight_options<double> o;
  o.method = lob::stepper::semi_implicit_euler;
  o.fixed_step = 1.0 / 60.0;
  run_lob(state, o);
}
void BM_lob_rk4(benchmark::State& state) {
  lob::flight_options<double> o;
  o.method = lob::stepper::rk4;
  o.fixed_step = 1.0 / 60.0;
  run_lob(state, o);
}
void BM_engine(benchmark::State& state) {
  double r = 0;
  for (auto _ : state) {
    r = engine_range(read_inputs());
    benchmark::DoNotOptimize(r);
  }
  state.counters["max_rel_err"] = rel_err(engine_range(read_inputs()));
}

BENCHMARK(BM_lob_hodograph)->Name("quadratic_range_double/lob_fly_hodograph");
BENCHMARK_CAPTURE(BM_lob_adaptive, 6, 1e-6)->Name("quadratic_range_double/lob_adaptive_1e-6");
BENCHMARK_CAPTURE(BM_lob_adaptive, 9, 1e-9)->Name("quadratic_range_double/lob_adaptive_1e-9");
BENCHMARK_CAPTURE(BM_lob_adaptive, 12, 1e-12)->Name("quadratic_range_double/lob_adaptive_1e-12");
BENCHMARK_CAPTURE(BM_odeint, 6, 1e-6)->Name("quadratic_range_double/odeint_dopri5_1e-6");
BENCHMARK_CAPTURE(BM_odeint, 9, 1e-9)->Name("quadratic_range_double/odeint_dopri5_1e-9");
BENCHMARK_CAPTURE(BM_odeint, 12, 1e-12)->Name("quadratic_range_double/odeint_dopri5_1e-12");
BENCHMARK_CAPTURE(BM_odeint_vector, 9, 1e-9)->Name("quadratic_range_double/odeint_dopri5_vector_1e-9");
BENCHMARK(BM_lob_euler)->Name("quadratic_range_double/lob_semi_implicit_euler_60hz");
BENCHMARK(BM_lob_rk4)->Name("quadratic_range_double/lob_rk4_60hz");
BENCHMARK(BM_engine)->Name("quadratic_range_double/semi_implicit_euler_60hz");

}  // namespace
