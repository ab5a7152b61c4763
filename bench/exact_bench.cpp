// The exact path (lob::linear_flight for vacuum and linear drag) against what a user would
// write instead: the textbook closed forms written plainly (for linear drag the Lambert W
// flight time of Warburton & Wang, Am. J. Phys. 72 (2004), and Packel & Yuen, College
// Math. J. 35 (2004)) and Boost.Odeint's runge_kutta_dopri5 with dense output at
// rtol = atol = 1e-12, the landing located on the dense output by TOMS 748.
//
// Names are "<group>/<variant>"; bench/ratio_table.py prints each variant's time relative
// to the group's "lob" variant. Every benchmark carries "max_rel_err": its largest relative
// error over the same inputs against a reference computed before timing from the explicit
// solution z(t) in 50 digits with bracketing roots (no Lambert W, nothing from lob).
// Variants: "lob" asks a flight built beforehand (the per-call cost of the query: a
// trajectory is validated once and then questioned many times); "lob_with_make" builds the
// flight from the inputs and asks, the cost a caller with new inputs every call pays. The
// naive forms always start from the inputs.
#include <benchmark/benchmark.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include <boost/math/special_functions/lambert_w.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>

#include "lob/lob.hpp"
#include "odeint_landing.hpp"
#include "runner.hpp"

namespace {

using mp50 = boost::multiprecision::cpp_bin_float_50;
constexpr std::size_t n_cases = 256;  // cycled through by every benchmark

// A still-air launch from (0, 0, z0) in the x-z plane, landing at absolute height 0.
struct input {
  double k, ux, vz, z0, t_query;
};

// Reference values for one input from the explicit solution in 50 digits.
struct truth {
  mp50 land_time, range, land_speed, apex_time, apex_height;
  mp50 at_pos[2], at_vel[2];  // x and z at t_query
};

struct explicit_path {
  mp50 k, g, ux, vz;
  void at(const mp50& t, mp50& x, mp50& z, mp50& vx, mp50& vzt) const {
    if (k == 0) {
      x = ux * t;
      z = vz * t - g * t * t / 2;
      vx = ux;
      vzt = vz - g * t;
      return;
    }
    const mp50 e = exp(mp50(-k * t));
    x = ux * (1 - e) / k;
    z = vz * (1 - e) / k - g * (t / k - (1 - e) / (k * k));
    vx = ux * e;
    vzt = vz * e - g * (1 - e) / k;
  }
};

template <class F>
mp50 bracket_root(F f, const mp50& lo, const mp50& hi) {
  std::uintmax_t iterations = 300;
  const std::pair<mp50, mp50> r =
      boost::math::tools::toms748_solve(f, lo, hi, boost::math::tools::eps_tolerance<mp50>(150), iterations);
  return (r.first + r.second) / 2;
}

template <class T>
truth reference(const input& in) {
  // The inputs as T holds them: the reference is for exactly what the benchmark flies.
  const explicit_path p{mp50(T(in.k)), mp50(lob::standard_gravity<T>()), mp50(T(in.ux)), mp50(T(in.vz))};
  const mp50 z0(T(in.z0));
  mp50 x, z, vx, vzt;
  truth r;
  if (p.vz > 0) {
    mp50 hi = 1;
    for (p.at(hi, x, z, vx, vzt); vzt > 0; p.at(hi, x, z, vx, vzt)) hi *= 2;
    r.apex_time = bracket_root([&](const mp50& t) { p.at(t, x, z, vx, vzt); return vzt; }, mp50(0), hi);
    p.at(r.apex_time, x, z, vx, vzt);
    r.apex_height = z0 + z;
  } else {
    r.apex_time = 0;
    r.apex_height = z0;
  }
  const auto height = [&](const mp50& t) { p.at(t, x, z, vx, vzt); return mp50(z0 + z); };
  mp50 lo = r.apex_time, hi = r.apex_time + 1;
  while (height(hi) >= 0) {
    lo = hi;
    hi = r.apex_time + 2 * (hi - r.apex_time);
  }
  r.land_time = bracket_root(height, lo, hi);
  p.at(r.land_time, x, z, vx, vzt);
  r.range = abs(x);
  r.land_speed = sqrt(mp50(vx * vx + vzt * vzt));
  p.at(mp50(T(in.t_query)), x, z, vx, vzt);
  r.at_pos[0] = x;
  r.at_pos[1] = z0 + z;
  r.at_vel[0] = vx;
  r.at_vel[1] = vzt;
  return r;
}

// Input sets: "typical" (k log-uniform in [1e-3, 10] 1/s, speeds 5 .. 300 m/s, elevations
// -10 .. 80 degrees, launch heights 0 .. 10 m), "vacuum" (the same with k = 0) and
// "weak" sets with k v_z/g fixed at 1e-6 or 1e-9 (the textbook form's bad corner).
enum class set { typical, vacuum, weak6, weak9 };

std::vector<input> make_inputs(set which) {
  std::mt19937_64 rng(which == set::typical ? 11 : which == set::vacuum ? 12 : which == set::weak6 ? 13 : 14);
  std::uniform_real_distribution<double> u(0, 1);
  std::vector<input> v(n_cases);
  for (input& in : v) {
    const double speed = 5 + 295 * u(rng);
    const bool weak = which == set::weak6 || which == set::weak9;
    const double el = (weak ? 10 + 70 * u(rng) : -10 + 90 * u(rng)) * 3.14159265358979323846 / 180;
    in.ux = speed * std::cos(el);
    in.vz = speed * std::sin(el);
    in.z0 = 10 * u(rng);
    switch (which) {
      case set::typical: in.k = std::pow(10.0, -3 + 4 * u(rng)); break;
      case set::vacuum: in.k = 0; break;
      case set::weak6: in.k = 1e-6 * 9.80665 / in.vz; break;
      case set::weak9: in.k = 1e-9 * 9.80665 / in.vz; break;
    }
    in.t_query = 0;
  }
  return v;
}

template <class T>
struct prepared {
  std::vector<input> in;
  std::vector<truth> ref;
};

template <class T>
const prepared<T>& data(set which) {
  // Built once per set and type, before any timing; read-only afterwards.
  static prepared<T> sets[4];
  prepared<T>& p = sets[static_cast<int>(which)];
  if (p.in.empty()) {
    p.in = make_inputs(which);
    for (input& in : p.in) {
      in.t_query = static_cast<double>(T(static_cast<double>(reference<T>(in).land_time) * 0.6));
      p.ref.push_back(reference<T>(in));
    }
  }
  return p;
}

template <class T>
lob::linear_flight<T> lob_flight(const input& in) {
  const lob::shot<T> s{lob::vec3<T>(T(0), T(0), T(in.z0)), lob::vec3<T>(T(in.ux), T(0), T(in.vz))};
  return lob::linear_flight<T>::make(T(in.k), lob::medium<T>{}, s).value();
}

double rel(double got, const mp50& ref) {
  const mp50 e = ref == 0 ? mp50(abs(mp50(got))) : mp50(abs(mp50(got) - ref) / abs(ref));
  return static_cast<double>(e);
}

// What a landing query hands back, for error measurement.
template <class T>
struct landing_out {
  T time, range, speed;
};

// ---- The naive closed forms, written plainly (still air) ----

// Linear drag: tau = 1 + x - q + W0(-(1 + x) e^(q - 1 - x)), x = k v/g, q = k^2 dh/g, t = tau/k.
template <class T>
T naive_linear_time(const input& in) {
  using std::exp;
  const T k = T(in.k), vz = T(in.vz), g = lob::standard_gravity<T>();
  const T dh = -T(in.z0);
  const T x = k * vz / g;
  const T q = k * k * dh / g;
  const T w = boost::math::lambert_w0(T(-(1 + x) * exp(T(q - 1 - x))));
  return (1 + x - q + w) / k;
}

template <class T>
landing_out<T> naive_linear_landing(const input& in) {
  using std::exp;
  using std::sqrt;
  const T k = T(in.k), ux = T(in.ux), vz = T(in.vz), g = lob::standard_gravity<T>();
  const T t = naive_linear_time<T>(in);
  const T e = exp(-k * t);
  const T vx = ux * e;
  const T vzt = (vz + g / k) * e - g / k;
  return {t, T(ux * (1 - e) / k), T(sqrt(vx * vx + vzt * vzt))};
}

template <class T>
T naive_linear_range(const input& in) {
  using std::exp;
  const T k = T(in.k), ux = T(in.ux);
  return T(ux * (1 - exp(-k * naive_linear_time<T>(in))) / k);
}

// Apex: t = ln(1 + k v/g)/k, height z0 + v/k - (g/k^2) ln(1 + k v/g).
template <class T>
std::array<T, 2> naive_linear_apex(const input& in) {
  using std::log;
  const T k = T(in.k), vz = T(in.vz), g = lob::standard_gravity<T>();
  if (!(vz > 0)) return {T(0), T(in.z0)};
  const T l = log(T(1 + k * vz / g));
  return {T(l / k), T(T(in.z0) + vz / k - g / (k * k) * l)};
}

// State: x = u (1 - e^-kt)/k, z = z0 + (v + g/k)(1 - e^-kt)/k - g t/k.
template <class T>
std::array<T, 4> naive_linear_at(const input& in, const T& t) {
  using std::exp;
  const T k = T(in.k), ux = T(in.ux), vz = T(in.vz), g = lob::standard_gravity<T>();
  const T e = exp(-k * t);
  return {T(ux * (1 - e) / k), T(T(in.z0) + (vz + g / k) * (1 - e) / k - g * t / k), T(ux * e),
          T((vz + g / k) * e - g / k)};
}

// Vacuum: t = (v + sqrt(v^2 + 2 g z0))/g, range u t, apex z0 + v^2/(2g).
template <class T>
landing_out<T> naive_vacuum_landing(const input& in) {
  using std::sqrt;
  const T ux = T(in.ux), vz = T(in.vz), g = lob::standard_gravity<T>(), z0 = T(in.z0);
  const T s = sqrt(vz * vz + 2 * g * z0);
  const T t = (vz + s) / g;
  return {t, T(ux * t), T(sqrt(ux * ux + s * s))};
}

// ---- Boost.Odeint: Dormand-Prince 5(4) with dense output, rtol = atol = 1e-12 ----

using ode_state = std::array<double, 4>;  // x, z, vx, vz

landing_out<double> odeint_landing(const input& in) {
  const double k = in.k, g = lob::standard_gravity<double>();
  const auto rhs = [k, g](const ode_state& s, ode_state& d, double) {
    d[0] = s[2];
    d[1] = s[3];
    d[2] = -k * s[2];
    d[3] = -g - k * s[3];
  };
  const lob_bench::odeint_setup<double> setup{1e-12, 1e-3, 1000000, 1, boost::math::tools::eps_tolerance<double>(50),
                                              100};
  const auto l = lob_bench::odeint_landing(rhs, ode_state{0, in.z0, in.ux, in.vz}, setup,
                                           [](const ode_state& s) { return s[1] < 0 && s[3] < 0; });
  const ode_state& s = l.state;
  return {l.time, std::abs(s[0]), std::sqrt(s[2] * s[2] + s[3] * s[3])};
}

// ---- lob's queries ----

template <class T>
landing_out<T> lob_landing(const input& in) {
  const lob::linear_flight<T> f = lob_flight<T>(in);
  const lob::state<T> s = *f.landing(T(0));
  return {s.time, T(0), lob::speed(s)};
}

template <class T>
T lob_range(const input& in) {
  return *lob_flight<T>(in).range(T(0));
}

template <class T>
std::array<T, 2> lob_apex(const input& in) {
  const lob::linear_flight<T> f = lob_flight<T>(in);
  const lob::state<T> s = *f.apex();
  return {s.time, s.position.z()};
}

template <class T>
std::array<T, 4> lob_at(const lob::linear_flight<T>& f, const T& t) {
  const lob::state<T> s = *f.at(t);
  return {s.position.x(), s.position.z(), s.velocity.x(), s.velocity.z()};
}

template <class T>
T naive_range(const input& in) {
  if (in.k == 0) return naive_vacuum_landing<T>(in).range;
  return naive_linear_range<T>(in);
}

template <class T>
std::array<T, 2> naive_apex(const input& in) {
  if (in.k == 0) {
    const T vz = T(in.vz), g = lob::standard_gravity<T>();
    if (!(vz > 0)) return {T(0), T(in.z0)};
    return {T(vz / g), T(T(in.z0) + vz * vz / (2 * g))};
  }
  return naive_linear_apex<T>(in);
}

template <class T>
std::array<T, 4> naive_at(const input& in) {
  const T t = T(in.t_query);
  if (in.k == 0) {
    const T g = lob::standard_gravity<T>();
    return {T(T(in.ux) * t), T(T(in.z0) + T(in.vz) * t - g * t * t / 2), T(in.ux), T(T(in.vz) - g * t)};
  }
  return naive_linear_at<T>(in, t);
}

// ---- Errors against the references, for lob_bench::time_and_measure ----

template <class T>
struct landing_error {
  const prepared<T>& p;
  double operator()(std::size_t i, const landing_out<T>& o) const {
    return std::max(rel(double(o.time), p.ref[i].land_time), rel(double(o.speed), p.ref[i].land_speed));
  }
  double operator()(std::size_t i, const lob::result<lob::state<T>>& s) const {
    return (*this)(i, landing_out<T>{s->time, T(0), lob::speed(*s)});
  }
};

template <class T>
struct range_error {
  const prepared<T>& p;
  double operator()(std::size_t i, const T& r) const { return rel(double(r), p.ref[i].range); }
  double operator()(std::size_t i, const lob::result<T>& r) const { return (*this)(i, *r); }
};

template <class T>
struct apex_error {
  const prepared<T>& p;
  double operator()(std::size_t i, const std::array<T, 2>& a) const {
    return std::max(rel(double(a[0]), p.ref[i].apex_time), rel(double(a[1]), p.ref[i].apex_height));
  }
  double operator()(std::size_t i, const lob::result<lob::state<T>>& s) const {
    return (*this)(i, std::array<T, 2>{s->time, s->position.z()});
  }
};

// Relative errors of the position and velocity vectors (a component may underflow where
// e^-kt does, harmlessly; the vectors' errors are what matters).
template <class T>
struct at_error {
  const prepared<T>& p;
  double operator()(std::size_t i, const std::array<T, 4>& s) const {
    const truth& r = p.ref[i];
    const mp50 dp = sqrt(mp50(pow(mp50(s[0]) - r.at_pos[0], 2) + pow(mp50(s[1]) - r.at_pos[1], 2)));
    const mp50 np = sqrt(mp50(r.at_pos[0] * r.at_pos[0] + r.at_pos[1] * r.at_pos[1]));
    const mp50 dv = sqrt(mp50(pow(mp50(s[2]) - r.at_vel[0], 2) + pow(mp50(s[3]) - r.at_vel[1], 2)));
    const mp50 nv = sqrt(mp50(r.at_vel[0] * r.at_vel[0] + r.at_vel[1] * r.at_vel[1]));
    return std::max(static_cast<double>(mp50(dp / np)), static_cast<double>(mp50(dv / nv)));
  }
};

// ---- Benchmark bodies ----

// query(input) timed over the set's inputs; Error<T> judges it against the references.
template <class T, template <class> class Error, class Query>
void on_inputs(benchmark::State& state, set which, Query query) {
  const prepared<T>& p = data<T>(which);
  lob_bench::time_and_measure(state, p.in, query, Error<T>{p}, "max_rel_err");
}

// query(flight) timed over flights built beforehand from the set's inputs.
template <class T, template <class> class Error, class Query>
void on_flights(benchmark::State& state, set which, Query query) {
  const prepared<T>& p = data<T>(which);
  std::vector<lob::linear_flight<T>> flights;
  for (const input& in : p.in) flights.push_back(lob_flight<T>(in));
  lob_bench::time_and_measure(state, flights, query, Error<T>{p}, "max_rel_err");
}

// A flight built beforehand and the time it is asked at.
template <class T>
struct flight_at {
  lob::linear_flight<T> flight;
  T t;
};

template <class T>
void bm_at_lob(benchmark::State& state, set which) {
  const prepared<T>& p = data<T>(which);
  std::vector<flight_at<T>> cases;
  for (const input& in : p.in) cases.push_back({lob_flight<T>(in), T(in.t_query)});
  lob_bench::time_and_measure(
      state, cases, [](const flight_at<T>& c) { return lob_at<T>(c.flight, c.t); }, at_error<T>{p},
      "max_rel_err");
}

template <class T>
std::string type_name() {
  return std::is_same_v<T, float> ? "float" : "double";
}

template <class F>
void add(const std::string& name, F body) {
  benchmark::RegisterBenchmark(name.c_str(), body);
}

template <class T>
void register_landing(const std::string& g, set w, const char* naive_name, bool with_odeint) {
  using flight = lob::linear_flight<T>;
  add(g + "/lob", [w](benchmark::State& st) {
    on_flights<T, landing_error>(st, w, [](const flight& f) { return f.landing(T(0)); });
  });
  add(g + "/lob_with_make", [w](benchmark::State& st) {
    on_inputs<T, landing_error>(st, w, [](const input& in) { return lob_landing<T>(in); });
  });
  add(g + naive_name, [w](benchmark::State& st) {
    on_inputs<T, landing_error>(st, w, w == set::vacuum ? &naive_vacuum_landing<T> : &naive_linear_landing<T>);
  });
  if (with_odeint)
    add(g + "/odeint_dopri5", [w](benchmark::State& st) { on_inputs<double, landing_error>(st, w, &odeint_landing); });
}

template <class T>
void register_type() {
  using flight = lob::linear_flight<T>;
  struct named {
    const char* name;
    set which;
  };
  const std::string tail = "_" + type_name<T>();
  const named sets[] = {{"linear", set::typical}, {"vacuum", set::vacuum}};
  for (const named& s : sets) {
    const set w = s.which;
    const std::string g = std::string(s.name);
    const char* naive_name = w == set::vacuum ? "/naive_closed_form" : "/naive_lambert_w";
    const bool with_odeint = std::is_same_v<T, double> && w == set::typical;
    register_landing<T>(g + "_landing" + tail, w, naive_name, with_odeint);
    add(g + "_range" + tail + "/lob", [w](benchmark::State& st) {
      on_flights<T, range_error>(st, w, [](const flight& f) { return f.range(T(0)); });
    });
    add(g + "_range" + tail + "/lob_with_make",
        [w](benchmark::State& st) { on_inputs<T, range_error>(st, w, &lob_range<T>); });
    add(g + "_range" + tail + naive_name,
        [w](benchmark::State& st) { on_inputs<T, range_error>(st, w, &naive_range<T>); });
    if (with_odeint)
      add(g + "_range" + tail + "/odeint_dopri5", [w](benchmark::State& st) {
        on_inputs<double, range_error>(st, w, [](const input& in) { return odeint_landing(in).range; });
      });
    add(g + "_apex" + tail + "/lob", [w](benchmark::State& st) {
      on_flights<T, apex_error>(st, w, [](const flight& f) { return f.apex(); });
    });
    add(g + "_apex" + tail + "/lob_with_make",
        [w](benchmark::State& st) { on_inputs<T, apex_error>(st, w, &lob_apex<T>); });
    add(g + "_apex" + tail + "/naive_closed_form",
        [w](benchmark::State& st) { on_inputs<T, apex_error>(st, w, &naive_apex<T>); });
    add(g + "_at" + tail + "/lob", [w](benchmark::State& st) { bm_at_lob<T>(st, w); });
    add(g + "_at" + tail + "/naive_closed_form",
        [w](benchmark::State& st) { on_inputs<T, at_error>(st, w, &naive_at<T>); });
  }
  // The weak-drag corner, k v_z/g = 1e-6 and 1e-9, where the textbook form loses its digits.
  const named weak[] = {{"linear_landing_weak6", set::weak6}, {"linear_landing_weak9", set::weak9}};
  for (const named& s : weak)
    register_landing<T>(std::string(s.name) + tail, s.which, "/naive_lambert_w", std::is_same_v<T, double>);
}

const int registered = [] {
  register_type<float>();
  register_type<double>();
  return 0;
}();

}  // namespace
