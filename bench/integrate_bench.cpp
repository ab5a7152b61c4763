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
// the 25-digit mpmath reference of ball_vt33.hpp, computed outside the timed loop.
#include <benchmark/benchmark.h>

#include <array>
#include <cmath>
#include <vector>

#include "ball_vt33.hpp"
#include "lob/lob.hpp"
#include "odeint_landing.hpp"
#include "runner.hpp"

namespace {

struct ball {
  double c;
  double vx, vz;
};

ball read_inputs() {
  const double g = lob::standard_gravity<double>();
  const double vt = lob_bench::ball_terminal_speed;
  const double v0 = lob_bench::ball_speed;
  const double th = lob::deg(double(lob_bench::ball_elevation_deg));
  return {g / (vt * vt), v0 * std::cos(th), v0 * std::sin(th)};
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

// Boost.Odeint (odeint_landing.hpp): the 3-D state x, y, z, vx, vy, vz, stepped until the
// height is no longer positive.
template <class State>
double odeint_range(const ball& b, double tol) {
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
  const lob_bench::odeint_setup<double> setup{tol, 0.01, 100000, 2, {}, 100};
  const auto l = lob_bench::odeint_landing(rhs, State{0, 0, 0, b.vx, 0, b.vz}, setup,
                                           [](const State& now) { return now[2] <= 0; });
  return std::isnan(l.time) ? NAN : std::hypot(l.state[0], l.state[1]);
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

template <class Range>
void run(benchmark::State& state, Range range) {
  lob_bench::time_and_measure_one(
      state, [range] { return range(read_inputs()); }, &lob_bench::ball_range_rel_err<double>, "max_rel_err");
}

void run_lob(benchmark::State& state, const lob::flight_options<double>& o) {
  run(state, [&o](const ball& b) { return lob_range(b, o); });
}

void BM_lob_hodograph(benchmark::State& state) { run_lob(state, lob::flight_options<double>{}); }
void BM_lob_adaptive(benchmark::State& state, double tol) { run_lob(state, adaptive(tol)); }
void BM_odeint(benchmark::State& state, double tol) {
  run(state, [tol](const ball& b) { return odeint_range<std::array<double, 6>>(b, tol); });
}
void BM_odeint_vector(benchmark::State& state, double tol) {
  run(state, [tol](const ball& b) { return odeint_range<std::vector<double>>(b, tol); });
}
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
  run(state, [](const ball& b) { return engine_range(b); });
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
