// solve/: aim and farthest elevation per call, for vacuum, linear and quadratic drag, side
// by side with the brute-force way a user would do it without lob: scan the elevation at
// 0.1 degree steps, each trial integrated with Boost.Odeint's Dormand–Prince 5(4) with
// dense output, then refine the bracketing step by bisection. Accuracy counters are
// measured after the timed loop against the same yardstick for both: the exact flight
// (vacuum, linear drag) or lob's integrated flight at relative tolerance 1e-13
// (quadratic drag).
#include <benchmark/benchmark.h>

#include <array>
#include <cmath>
#include <cstddef>
#include <optional>
#include <random>
#include <span>
#include <string>

#include <boost/numeric/odeint.hpp>

#include "lob/lob.hpp"
#include "runner.hpp"

namespace {

namespace odeint = boost::numeric::odeint;
using vec = lob::vec3<double>;

constexpr std::size_t problem_count = 64;
constexpr double aim_speed = 45.0;
constexpr double linear_rate = 0.08;         // 1/s
constexpr double quadratic_coefficient = 0.004;  // 1/m

struct target_set {
  std::array<vec, problem_count> targets;
};

// Reachable targets for all three models at aim_speed: 15..90 m away, -10..+15 m up.
const target_set& targets() {
  static const target_set set = [] {
    target_set s;
    std::mt19937_64 rng(424242);
    std::uniform_real_distribution<double> dist(15.0, 90.0);
    std::uniform_real_distribution<double> bearing(-3.0, 3.0);
    std::uniform_real_distribution<double> rise(-10.0, 15.0);
    for (vec& t : s.targets) {
      const double d = dist(rng);
      const double b = bearing(rng);
      t = vec(d * std::cos(b), d * std::sin(b), rise(rng));
    }
    return s;
  }();
  return set;
}

// ---- the brute-force peer -------------------------------------------------------------

using ode_state = std::array<double, 6>;

struct ode_model {
  int kind;  // 0 vacuum, 1 linear, 2 quadratic
  void operator()(const ode_state& y, ode_state& dy, double) const {
    const double vx = y[3], vy = y[4], vz = y[5];
    double ax = 0, ay = 0, az = -lob::standard_gravity<double>();
    if (kind == 1) {
      ax -= linear_rate * vx;
      ay -= linear_rate * vy;
      az -= linear_rate * vz;
    } else if (kind == 2) {
      const double s = std::sqrt(vx * vx + vy * vy + vz * vz);
      ax -= quadratic_coefficient * s * vx;
      ay -= quadratic_coefficient * s * vy;
      az -= quadratic_coefficient * s * vz;
    }
    dy = {vx, vy, vz, ax, ay, az};
  }
};

// The state where reached(state) first holds after a step, by dense-output stepping and 60
// bisections in time on the interpolant, where crossed(state) tells the sides apart; none if
// not by 60 s.
template <class Reached, class Crossed>
std::optional<ode_state> ode_first(int kind, const ode_state& start, Reached reached, Crossed crossed) {
  auto stepper = odeint::make_dense_output(1e-10, 1e-10, odeint::runge_kutta_dopri5<ode_state>());
  stepper.initialize(start, 0.0, 0.01);
  const ode_model rhs{kind};
  for (int i = 0; i < 100000 && stepper.current_time() < 60.0; ++i) {
    stepper.do_step(rhs);
    if (!reached(stepper.current_state())) continue;
    double lo = stepper.previous_time(), hi = stepper.current_time();
    ode_state mid;
    for (int k = 0; k < 60 && hi - lo > 1e-14; ++k) {
      const double t = 0.5 * (lo + hi);
      stepper.calc_state(t, mid);
      (crossed(mid) ? hi : lo) = t;
    }
    stepper.calc_state(hi, mid);
    return mid;
  }
  return std::nullopt;
}

// Height minus target height where the horizontal distance first reaches d; -1e9 if not
// reached by 60 s.
double ode_miss(int kind, double elevation, double azimuth, double d, double target_h) {
  const double c = std::cos(elevation);
  const ode_state y{0, 0, 0, aim_speed * c * std::cos(azimuth), aim_speed * c * std::sin(azimuth),
                    aim_speed * std::sin(elevation)};
  const auto far_enough = [d](const ode_state& x) { return std::hypot(x[0], x[1]) >= d; };
  const std::optional<ode_state> at = ode_first(kind, y, far_enough, far_enough);
  return at ? (*at)[2] - target_h : -1e9;
}

struct ode_aim {
  double flat = NAN, lofted = NAN, azimuth = 0;
};

// Scan elevations from the line of sight to 89.9 degrees at 0.1 degree, then bisect
// each sign change of the miss 50 times (0.1 degree / 2^50 ~ 1.6e-18 rad).
ode_aim ode_scan_aim(int kind, const vec& target) {
  const double d = std::hypot(target.x(), target.y());
  const double az = std::atan2(target.y(), target.x());
  const double step = 0.1 * M_PI / 180;
  const double sight = std::atan2(target.z(), d);
  ode_aim out;
  out.azimuth = az;
  double prev_e = sight, prev_f = ode_miss(kind, sight, az, d, target.z());
  int found = 0;
  for (double e = sight + step; e < 89.95 * M_PI / 180 && found < 2; e += step) {
    const double f = ode_miss(kind, e, az, d, target.z());
    if ((f > 0) != (prev_f > 0)) {
      double lo = prev_e, hi = e, f_lo = prev_f;
      for (int k = 0; k < 50; ++k) {
        const double m = 0.5 * (lo + hi);
        const double fm = ode_miss(kind, m, az, d, target.z());
        if ((fm > 0) == (f_lo > 0)) {
          lo = m;
          f_lo = fm;
        } else {
          hi = m;
        }
      }
      (found == 0 ? out.flat : out.lofted) = 0.5 * (lo + hi);
      ++found;
    }
    prev_e = e;
    prev_f = f;
  }
  return out;
}

// Horizontal distance where the body comes down through landing_h; 0 if not by 60 s.
double ode_range(int kind, double elevation, double landing_h) {
  const ode_state y{0, 0, 0, aim_speed * std::cos(elevation), 0, aim_speed * std::sin(elevation)};
  const std::optional<ode_state> at =
      ode_first(kind, y, [landing_h](const ode_state& x) { return x[5] < 0 && x[2] <= landing_h; },
                [landing_h](const ode_state& x) { return x[2] <= landing_h; });
  return at ? std::hypot((*at)[0], (*at)[1]) : 0;
}

// Scan 0.1..89.9 degrees at 0.1 degree for the longest range, then bisect on the sign of
// the range's slope (central difference, 1e-7 rad) 40 times inside the best step's
// neighbours.
double ode_scan_farthest(int kind, double landing_h) {
  const double step = 0.1 * M_PI / 180;
  double best_e = step, best_r = -1;
  for (double e = step; e < 89.95 * M_PI / 180; e += step) {
    const double r = ode_range(kind, e, landing_h);
    if (r > best_r) {
      best_r = r;
      best_e = e;
    }
  }
  double lo = best_e - step, hi = best_e + step;
  for (int k = 0; k < 40; ++k) {
    const double m = 0.5 * (lo + hi);
    const double slope = ode_range(kind, m + 1e-7, landing_h) - ode_range(kind, m - 1e-7, landing_h);
    (slope > 0 ? lo : hi) = m;
  }
  return 0.5 * (lo + hi);
}

// ---- yardsticks -----------------------------------------------------------------------

lob::flight_options<double> reference_options() {
  lob::flight_options<double> o;
  o.relative_tolerance = 1e-13;
  o.absolute_tolerance = 1e-13;
  return o;
}

// |height at the target's distance - target height| [m], flown with the reference.
template <class M>
double true_miss(const M& model, double elevation, double azimuth, const vec& target) {
  const lob::medium<double> air;
  const vec v = lob::launch_velocity(aim_speed, elevation, azimuth);
  const auto f = lob::fly(model, air, lob::shot<double>{vec::Zero(), v}, reference_options());
  if (!f) return INFINITY;
  const auto s = f->at_distance(std::hypot(target.x(), target.y()));
  if (!s) return INFINITY;
  return (s->position - target).norm();
}

template <class M>
double true_range(const M& model, double elevation, double landing_h) {
  const lob::medium<double> air;
  const auto f =
      lob::fly(model, air, lob::shot<double>{vec::Zero(), lob::launch_velocity(aim_speed, elevation)},
               reference_options());
  if (!f) return 0;
  const auto r = f->range(landing_h);
  return r ? *r : 0.0;
}

// The farthest range found by a tight reference maximisation (Brent on the reference
// flight), for the relative range error of each method.
template <class M>
double reference_best_range(const M& model, double landing_h) {
  std::uintmax_t it = 500;
  const auto r = boost::math::tools::brent_find_minima(
      [&](double e) { return -true_range(model, e, landing_h); }, 0.0, 1.5, 26, it);
  return -r.second;
}

// ---- benchmarks -----------------------------------------------------------------------

// lob's integrated flights at the peer's tolerance (1e-10), so that accuracy compares
// like with like; closed forms ignore it.
lob::solve_options<double> lob_options() {
  lob::solve_options<double> o;
  o.flight.relative_tolerance = 1e-10;
  o.flight.absolute_tolerance = 1e-10;
  return o;
}

template <class M>
void aim_lob(benchmark::State& state, M model) {
  const lob::medium<double> air;
  const lob::solve_options<double> opts = lob_options();
  const auto& set = targets().targets;
  const auto aim = [&](const vec& t) {
    return lob::aim(model, air, lob::aim_request<double>{vec::Zero(), t, aim_speed}, opts);
  };
  int failures = 0;
  lob_bench::time_cycling(state, set, [&](const vec& t) {
    auto s = aim(t);
    if (!s) ++failures;
    return s;
  });
  state.counters["max_miss_m"] = lob_bench::worst_error(set, aim, [&](std::size_t i, const auto& s) {
    if (!s || s->count() != 2) return double(INFINITY);
    return std::max(true_miss(model, s->flat->elevation, s->flat->azimuth, set[i]),
                    true_miss(model, s->lofted->elevation, s->lofted->azimuth, set[i]));
  });
  state.counters["failures"] = failures;
}

template <class M>
void aim_odeint(benchmark::State& state, M model, int kind) {
  const auto& set = targets().targets;
  const auto scan = [kind](const vec& t) { return ode_scan_aim(kind, t); };
  lob_bench::time_cycling(state, set, scan);
  // The scan is slow; the first 8 targets judge it.
  state.counters["max_miss_m"] =
      lob_bench::worst_error(std::span(set).first(8), scan, [&](std::size_t i, const ode_aim& a) {
        return std::max(true_miss(model, a.flat, a.azimuth, set[i]), true_miss(model, a.lofted, a.azimuth, set[i]));
      });
}

constexpr std::array<double, 4> landing_heights{0.0, -12.0, 5.0, -2.5};

// |range at the elevation found - the best range| / the best range, at landing_heights[i].
template <class M>
auto farthest_error(const M& model) {
  return [&model](std::size_t i, double elevation) {
    const double h = landing_heights[i];
    const double best = reference_best_range(model, h);
    return std::abs(true_range(model, elevation, h) - best) / best;
  };
}

template <class M>
void farthest_lob(benchmark::State& state, M model) {
  const lob::medium<double> air;
  const lob::solve_options<double> opts = lob_options();
  lob_bench::time_and_measure(
      state, landing_heights,
      [&](double h) {
        return lob::farthest_elevation(model, air, lob::farthest_request<double>{vec::Zero(), aim_speed, 0.0, h},
                                       opts);
      },
      [&](std::size_t i, const auto& s) { return s ? farthest_error(model)(i, s->elevation) : double(INFINITY); },
      "max_rel_err");
}

template <class M>
void farthest_odeint(benchmark::State& state, M model, int kind) {
  lob_bench::time_and_measure(
      state, landing_heights, [kind](double h) { return ode_scan_farthest(kind, h); }, farthest_error(model),
      "max_rel_err");
}

const lob::vacuum<double> vacuum_model{};
const lob::linear_drag<double> linear_model{linear_rate};
const lob::quadratic_drag<double> quadratic_model{quadratic_coefficient};

// "<task>_<model>_double/lob" and ".../odeint_scan_bisect" (a fixed count of iterations: the
// scan takes seconds).
template <class M, class Lob, class Peer>
void register_pair(const std::string& group, M model, int kind, Lob lob_body, Peer peer_body,
                   benchmark::IterationCount peer_iterations) {
  benchmark::RegisterBenchmark((group + "/lob").c_str(),
                               [model, lob_body](benchmark::State& st) { lob_body(st, model); });
  benchmark::RegisterBenchmark((group + "/odeint_scan_bisect").c_str(),
                               [model, kind, peer_body](benchmark::State& st) { peer_body(st, model, kind); })
      ->Iterations(peer_iterations);
}

template <class M>
void register_aim(const char* name, M model, int kind) {
  register_pair(std::string("aim_") + name + "_double", model, kind, &aim_lob<M>, &aim_odeint<M>, 20);
}

template <class M>
void register_farthest(const char* name, M model, int kind) {
  register_pair(std::string("farthest_") + name + "_double", model, kind, &farthest_lob<M>, &farthest_odeint<M>,
                8);
}

const int registered = [] {
  register_aim("vacuum", vacuum_model, 0);
  register_aim("linear", linear_model, 1);
  register_aim("quadratic", quadratic_model, 2);
  register_farthest("vacuum", vacuum_model, 0);
  register_farthest("linear", linear_model, 1);
  register_farthest("quadratic", quadratic_model, 2);
  return 0;
}();

}  // namespace
