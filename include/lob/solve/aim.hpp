#pragma once
/// \file lob/solve/aim.hpp
/// Aiming: `aim()` (every launch direction that passes through a target at a given speed,
/// flat and lofted), `speed_for_elevation()` (the speed that makes a given elevation pass
/// through the target) and `least_speed()` (the smallest speed that reaches the target).
/// Written once on `fly()`; vacuum and linear drag use an exact reduction to one unknown.

#include <array>
#include <cstddef>
#include <optional>

#include "lob/solve/farthest.hpp"

namespace lob {

/// An aiming question: launch point [m], target [m] (absolute world points) and launch
/// speed [m/s].
template <Real T>
struct aim_request {
  vec3<T> launch_point = vec3<T>::Zero();
  vec3<T> target = vec3<T>::Zero();
  T speed{};
};

/// One launch that passes through the target: elevation and azimuth [rad] (see
/// `aim_frame`), launch speed [m/s] and velocity [m/s], time of flight to the target [s],
/// and the arrival: the state at the target, its speed [m/s] and its descent angle below
/// the horizon [rad] (negative while still climbing).
template <Real T>
struct aim_solution {
  T elevation{};
  T azimuth{};
  T speed{};
  T time_of_flight{};
  vec3<T> velocity = vec3<T>::Zero();
  state<T> arrival{};
  T arrival_speed{};
  T descent_angle{};
};

/// The solutions of an aim: the flat one (shorter flight) and the lofted one; either may
/// be absent, and at the edge of reach they coincide. Fixed capacity, no heap.
template <Real T>
struct aim_solutions {
  std::optional<aim_solution<T>> flat;
  std::optional<aim_solution<T>> lofted;
  [[nodiscard]] int count() const noexcept { return (flat ? 1 : 0) + (lofted ? 1 : 0); }
};

/// A speed question: launch point and target [m], and the elevation [rad] to launch at.
template <Real T>
struct elevation_request {
  vec3<T> launch_point = vec3<T>::Zero();
  vec3<T> target = vec3<T>::Zero();
  T elevation{};
};

/// A least-speed question: launch point and target [m].
template <Real T>
struct target_request {
  vec3<T> launch_point = vec3<T>::Zero();
  vec3<T> target = vec3<T>::Zero();
};

namespace detail {

template <Real T>
[[nodiscard]] status check_points(const vec3<T>& launch, const vec3<T>& target, const medium<T>& air) {
  using std::sqrt;
  if (!is_finite(launch)) return fail(errc::invalid_argument, "launch point must be finite");
  if (!is_finite(target)) return fail(errc::invalid_argument, "target must be finite");
  if (!is_finite(air.wind)) return fail(errc::invalid_argument, "wind must be finite");
  // The solvers form the squared distance (the vacuum aim's quartic, time scales): one
  // that overflows T, beyond about 1.3e154 m in double, is refused here for every model.
  const vec3<T> offset = target - launch;
  const T dist2 = offset.squaredNorm();
  if (!is_finite(dist2))
    return fail(errc::invalid_argument, "target is too far: its squared distance overflows T; distance",
                scaled_norm(offset));
  const T dist = sqrt(dist2);
  if (!(dist > T(0))) return fail(errc::invalid_argument, "target is at the launch point, distance", dist);
  return {};
}

// The state at time t >= 0 of the closed-form flight (vacuum, linear drag) launched from
// `launch` at `velocity`: linear_flight's motion x0 + v0 t phi1(kt) + A t^2 phi2(kt),
// v0 e^-kt + A t phi1(kt), A = g + k wind, evaluated as it does (the same state
// `fly(...).at(t)` gives) without building the flight, whose construction (checks,
// apex constants) costs more than the state itself.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<state<T>> closed_form_state(const M& model, const medium<T>& air, const vec3<T>& launch,
                                                 const vec3<T>& velocity, const T& t) {
  if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
  if (!is_finite(velocity)) return fail(errc::invalid_argument, "launch velocity must be finite");
  if (!is_finite(t) || t < T(0)) return fail(errc::invalid_argument, "time must be finite and >= 0", t);
  const T k = model_traits<M>::linear_rate(model);
  const T z = k * t;
  const decay_pair<T> d = decay(z);
  const vec3<T> pull = air.gravity + k * air.wind;
  state<T> e;
  e.time = t;
  e.position = launch + velocity * T(t * d.phi1) + pull * T(t * t * phi2(z, d));
  e.velocity = velocity * d.factor + pull * T(t * d.phi1);
  if (!is_finite(e.position) || !is_finite(e.velocity))
    return fail(errc::invalid_argument, "the state overflows T at time", t);
  return e;
}

// Completes a solution from a launch velocity and the time it meets the target and
// records the arrival: `known` when a trial flight has it already, else from the closed
// form for vacuum and linear drag, else by flying it with lob::fly().
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solution<T>> complete(const M& model, const medium<T>& air,
                                               const aim_frame<T>& frame, const vec3<T>& launch,
                                               const vec3<T>& velocity, const T& time,
                                               const solve_options<T>& o,
                                               const std::optional<state<T>>& known = std::nullopt) {
  using std::sqrt;
  aim_solution<T> s;
  s.velocity = velocity;
  s.speed = sqrt(T(velocity.squaredNorm()));
  s.elevation = frame.elevation_of(velocity);
  s.azimuth = frame.azimuth_of(velocity);
  s.time_of_flight = time;
  const result<state<T>> end = [&]() -> result<state<T>> {
    if (known) return *known;
    if constexpr (model_traits<M>::closed_form) {
      (void)o;
      return closed_form_state(model, air, launch, velocity, time);
    } else {
      const auto flight = fly(model, air, shot<T>{launch, velocity}, o.flight);
      if (!flight) return unexpected<error>(flight.error());
      return flight->at(time);
    }
  }();
  if (!end) return unexpected<error>(end.error());
  s.arrival = *end;
  s.arrival_speed = lob::speed(*end);
  // path_angle_below_horizon(*end, air), from the frame's axes at hand (it would rebuild
  // "up" twice, each with a square root and divisions).
  s.descent_angle = -frame.elevation_of(end->velocity);
  // A success is finite: a trial flight that overflowed between two finite steps once
  // gave an aim under quadratic drag 1e12 /m (RK4, step 1/60 s) arriving at the target
  // after 2.3e-74 s with an infinite velocity (fuzz_solve crash-1a6c8e1a).
  if (!is_finite(s.velocity) || !is_finite(s.speed) || !is_finite(s.elevation) || !is_finite(s.azimuth) ||
      !is_finite(s.time_of_flight) || !is_finite(s.arrival.time) || !is_finite(s.arrival.position) ||
      !is_finite(s.arrival.velocity) || !is_finite(s.arrival_speed) || !is_finite(s.descent_angle))
    return fail(errc::no_convergence, "the solution's flight is not finite; time of flight", time);
  return s;
}

/// The exact reduction of vacuum and linear-drag aiming to one unknown, the time of
/// flight t. The flight is x(t) = x0 + w t + (v0 - w) tau(t) + g psi(t), tau = t phi1(kt),
/// psi = t^2 phi2(kt), linear in v0; so the launch velocity meeting the point
/// x0 + D + V t at time t is v0(t) = M(t)/tau(t), M = D + (V - w) t + w tau - g psi, and
/// aiming at speed u is the scalar equation F(t) = |M|^2/tau^2 - u^2 = 0 (any wind, any
/// target velocity V). With M' = V - w + w e^-kt - g tau and tau' = e^-kt,
/// F' = 2 H / tau^2 with H = M.M' - |M|^2 e^-kt / tau: the least speed is at the root of
/// H, the flat and lofted meeting times are the roots of F on either side of it.
template <Real T>
struct time_form {
  T k;
  vec3<T> g;
  vec3<T> n0;     // D
  vec3<T> drift;  // V - w
  vec3<T> wind;   // w

  struct values {
    T tau, decay, mm, mm1;
  };
  // e^-kt, phi1 and phi2 from one exponential (decay_pair; phi2 by its series below
  // kt = 1/2), as linear_flight evaluates them.
  [[nodiscard]] values eval(const T& t) const {
    const T z = k * t;
    const decay_pair<T> d = decay(z);
    const T tau = t * d.phi1;
    const vec3<T> m = n0 + drift * t + wind * tau - g * T(t * t * phi2(z, d));
    const vec3<T> m1 = drift + wind * d.factor - g * tau;
    return {tau, d.factor, T(m.squaredNorm()), T(m.dot(m1))};
  }
  // Launch speed squared that meets the point at time t.
  [[nodiscard]] T need2(const T& t) const {
    const values v = eval(t);
    return T(v.mm / (v.tau * v.tau));
  }
  // (need2, d need2 / dt) = (|M|^2/tau^2, 2 H / tau^2).
  [[nodiscard]] std::pair<T, T> need2_and_slope(const T& t) const {
    const values v = eval(t);
    const T t2 = v.tau * v.tau;
    return {T(v.mm / t2), T(2 * (v.mm1 - v.mm * v.decay / v.tau) / t2)};
  }
  // need2 and its first two derivatives: with N = |M|^2, e = e^-kt, M'' = -(g + k w) e,
  // need2' = 2 H / tau^2 and need2'' = 2 H' / tau^2 - 4 H e / tau^3, where
  // H' = |M'|^2 + M.M'' - 2 (M.M') e / tau + N e (k tau + e) / tau^2.
  struct derivs {
    T f, d1, d2;
  };
  [[nodiscard]] derivs need2_derivs(const T& t) const {
    const T z = k * t;
    const decay_pair<T> d = decay(z);
    const T e = d.factor;
    const T tau = t * d.phi1;
    const vec3<T> m = n0 + drift * t + wind * tau - g * T(t * t * phi2(z, d));
    const vec3<T> m1 = drift + wind * e - g * tau;
    const vec3<T> m2 = -(g + k * wind) * e;
    const T mm = m.squaredNorm();
    const T mm1 = m.dot(m1);
    const T r = e / tau;
    const T h = mm1 - mm * r;
    const T h1 = T(m1.squaredNorm()) + T(m.dot(m2)) - 2 * mm1 * r + mm * r * T(k + r);
    const T t2 = tau * tau;
    return {T(mm / t2), T(2 * h / t2), T(T(2 * h1 - 4 * h * r) / t2)};
  }
  // H = M.M' - |M|^2 e^-kt / tau, of the sign of F'.
  [[nodiscard]] T h_of(const T& t) const {
    const values v = eval(t);
    return T(v.mm1 - v.mm * v.decay / v.tau);
  }
  // The launch velocity that meets the point at time t: M(t) / tau(t), one exponential.
  [[nodiscard]] vec3<T> velocity(const T& t) const {
    const T z = k * t;
    const decay_pair<T> d = decay(z);
    const T tau = t * d.phi1;
    return vec3<T>((n0 + drift * t + wind * tau - g * T(t * t * phi2(z, d))) / tau);
  }
  // The launch velocity of an aim at speed u meeting the point at time t (a root of
  // need2 = u^2): the direction of M(t) at exactly speed u. |M|/tau is u only to the
  // rounding of M, which for a large offset D and a short M (a slow shot falling 5e7 m,
  // fuzz_solve crash-57d0bea2) is far above an ulp of u; at speed u the meeting point moves
  // by |u tau - |M|| from M, no more than that rounding (an ulp or so of |D|), inside the
  // aim tolerance of 64 ulp of |D|.
  [[nodiscard]] vec3<T> velocity_at_speed(const T& t, const T& u) const {
    const T z = k * t;
    const decay_pair<T> d = decay(z);
    const T tau = t * d.phi1;
    const vec3<T> m = n0 + drift * t + wind * tau - g * T(t * t * phi2(z, d));
    const T len = scaled_norm(m);
    return len > T(0) && is_finite(len) ? vec3<T>(m * T(u / len)) : vec3<T>(m / tau);
  }
};

// The time of least needed speed: the root of H between a lower time where H < 0 and an
// upper one where H > 0, found by halving / doubling from `scale` and polished by TOMS 748.
// Assumes H changes sign once (true in vacuum, where F is convex in t^2, and checked for
// drag and wind by the property tests, whose solutions would miss otherwise).
template <Real T>
[[nodiscard]] result<T> least_time(const time_form<T>& f, const T& scale, std::uintmax_t max_iter) {
  auto h = [&](const T& x) { return f.h_of(x); };
  T lo = scale;
  T f_lo = h(lo);
  T hi = scale;
  T f_hi = f_lo;
  for (int i = 0; !(f_lo < T(0)); ++i) {
    if (i > 1000 || !(lo > T(0))) return fail(errc::no_convergence, "least-speed time: no lower bracket");
    hi = lo;
    f_hi = f_lo;
    lo /= 2;
    f_lo = h(lo);
  }
  for (int i = 0; !(f_hi > T(0)); ++i) {
    if (i > 1000 || !is_finite(hi)) return fail(errc::no_convergence, "least-speed time: no upper bracket");
    lo = hi;
    f_lo = f_hi;
    hi *= 2;
    f_hi = h(hi);
  }
  return bracketed_root(h, lo, hi, f_lo, f_hi, max_iter, "least-speed time did not converge");
}

// A root of F = need2 - u2 in [lo, hi] (F changes sign; `lo_positive`: F(lo) > 0) by
// Halley's method (cubic convergence, from F, F' = 2 H / tau^2 and F'', all from one
// exponential) from `t`, one end of the bracket, whose F, F', F'' are `v`. need2 is
// convex in t in vacuum (and, as the property tests check, under drag). Where Halley's
// correction to the Newton step is large (|F F'' / 2 F'^2| > 1/2, far from the root) the
// Newton step is taken; a step that leaves the bracket, or that fails to halve while still
// large, bisects instead. It stops at a step below 4 ulps of t, or at the first small step
// (below sqrt(eps) t) that fails to halve the one before: the steps then no longer shrink
// because the rounding of F, not the distance to the root, sets them (bisecting on from
// there, as a plain safeguarded Newton would, costs up to one evaluation per bit of the
// still wide bracket and gains nothing). A small step whose successor, extrapolated as if
// the convergence were only quadratic (step^3 / last^2, an overestimate for Halley's),
// falls below an ulp is taken without evaluating F again. Hand-written rather than
// boost::math::tools::halley_iterate, which re-evaluates the start and, when two steps
// stop shrinking (as at the rounding floor), jumps half-way to a bracket end.
template <Real T>
[[nodiscard]] result<T> meeting_time(const time_form<T>& f, const T& u2, T lo, T hi, bool lo_positive, T t,
                                     typename time_form<T>::derivs v, std::uintmax_t max_iter) {
  using std::abs;
  using std::sqrt;
  const T eps = epsilon<T>();
  const T small = sqrt(eps);
  T last = hi - lo;
  bool last_iterate = false;
  for (std::uintmax_t i = 0; i < max_iter; ++i) {
    if (v.f == T(0)) return t;
    if ((v.f > T(0)) == lo_positive) lo = t;
    else hi = t;
    T next = T((lo + hi) / 2);
    if (v.d1 != T(0)) {
      const T newton = v.f / v.d1;
      const T a = newton * v.d2 / (2 * v.d1);
      next = abs(a) <= T(1) / T(2) ? T(t - newton / (T(1) - a)) : T(t - newton);
    }
    T step = abs(T(next - t));
    const bool inside = next > lo && next < hi;
    if (step <= 4 * eps * abs(t)) return inside ? next : t;
    if (inside && last_iterate && step > last / 2 && last <= small * abs(t)) return next;
    if (inside && last_iterate && step <= small * abs(t) && step * step * step <= eps * abs(t) * last * last)
      return next;
    last_iterate = inside && !(step > last / 2);
    if (!last_iterate) {
      next = (lo + hi) / 2;
      step = abs(T(next - t));
    }
    if (!(hi - lo > 4 * eps * abs(next))) return next;
    last = step;
    t = next;
    v = f.need2_derivs(t);
    v.f -= u2;
  }
  return fail(errc::no_convergence, "meeting time did not converge");
}

template <Real T>
[[nodiscard]] time_form<T> make_time_form(const T& rate, const medium<T>& air, const vec3<T>& offset,
                                          const vec3<T>& target_velocity) {
  return time_form<T>{rate, air.gravity, offset, vec3<T>(target_velocity - air.wind), air.wind};
}

// Length scale of times: sqrt(2 |D| / g), the least-speed flight time in vacuum.
template <Real T>
[[nodiscard]] T time_scale(const vec3<T>& offset, const medium<T>& air) {
  using std::sqrt;
  return sqrt(T(2 * sqrt(T(offset.squaredNorm())) / sqrt(T(air.gravity.squaredNorm()))));
}

// The time form's flat and lofted meeting times for speed u (static target), or
// out_of_reach carrying the least speed.
template <Real T>
struct time_roots {
  T flat, lofted, least;
  bool merged;
};
// Vacuum meeting times of a still target, the two roots in s = t^2 of
// (g^2/4) s^2 - (u^2 - g H) s + |D|^2 = 0 (any mechanics textbook), the smaller one from
// the product of the roots so that it does not cancel. The discriminant b^2 - g^2 d^2 is
// taken as (b - g d)(b + g d), the factor that cancels (g d against D.g, the target
// nearly straight below or above) through |g|^2 |D|^2 - (D.g)^2 = |g x D|^2 (Lagrange's
// identity): b^2 - g^2 d^2 lost all but 8 digits for a slow shot 5e7 m down (fuzz_solve
// crash-57d0bea2, flat time 7e-13 relative off, its speed 2e-8). False if out of reach.
template <Real T>
[[nodiscard]] bool vacuum_times(const vec3<T>& offset, const vec3<T>& gravity, const T& u, T& flat,
                                T& lofted) {
  using std::sqrt;
  const T g2 = gravity.squaredNorm();
  const T dot = offset.dot(gravity);
  const T b = u * u + dot;  // u^2 - g H
  const T d2 = offset.squaredNorm();
  const T gd = T(sqrt(g2) * sqrt(d2));
  const T c2 = T(gravity.cross(offset).squaredNorm());  // (g d)^2 - (D.g)^2
  // b - g d = u^2 + (D.g - g d), b + g d = u^2 + (D.g + g d); the one of D.g - g d and
  // D.g + g d that cancels is -c2 / (g d + D.g) or c2 / (g d - D.g).
  const T minus = dot >= T(0) ? T(u * u - c2 / T(gd + dot)) : T(b - gd);
  const T plus = dot >= T(0) ? T(b + gd) : T(u * u + c2 / T(gd - dot));
  const T disc = minus * plus;
  if (!is_finite(disc) || !(disc >= T(0)) || !(b > T(0))) return false;
  const T big = 2 * (b + sqrt(disc)) / g2;
  lofted = sqrt(big);
  flat = sqrt(T(4 * d2 / (g2 * big)));
  return true;
}

// The time form's flat and lofted meeting times for speed u (still target), or
// out_of_reach. The split between the two roots needs only a time where F < 0: the vacuum
// least-speed time usually is one (one evaluation); only when it is not is the exact
// minimum of F located (least_time) to tell a target out of reach from one just inside.
// Each root is then found by Halley's method from the vacuum times (meeting_time).
template <Real T>
[[nodiscard]] result<time_roots<T>> time_form_roots(const time_form<T>& f, const T& u, const T& scale,
                                                     std::uintmax_t max_iter) {
  using std::sqrt;
  const T u2 = u * u;
  T vf = T(0);
  T vl = T(0);
  const bool vac = vacuum_times(f.n0, f.g, u, vf, vl);
  if (f.k == T(0) && f.drift + f.wind == vec3<T>::Zero() && vac) return time_roots<T>{vf, vl, scale, false};
  T split = scale;
  T f_split = T(f.need2(split) - u2);
  if (!(f_split < T(0))) {
    const result<T> tm = least_time(f, scale, max_iter);
    if (!tm) return unexpected<error>(tm.error());
    split = *tm;
    f_split = T(f.need2(split) - u2);
    if (!(f_split < T(0))) {
      if (f_split <= T(32) * epsilon<T>() * u2) return time_roots<T>{split, split, split, true};
      error e(errc::out_of_reach, "target out of reach at this speed; least speed needed",
              static_cast<long double>(T(sqrt(T(f_split + u2)))));
      return unexpected<error>(e);
    }
  }
  // F = need2 - u2 and its derivatives at t.
  auto at = [&](const T& t) {
    typename time_form<T>::derivs v = f.need2_derivs(t);
    v.f -= u2;
    return v;
  };
  T lo = vac && vf < split ? vf : T(split / 2);
  typename time_form<T>::derivs v_lo = at(lo);
  for (int i = 0; !(v_lo.f > T(0)); ++i) {
    if (i > 1000 || !(lo > T(0))) return fail(errc::no_convergence, "aim: no lower time bracket");
    lo /= 2;
    v_lo = at(lo);
  }
  T hi = vac && vl > split ? vl : T(split * 2);
  typename time_form<T>::derivs v_hi = at(hi);
  for (int i = 0; !(v_hi.f > T(0)); ++i) {
    if (i > 1000 || !is_finite(hi)) return fail(errc::no_convergence, "aim: no upper time bracket");
    hi *= 2;
    v_hi = at(hi);
  }
  // Drag lengthens the flat flight and shortens the lofted one: start from the far ends,
  // whose evaluations above give the first steps.
  const result<T> t1 = meeting_time(f, u2, lo, split, true, lo, v_lo, max_iter);
  if (!t1) return unexpected<error>(t1.error());
  const result<T> t2 = meeting_time(f, u2, split, hi, false, hi, v_hi, max_iter);
  if (!t2) return unexpected<error>(t2.error());
  return time_roots<T>{*t1, *t2, split, false};
}

/// One trial shot of the direct (any-model) solvers: where the flight launched at
/// (elevation, azimuth, speed) is when its horizontal distance first reaches the
/// target's: `miss` is its height minus the target's [m] (a large negative number,
/// falling with elevation, if it never gets that far), `drift` the angle [rad] from the
/// target's bearing to its bearing.
template <Real T>
struct probe_result {
  bool reached = false;
  T miss{};
  T drift{};
  state<T> at{};
  vec3<T> velocity = vec3<T>::Zero();
};

template <DragModel M, Real T = scalar_of<M>>
struct shooter {
  const M& model;
  const medium<T>& air;
  const aim_frame<T>& frame;
  const solve_options<T>& opts;
  vec3<T> launch;
  vec3<T> target;
  vec3<T> level;  // horizontal part of target - launch
  T distance;     // |level|
  T rise;         // height of target above launch
  T bearing;      // azimuth of the target
  flight_options<T> probe_options;

  [[nodiscard]] static shooter make(const M& m, const medium<T>& a, const aim_frame<T>& f,
                                    const solve_options<T>& o, const vec3<T>& from, const vec3<T>& to) {
    using std::sqrt;
    const vec3<T> d = to - from;
    const vec3<T> lv = d - T(f.up.dot(d)) * f.up;
    return shooter{m, a, f, o, from, to, lv, T(sqrt(T(lv.squaredNorm()))), T(f.up.dot(d)), f.azimuth_of(lv),
                   o.flight, {}, 0};
  }

  // Caps the flight time of trial shots at `speed`: four times the time a vertical shot
  // takes to come down to (target height - distance - 1 m). A trial that has not reached
  // the target's distance by then is far below it (an inclined shot is, to within that
  // margin, never higher than the vertical one at the same time: common practice), so
  // it counts as not reached, and near-vertical trials stop early instead of creeping
  // sideways until max_time.
  void cap_time(const T& speed) {
    const auto flight = fly(model, air, shot<T>{launch, vec3<T>(speed * frame.up)}, opts.flight);
    if (!flight) return;
    const result<state<T>> down = flight->landing(T(height(target, air) - distance - T(1)));
    if (!down) return;
    const T cap = T(4) * down->time;
    if (cap < probe_options.max_time) probe_options.max_time = cap;
  }

  // The closest trial of each root search (slot 0: flat, 1: lofted), kept: a root
  // finder's answer is such a trial, and the caller then asks for it again (its state
  // and drift).
  struct trial {
    T elevation, azimuth, speed;
    probe_result<T> result;
  };
  mutable std::array<std::optional<trial>, 2> kept{};
  mutable std::size_t slot = 0;
  // Why trial flights failed, when none reached the target's distance: a search that then
  // does not converge says so, not that its own iteration failed (unstable fixed steps
  // under quadratic drag 1e12 /m gave "peak search did not converge").
  mutable std::optional<error> flight_failure{};
  mutable bool any_reached = false;
  [[nodiscard]] error explain(const error& search) const {
    return !any_reached && flight_failure ? *flight_failure : search;
  }

  [[nodiscard]] probe_result<T> probe(const T& elevation, const T& azimuth, const T& speed) const {
    for (const std::optional<trial>& k : kept)
      if (k && k->elevation == elevation && k->azimuth == azimuth && k->speed == speed) return k->result;
    const probe_result<T> p = fresh_probe(elevation, azimuth, speed);
    keep(elevation, azimuth, speed, p);
    return p;
  }
  void keep(const T& elevation, const T& azimuth, const T& speed, const probe_result<T>& p) const {
    using std::abs;
    std::optional<trial>& k = kept[slot];
    if (p.reached && (!k || abs(p.miss) <= abs(k->result.miss))) k = trial{elevation, azimuth, speed, p};
  }

  // Quadratic drag in still air, flown on the hodograph path (`exact`, set by the caller):
  // the root nearest `guess` by Newton's method on the hodograph quadrature itself
  // (detail::hodograph_aim), started from the trial flight `start` at the guess (flown
  // when not given), which gives the inclination at the target's distance. The flight of
  // the root, from the method's last quadrature, becomes the kept trial. Gives the
  // elevation and the slope of the miss there; empty when the guess falls short, the
  // iteration does not converge, or the root lies outside (lo, hi) or misses by more than tol.
  bool exact = false;
  struct exact_hit {
    T elevation;
    T slope;  // d miss / d elevation [m/rad]
  };
  [[nodiscard]] std::optional<exact_hit> exact_root(const T& azimuth, const T& speed, const T& guess,
                                                    const probe_result<T>* start, const T& lo, const T& hi,
                                                    const T& tol) const {
    if constexpr (model_traits<M>::quadratic_fast_path) {
      using std::abs;
      using std::atan2;
      using std::cos;
      using std::sin;
      using std::sqrt;
      if (!exact || azimuth != bearing || !(distance > T(0))) return std::nullopt;
      const probe_result<T> trial = start ? *start : probe(guess, azimuth, speed);
      if (!trial.reached) return std::nullopt;
      const vec3<T>& v = trial.at.velocity;
      const T v_up = frame.up.dot(v);
      const T inclination = atan2(v_up, T(sqrt(T((v - v_up * frame.up).squaredNorm()))));
      const T g = sqrt(T(air.gravity.squaredNorm()));
      // The Newton iteration's quadratures count against the call's budget like trial flights.
      const T c = model_traits<M>::quadratic_coefficient(model);
      if (opts.flight.shared_steps &&
          !opts.flight.shared_steps->draw(4 * detail::hodograph_query_cost(c, g, speed)))
        return std::nullopt;
      const result<detail::hodograph_aim_root<T>> e =
          detail::hodograph_aim(T(model_traits<M>::quadratic_coefficient(model)), g, speed, distance, rise,
                                guess, std::optional<T>(inclination));
      if (!e || !(e->elevation > lo && e->elevation < hi)) return std::nullopt;
      const detail::hodograph_point<T>& end = e->arrival;
      const vec3<T> ahead = level / distance;
      probe_result<T> p;
      p.reached = true;
      p.velocity = vec3<T>(speed * frame.direction(e->elevation, azimuth));
      p.at.time = end.time;
      p.at.position = vec3<T>(launch + end.distance * ahead + end.rise * frame.up);
      p.at.velocity = vec3<T>(end.speed * (cos(end.inclination) * ahead + sin(end.inclination) * frame.up));
      p.miss = end.rise - rise;
      // As a trial flight would: a miss beyond tol, or an arrival after the flights' time cap, fails.
      if (!(abs(p.miss) <= tol) || end.time > probe_options.max_time) return std::nullopt;
      keep(e->elevation, azimuth, speed, p);
      return exact_hit{e->elevation, e->slope};
    } else {
      return std::nullopt;
    }
  }

  [[nodiscard]] probe_result<T> fresh_probe(const T& elevation, const T& azimuth, const T& speed) const {
    probe_result<T> p;
    p.velocity = vec3<T>(speed * frame.direction(elevation, azimuth));
    const auto flight = fly(model, air, shot<T>{launch, p.velocity}, probe_options);
    const T scale = distance + T(1);
    p.miss = T(-scale * T(1000)) * (T(4) + elevation);  // never reached: below, decreasing
    if (!flight) {
      // fly() refusing a speed the search chose (its drag overflows T) tells nothing of why
      // the target is not reached: such speeds are simply beyond T.
      if (!flight_failure && flight.error().code() != errc::invalid_argument) flight_failure = flight.error();
      return p;
    }
    const result<state<T>> s = flight->at_distance(distance);
    if (!s) {
      if (!flight_failure && s.error().code() != errc::never_reaches) flight_failure = s.error();
      return p;
    }
    any_reached = true;
    p.reached = true;
    p.at = *s;
    p.miss = T(frame.up.dot(vec3<T>(s->position - target)));
    const vec3<T> off = s->position - launch;
    const vec3<T> off_level = off - T(frame.up.dot(off)) * frame.up;
    p.drift = signed_angle(level, off_level, frame.up);
    return p;
  }
};

template <Real T>
struct plane_roots {
  std::optional<T> flat, lofted;
  T best_elevation{}, best_miss{};
};

// Vacuum elevations towards a point d away and H up at speed u:
// tan(theta) = (u^2 -+ sqrt(u^4 - g (g d^2 + 2 H u^2))) / (g d) (any mechanics textbook).
template <Real T>
[[nodiscard]] bool vacuum_elevations(const T& d, const T& rise, const T& u, const T& g, T& flat, T& lofted) {
  using std::atan;
  using std::sqrt;
  const T u2 = u * u;
  const T disc = u2 * u2 - g * (g * d * d + 2 * rise * u2);
  if (!(disc >= T(0))) return false;
  const T r = sqrt(disc);
  flat = atan(T((u2 - r) / (g * d)));
  lofted = atan(T((u2 + r) / (g * d)));
  return true;
}

// For a fixed azimuth, the elevations whose flight passes the target's distance at the
// target's height; the miss is taken as unimodal in the elevation on
// [line of sight, pi/2). First try: the vacuum solutions and the elevation midway between
// them (which bisects the line of sight and the vertical) give brackets in 3 flights when
// the midway elevation clears the target, as it does for moderate drag; a parabola in
// tan(theta) through those 3 gives first guesses and bracketed secant steps
// (secant_in_bracket) the roots. Otherwise Boost.Math's Brent finds the peak of the miss
// (coarsely first, fully when the peak is near zero) and TOMS 748 the roots on each side.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<plane_roots<T>> plane_solve(const shooter<M>& sh, const T& azimuth, const T& speed,
                                                 const T& tol, int bits = root_bits<T>()) {
  using std::atan2;
  using std::sqrt;
  const T top = half_pi<T>() * (T(1) - T(1) / T(1 << 20));
  auto miss = [&](const T& e) { return sh.probe(e, azimuth, speed).miss; };
  const T sight = atan2(sh.rise, sh.distance);
  const T g = sqrt(T(sh.air.gravity.squaredNorm()));
  plane_roots<T> out;
  T vf = T(0);
  T vl = T(0);
  if (vacuum_elevations(sh.distance, sh.rise, speed, g, vf, vl)) {
    const T mid = (half_pi<T>() + sight) / 2;
    const T f_mid = miss(mid);
    if (f_mid > tol) {
      T a = vf;
      probe_result<T> at_a;  // kept as the start of an exact flat root
      T f_a = T(1);
      if (vf > sight) {
        at_a = sh.probe(vf, azimuth, speed);
        f_a = at_a.miss;
      }
      if (!(f_a < T(0))) {
        a = sight;
        at_a = sh.probe(sight, azimuth, speed);
        f_a = at_a.miss;
      }
      T b = vl;
      T f_b = vl < top ? miss(vl) : T(1);
      if (!(f_b < T(0))) {
        b = top;
        f_b = miss(top);
      }
      if (f_a < T(0) && f_b < T(0)) {
        // First guesses: the parabola in p = tan(theta) through the three trials (the
        // miss is exactly quadratic in p in vacuum, nearly so under drag).
        using std::atan;
        using std::tan;
        const T pa = tan(a);
        const T pm = tan(mid);
        const T pb = tan(b);
        const T d1 = (f_mid - f_a) / (pm - pa);
        const T d2 = (f_b - f_mid) / (pb - pm);
        const T c2 = (d2 - d1) / (pb - pa);  // f ~ f_mid + d (p - pm) + c2 (p - pm)^2
        const T d = d1 + c2 * (pm - pa);
        const T disc = d * d - 4 * c2 * f_mid;
        T g1 = (a + mid) / 2;
        T g2 = (mid + b) / 2;
        if (c2 < T(0) && disc >= T(0)) {
          const T sq = sqrt(disc);
          // Roots of c2 u^2 + d u + f_mid = 0, u = p - pm, in the form that does not cancel.
          const T q = -(d + (d >= T(0) ? sq : T(-sq))) / 2;
          const T u1 = q / c2;
          const T u2 = f_mid / q;
          const T lo_u = u1 < u2 ? u1 : u2;
          const T hi_u = u1 < u2 ? u2 : u1;
          g1 = atan(T(pm + lo_u));
          g2 = atan(T(pm + hi_u));
        }
        sh.slot = 0;
        const std::optional<typename shooter<M>::exact_hit> e1 =
            sh.exact_root(azimuth, speed, a, &at_a, a, mid, tol);
        const result<T> r1 =
            e1 ? result<T>(e1->elevation)
               : secant_in_bracket(miss, a, mid, f_a, f_mid, g1, tol, bits, sh.opts.max_iterations,
                                   "aim: flat root did not converge");
        if (!r1) return unexpected<error>(r1.error());
        sh.slot = 1;
        std::optional<typename shooter<M>::exact_hit> e2;
        if (e1) {
          // The lofted guess from the flat root, the slope there and the midway trial, the
          // miss taken as quadratic in p = tan(theta), -A (p - p_flat) (p - p_lofted), as in
          // vacuum: p_lofted = (f_mid p_f - s (p_m - p_f) p_m) / (f_mid - s (p_m - p_f)).
          using std::cos;
          const T pf = tan(e1->elevation);
          const T s = e1->slope * cos(e1->elevation) * cos(e1->elevation);  // d miss / dp
          const T pm = tan(mid);
          const T den = f_mid - s * (pm - pf);
          T guess = (mid + b) / 2;
          if (den < T(0)) {
            const T pl = (f_mid * pf - s * (pm - pf) * pm) / den;
            const T e = atan(pl);
            if (e > mid && e < b) guess = e;
          }
          e2 = sh.exact_root(azimuth, speed, guess, nullptr, mid, b, tol);
        }
        const result<T> r2 =
            e2 ? result<T>(e2->elevation)
               : secant_in_bracket(miss, mid, b, f_mid, f_b, g2, tol, bits, sh.opts.max_iterations,
                                   "aim: lofted root did not converge");
        if (!r2) return unexpected<error>(r2.error());
        out.flat = *r1;
        out.lofted = *r2;
        out.best_elevation = mid;
        out.best_miss = f_mid;
        return out;
      }
    }
  }
  T lo = sight;
  T f_lo = miss(lo);
  if (!(f_lo < T(0))) {  // an updraft can lift the line of sight; open the search downwards
    lo = -top;
    f_lo = miss(lo);
  }
  const T f_top = miss(top);
  auto neg = [&](const T& e) { return T(-miss(e)); };
  result<std::pair<T, T>> peak =
      brent_min(neg, lo, top, sh.opts.max_iterations, 12, "aim: peak search did not converge");
  if (!peak) return unexpected<error>(sh.explain(peak.error()));
  if (-peak->second < T(0)) {
    peak = brent_min(neg, lo, top, sh.opts.max_iterations, std::numeric_limits<T>::digits / 2,
                     "aim: peak search did not converge");
    if (!peak) return unexpected<error>(sh.explain(peak.error()));
  }
  out.best_elevation = peak->first;
  out.best_miss = -peak->second;
  if (out.best_miss < -tol) return out;
  if (out.best_miss <= T(0)) {  // within the tolerance: the two solutions merge
    out.flat = out.best_elevation;
    out.lofted = out.best_elevation;
    return out;
  }
  if (f_lo < T(0)) {
    const result<T> r = bracketed_root(miss, lo, out.best_elevation, f_lo, out.best_miss,
                                       sh.opts.max_iterations, "aim: flat root did not converge", bits);
    if (!r) return unexpected<error>(r.error());
    out.flat = *r;
  }
  if (f_top < T(0)) {
    const result<T> r = bracketed_root(miss, out.best_elevation, top, out.best_miss, f_top,
                                       sh.opts.max_iterations, "aim: lofted root did not converge", bits);
    if (!r) return unexpected<error>(r.error());
    out.lofted = *r;
  }
  return out;
}

// Polishes an elevation root found on cheaper trial flights with the caller's flights:
// secant steps from (theta0, theta0 + delta), safeguarded by keeping the last sign change
// and bisecting inside it when a step leaves it. Boost.Math has no unbracketed secant and
// a TOMS 748 bracket would cost two more flights; the start is within ~1e-6 of the root,
// so 2-4 flights usually suffice. Capped; gives up with no_convergence.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<T> polish_elevation(const shooter<M>& sh, const T& azimuth, const T& speed,
                                         const T& theta0, const T& tol) {
  using std::abs;
  const T eps = epsilon<T>();
  T x0 = theta0;
  T f0 = sh.probe(x0, azimuth, speed).miss;
  if (abs(f0) <= tol) return x0;
  T x1 = theta0 + T(1) / T(1 << 20) * (f0 > T(0) ? T(-1) : T(1)) * (T(1) + abs(theta0)) / T(8);
  T f1 = sh.probe(x1, azimuth, speed).miss;
  std::optional<std::pair<T, T>> bracket;  // (x with f < 0, x with f > 0)
  auto note = [&](const T& x, const T& f) {
    if (!bracket) return;
    if (f < T(0)) bracket->first = x;
    else bracket->second = x;
  };
  if ((f0 < T(0)) != (f1 < T(0))) bracket = f0 < T(0) ? std::pair<T, T>(x0, x1) : std::pair<T, T>(x1, x0);
  for (int i = 0; i < 12; ++i) {
    if (abs(f1) <= tol) return x1;
    T x2 = f1 != f0 ? T(x1 - f1 * (x1 - x0) / (f1 - f0)) : T(x1 + (x1 - x0));
    if (bracket) {
      const T lo = bracket->first < bracket->second ? bracket->first : bracket->second;
      const T hi = bracket->first < bracket->second ? bracket->second : bracket->first;
      if (!(x2 > lo && x2 < hi)) x2 = (lo + hi) / 2;
      if (!(hi - lo > 4 * eps * (T(1) + abs(x2)))) return x2;
    }
    const T f2 = sh.probe(x2, azimuth, speed).miss;
    if (!bracket && (f2 < T(0)) != (f1 < T(0)))
      bracket = f2 < T(0) ? std::pair<T, T>(x2, x1) : std::pair<T, T>(x1, x2);
    else note(x2, f2);
    if (abs(T(x2 - x1)) <= 4 * eps * (T(1) + abs(x2))) return abs(f2) <= abs(f1) ? x2 : x1;
    x0 = x1;
    f0 = f1;
    x1 = x2;
    f1 = f2;
  }
  // Rare: the secant wandered (a kink or a jump in the miss). Bracket the root by widening
  // steps around theta0 and finish with TOMS 748.
  const T base = sh.probe(theta0, azimuth, speed).miss;
  T width = T(1) / T(1 << 20);
  for (int i = 0; i < 24; ++i, width *= 4) {
    for (const T sgn : {T(1), T(-1)}) {
      const T x = theta0 + sgn * width;
      const T fx = sh.probe(x, azimuth, speed).miss;
      if ((fx < T(0)) != (base < T(0))) {
        const T lo = sgn > T(0) ? theta0 : x;
        const T hi = sgn > T(0) ? x : theta0;
        return bracketed_root([&](const T& e) { return sh.probe(e, azimuth, speed).miss; }, lo, hi,
                              sgn > T(0) ? base : fx, sgn > T(0) ? fx : base, sh.opts.max_iterations,
                              "aim: elevation polish did not converge");
      }
    }
  }
  return fail(errc::no_convergence, "aim: elevation polish did not converge, miss [m]", f1);
}

// Azimuth correction under a crosswind: the drift (bearing of the arrival minus bearing
// of the target) is driven to zero by secant steps in the azimuth. Boost.Math has no
// unbracketed secant, and no bracket is known in advance; the drift map is a strong
// rotation for flat shots (slope near 1), so the first step is the plain fixed-point step
// az - drift and later ones are secant steps. Stops when the drift
// times the distance is within `tol`; when integrated flights' rounding floor is reached
// first (the azimuth step is a few ulp, or three steps bring no improvement) the best
// iterate is returned if within 1000 tol. Capped by opts.max_azimuth_iterations.
template <class Solve, Real T>
[[nodiscard]] auto correct_azimuth(Solve&& solve_at, const T& bearing, const T& distance, const T& tol,
                                   int cap) -> decltype(solve_at(bearing)) {
  using std::abs;
  using R = decltype(solve_at(bearing));
  const T eps = epsilon<T>();
  T az = bearing;
  R cur = solve_at(az);
  if (!cur) return cur;
  R best = cur;
  int stale = 0;
  T prev_az = az;
  T prev_drift{};
  bool have_prev = false;
  for (int i = 0; i < cap; ++i) {
    const T drift = cur->drift;
    if (abs(drift) * distance <= tol) return cur;
    T next = az - drift;
    if (have_prev && drift != prev_drift) {
      const T secant = az - drift * (az - prev_az) / (drift - prev_drift);
      // Steep shots in wind turn their arrival bearing less than their azimuth (slope
      // well below 1), where the plain step crawls; the secant step is taken unless it
      // jumps more than a radian.
      if (is_finite(secant) && abs(T(secant - az)) <= T(1)) next = secant;
    }
    if (abs(T(next - az)) <= 8 * eps * (T(1) + abs(az))) break;
    prev_az = az;
    prev_drift = drift;
    have_prev = true;
    az = next;
    cur = solve_at(az);
    if (!cur) return cur;
    if (abs(cur->drift) < abs(best->drift)) {
      best = cur;
      stale = 0;
    } else if (++stale >= 3) {
      break;
    }
  }
  // At the rounding floor of integrated flights: accept the best iterate if it is within
  // 1000 tol (still far below 1e-9 m at the default tol), else report failure.
  if (abs(best->drift) * distance <= T(1000) * tol) return best;
  return fail(errc::no_convergence, "crosswind azimuth correction did not converge, drift [rad]",
              best->drift);
}

// The out_of_reach error of an aim: carries the farthest distance reachable at the
// target's height along the target's bearing.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] error out_of_reach_error(const M& model, const medium<T>& air, const aim_request<T>& req,
                                       const T& bearing, const solve_options<T>& o) {
  const farthest_request<T> fr{req.launch_point, req.speed, bearing, height(req.target, air)};
  const result<farthest_shot<T>> far = farthest_elevation(model, air, fr, o);
  const long double reach = far ? static_cast<long double>(far->range) : 0.0L;
  error e(errc::out_of_reach, "target out of reach at this speed; farthest at its height [m]", reach);
  e.with_detail_value(reach);
  return e;
}

template <Real T>
struct branch_hit {
  T elevation, azimuth, drift;
  probe_result<T> shot;
};

/// A trial flight of `sh` that is flown, never taken from the hodograph Newton root.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] probe_result<T> flown_probe(const shooter<M>& sh, const T& elevation, const T& azimuth,
                                          const T& speed) {
  return sh.fresh_probe(elevation, azimuth, speed);
}

/// How close the flight launched at `velocity` passes the target [m], to first order: the
/// height miss where it reaches the target's distance times the cosine of its path angle
/// there (a steep descent that misses in height by h passes h cos(angle) from the target).
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<T> closest_pass(const M& model, const medium<T>& air, const aim_frame<T>& frame,
                                     const aim_request<T>& req, const vec3<T>& velocity, const T& distance,
                                     const solve_options<T>& o) {
  using std::abs;
  const auto flight = fly(model, air, shot<T>{req.launch_point, velocity}, o.flight);
  if (!flight) return unexpected<error>(flight.error());
  const result<state<T>> at = flight->at_distance(distance);
  if (!at) return unexpected<error>(at.error());
  const T miss = frame.up.dot(vec3<T>(at->position - req.target));
  const T v = scaled_norm(at->velocity);
  const T level = scaled_norm(vec3<T>(at->velocity - T(frame.up.dot(at->velocity)) * frame.up));
  return T(abs(miss) * (v > T(0) ? T(level / v) : T(1)));
}

/// The state of a vertical flight where it meets `target` (at height `h`), from a
/// crossing time `t0` close to it: Newton steps t -= (z(t) - h) / vz(t) on the flight's own
/// `at()` (at most 8), then, where rounding stops them, a walk of at most 64 ulp of t each
/// way; `no_convergence` with the miss when neither comes within `tol`.
template <class Flight, Real T>
[[nodiscard]] result<state<T>> vertical_arrival(const Flight& flight, const medium<T>& air, const vec3<T>& target,
                                                const T& h, const T& t0, const T& tol) {
  using std::abs;
  using std::nextafter;
  const auto miss_of = [&](const state<T>& s) { return scaled_norm(vec3<T>(s.position - target)); };
  result<state<T>> at = flight.at(t0);
  if (!at) return at;
  state<T> best = *at;
  T best_miss = miss_of(best);
  for (int i = 0; i < 8 && !(best_miss <= tol); ++i) {
    const T vz = T(up(air).dot(at->velocity));
    if (!(abs(vz) > T(0))) break;
    const T t = at->time - (height(at->position, air) - h) / vz;
    if (!is_finite(t) || !(t >= T(0))) break;
    at = flight.at(t);
    if (!at) return at;
    const T m = miss_of(*at);
    if (!(m < best_miss)) break;
    best = *at;
    best_miss = m;
  }
  if constexpr (std::is_floating_point_v<T>) {
    // Rounding of the position (a few ulp of its largest component) can leave the last
    // Newton step just outside a tolerance of a few ulp: walk t by ulps towards the target.
    for (int dir = -1; dir <= 1 && !(best_miss <= tol); dir += 2) {
      T t = best.time;
      for (int i = 0; i < 64 && !(best_miss <= tol); ++i) {
        t = nextafter(t, dir < 0 ? T(0) : std::numeric_limits<T>::infinity());
        const result<state<T>> s = flight.at(t);
        if (!s) return s;
        const T m = miss_of(*s);
        if (m < best_miss) {
          best = *s;
          best_miss = m;
        } else if (m > T(2) * best_miss) {
          break;
        }
      }
    }
  }
  if (!(best_miss <= tol))
    return fail(errc::no_convergence, "aim: the vertical shot passes the target no closer than [m]", best_miss);
  return best;
}

/// The any-model aim: fixed-azimuth elevation roots, then a crosswind correction per
/// branch. Public through `aim()`; callable directly to check the closed forms.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solutions<T>> aim_direct(const M& model, const medium<T>& air,
                                                  const aim_frame<T>& frame, const aim_request<T>& req,
                                                  const solve_options<T>& o) {
  using std::abs;
  using std::sqrt;
  shooter<M> sh = shooter<M>::make(model, air, frame, o, req.launch_point, req.target);
  if constexpr (!model_traits<M>::closed_form) sh.cap_time(req.speed);
  const T scale = sqrt(T((req.target - req.launch_point).squaredNorm()));
  const T tol = miss_tolerance(o, scale);
  aim_solutions<T> out;
  if (!(sh.distance > scale * T(1000) * epsilon<T>())) {
    // Straight above or below: vertical shots, if the air has no horizontal wind.
    const vec3<T> wl = air.wind - T(frame.up.dot(air.wind)) * frame.up;
    if (wl.squaredNorm() > T(0))
      return fail(errc::invalid_argument,
                  "target straight above or below the launch under a horizontal wind");
    const T h = height(req.target, air);
    for (int b = 0; b < 2; ++b) {
      const T elev = (b == 0 && sh.rise < T(0)) ? T(-half_pi<T>()) : half_pi<T>();
      const vec3<T> v = req.speed * frame.direction(elev, sh.bearing);
      const auto flight = fly(model, air, shot<T>{req.launch_point, v}, o.flight);
      if (!flight) return unexpected<error>(flight.error());
      const side branch = (b == 0 && sh.rise > T(0)) ? side::rising : side::falling;
      const result<state<T>> c = flight->crossing(h, branch);
      if (!c) {
        if (b == 0 && c.error() == errc::never_reaches) {
          const result<state<T>> a = flight->apex();
          error e(errc::out_of_reach, "target above the highest reachable point");
          if (a)
            e.with_detail_value(
                static_cast<long double>(height(a->position, air) - height(req.launch_point, air)));
          return unexpected<error>(e);
        }
        return unexpected<error>(c.error());
      }
      if constexpr (model_traits<M>::closed_form) {
        const result<aim_solution<T>> s = complete(model, air, frame, req.launch_point, v, c->time, o);
        if (!s) return unexpected<error>(s.error());
        (b == 0 ? out.flat : out.lofted) = *s;
      } else {
        // The crossing is located to the flight's event accuracy (and on the hodograph
        // path by another method than at()), so at(crossing time) can miss by far more
        // than the tolerance: Newton steps on the flight's own at(t), capped.
        const result<state<T>> at = vertical_arrival(*flight, air, req.target, h, c->time, tol);
        if (!at) return unexpected<error>(at.error());
        const result<aim_solution<T>> s =
            complete(model, air, frame, req.launch_point, v, at->time, o, std::optional<state<T>>(*at));
        if (!s) return unexpected<error>(s.error());
        (b == 0 ? out.flat : out.lofted) = *s;
      }
    }
    return out;
  }
  // Integrated models: find the roots on flights at a looser tolerance (relative 1e-6, a
  // quarter of the steps or fewer), then polish them on the caller's flights. Quadratic
  // drag in still air is flown on the hodograph path, exact to rounding at any flight
  // tolerance: its roots need neither the loose pass nor the polish.
  bool exact_probes = model_traits<M>::closed_form;
  if constexpr (model_traits<M>::quadratic_fast_path)
    exact_probes =
        o.flight.use_fast_paths && o.flight.method == stepper::adaptive && air.wind == vec3<T>::Zero();
  sh.exact = exact_probes && !model_traits<M>::closed_form;
  shooter<M> coarse = sh;
  int coarse_bits = root_bits<T>();
  if (!exact_probes) {
    const T loose = T(1) / T(1000000);
    if (coarse.probe_options.relative_tolerance < loose) coarse.probe_options.relative_tolerance = loose;
    if (coarse.probe_options.absolute_tolerance < loose) coarse.probe_options.absolute_tolerance = loose;
    coarse_bits = 20;  // the loose flights are good to ~1e-6 only
  }
  const result<plane_roots<T>> first =
      plane_solve(exact_probes ? sh : coarse, sh.bearing, req.speed, tol, coarse_bits);
  if (!first) return unexpected<error>(first.error());
  if (!first->flat && !first->lofted) {
    return unexpected<error>(out_of_reach_error(model, air, req, sh.bearing, o));
  }
  for (int b = 0; b < 2; ++b) {
    const std::optional<T>& start = b == 0 ? first->flat : first->lofted;
    if (!start) continue;
    T elev = *start;
    if constexpr (!model_traits<M>::closed_form) {
      const bool merged = first->flat && first->lofted && *first->flat == *first->lofted;
      if (!merged && !exact_probes) {
        const result<T> e = polish_elevation(sh, sh.bearing, req.speed, *start, tol);
        if (!e) return unexpected<error>(e.error());
        elev = *e;
      }
    }
    probe_result<T> p0 = sh.probe(elev, sh.bearing, req.speed);
    result<branch_hit<T>> hit = branch_hit<T>{elev, sh.bearing, p0.drift, p0};
    if (abs(p0.drift) * sh.distance > tol) {
      auto solve_at = [&](const T& az) -> result<branch_hit<T>> {
        const result<plane_roots<T>> r = plane_solve(sh, az, req.speed, tol);
        if (!r) return unexpected<error>(r.error());
        const std::optional<T>& e = b == 0 ? r->flat : r->lofted;
        if (!e) return fail(errc::out_of_reach, "target out of reach under this crosswind");
        const probe_result<T> p = sh.probe(*e, az, req.speed);
        return branch_hit<T>{*e, az, p.drift, p};
      };
      hit = correct_azimuth(solve_at, sh.bearing, sh.distance, tol, o.max_azimuth_iterations);
    }
    if (!hit) return unexpected<error>(hit.error());
    if (sh.exact) {
      // The roots come from the Newton quadrature, not from a flight: fly the answer as a
      // user would and keep the promise, since at extreme drag (c v^2/g far beyond 1e3,
      // near-vertical descents) the two differ by more than the tolerance.
      result<T> pass = closest_pass(model, air, frame, req, hit->shot.velocity, sh.distance, o);
      if (!pass) return unexpected<error>(pass.error());
      if (!(*pass <= tol)) {
        // Polish the elevation on the flights themselves (the Newton root is within
        // rounding of theirs in ordinary cases, a few ulp of elevation away).
        shooter<M> flown = sh;
        flown.exact = false;
        flown.kept = {};
        flown.slot = 0;
        const result<T> e = polish_elevation(flown, hit->azimuth, req.speed, hit->elevation, tol);
        if (e) {
          const probe_result<T> p = flown.probe(*e, hit->azimuth, req.speed);
          if (p.reached) {
            hit = branch_hit<T>{*e, hit->azimuth, p.drift, p};
            pass = closest_pass(model, air, frame, req, p.velocity, sh.distance, o);
            if (!pass) return unexpected<error>(pass.error());
          }
        }
      }
      if (!(*pass <= tol)) {
        // Last, ulp by ulp (capped): the secant stops on the height miss, which a steep
        // descent makes larger than the pass by 1/cos of its angle.
        const auto pass_of = [&](const probe_result<T>& p) {
          const vec3<T>& w = p.at.velocity;
          const T v = scaled_norm(w);
          const T level = scaled_norm(vec3<T>(w - T(frame.up.dot(w)) * frame.up));
          return T(abs(p.miss) * (v > T(0) ? T(level / v) : T(1)));
        };
        T best_e = hit->elevation;
        T best = *pass;
        const T ulp = epsilon<T>() * abs(best_e);
        for (const T dir : {T(1), T(-1)}) {
          for (int i = 1; i <= 64; ++i) {
            const T e = best_e + dir * ulp;
            const probe_result<T> p = flown_probe(sh, e, hit->azimuth, req.speed);
            if (!p.reached || !(pass_of(p) < best)) break;
            best_e = e;
            best = pass_of(p);
            hit = branch_hit<T>{e, hit->azimuth, p.drift, p};
          }
        }
        if (best < *pass) pass = best;
      }
      // No launch direction held in T does better than the path moves per ulp of
      // elevation: where that is more than tol (steep lofted shots onto near targets) the
      // promise is 4 such ulp, measured by central differences on two more flights.
      T allowed = tol;
      if (!(*pass <= tol)) {
        using std::max;
        T step = T(T(1) + abs(hit->elevation)) * max(T(T(1) / T(1LL << 40)), T(256 * epsilon<T>()));
        for (int i = 0; i < 4; ++i, step /= 64) {  // smaller steps while a side falls short
          const probe_result<T> up = flown_probe(sh, T(hit->elevation + step), hit->azimuth, req.speed);
          const probe_result<T> down = flown_probe(sh, T(hit->elevation - step), hit->azimuth, req.speed);
          if (!up.reached || !down.reached) continue;
          const vec3<T>& w = hit->shot.at.velocity;
          const T v = scaled_norm(w);
          const T level = scaled_norm(vec3<T>(w - T(frame.up.dot(w)) * frame.up));
          const T slope = abs(T(up.miss - down.miss)) / (2 * step) * (v > T(0) ? T(level / v) : T(1));
          const T per_ulp = slope * epsilon<T>() * abs(hit->elevation);
          if (T(4) * per_ulp > allowed) allowed = T(4) * per_ulp;
          break;
        }
      }
      if (!(*pass <= allowed))
        return fail(errc::no_convergence,
                    "the aim flown forward passes the target farther than the tolerance [m]", *pass);
    }
    const result<aim_solution<T>> s =
        complete(model, air, frame, req.launch_point, hit->shot.velocity, hit->shot.at.time, o,
                 hit->shot.reached ? std::optional<state<T>>(hit->shot.at) : std::nullopt);
    if (!s) return unexpected<error>(s.error());
    (b == 0 ? out.flat : out.lofted) = *s;
  }
  return out;
}

template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solutions<T>> aim_closed(const M& model, const medium<T>& air,
                                                  const aim_frame<T>& frame, const aim_request<T>& req,
                                                  const solve_options<T>& o) {
  const vec3<T> offset = req.target - req.launch_point;
  const time_form<T> f =
      make_time_form(model_traits<M>::linear_rate(model), air, offset, vec3<T>(vec3<T>::Zero()));
  const result<time_roots<T>> r = time_form_roots(f, req.speed, time_scale(offset, air), o.max_iterations);
  if (!r) {
    if (r.error() != errc::out_of_reach) return unexpected<error>(r.error());
    const shooter<M> sh = shooter<M>::make(model, air, frame, o, req.launch_point, req.target);
    return unexpected<error>(out_of_reach_error(model, air, req, sh.bearing, o));
  }
  aim_solutions<T> out;
  const result<aim_solution<T>> a =
      complete(model, air, frame, req.launch_point, f.velocity_at_speed(r->flat, req.speed), r->flat, o);
  if (!a) return unexpected<error>(a.error());
  out.flat = *a;
  if (r->merged) {
    out.lofted = *a;
    return out;
  }
  const result<aim_solution<T>> b =
      complete(model, air, frame, req.launch_point, f.velocity_at_speed(r->lofted, req.speed), r->lofted, o);
  if (!b) return unexpected<error>(b.error());
  out.lofted = *b;
  return out;
}

}  // namespace detail

/// Every launch direction at `req.speed` whose flight passes through `req.target`: the
/// flat solution (shorter flight) and the lofted one, with elevation, azimuth, time of
/// flight and arrival state. Under a crosswind the azimuth is corrected so that the body
/// still arrives at the target. Vacuum and linear drag are solved exactly through the
/// time of flight (see `detail::time_form`, any wind); other models by root finding on
/// `fly()` (`detail::aim_direct`). Solutions pass within `opts.tolerance` (default 64 ulp
/// of the problem's size) of the target when flown forward, or, where one ulp of elevation
/// moves the path farther than that (steep lofted shots onto near targets, extreme drag),
/// within 4 ulp of elevation times that sensitivity; else the call is `no_convergence`.
/// On flown trials (integrated models off the hodograph path) the elevation is the root
/// of the flights' own height miss, found to the tolerance or to a bracket of a few ulp:
/// where the integrated path jumps between neighbouring elevations (its step sequence
/// changes; of order the flight's tolerance times the distance) the pass is within that
/// jump instead. The promise is on the path's closest pass. The arrival state is the
/// flight's state at `time_of_flight`, where it reaches the target's horizontal distance:
/// in a steep descent it lies above or below the target by the pass over the cosine of the
/// descent angle (88 degrees: 30 times), and where the body moves farther than the
/// tolerance in one ulp of that time (a fixed-step flight that explodes to 1e6 m/s), the
/// path passes within the tolerance between the arrival and the state one ulp of time
/// before or after it.
///
/// Errors: `invalid_argument` (non-finite input, speed <= 0, target at the launch point,
/// no gravity); `out_of_reach` when no direction reaches, with `detail_value()` the
/// farthest distance [m] reachable at the target's height in the target's direction;
/// `no_convergence` if an iteration budget runs out.
/// \code
///   auto s = lob::aim(lob::linear_drag<double>{0.1}, air, {{0, 0, 0}, {40, 0, 3}, 30.0});
///   if (s && s->flat) launch(s->flat->velocity);
/// \endcode
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solutions<T>> aim(const M& model, const medium<T>& air, const aim_request<T>& req,
                                           const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<aim_solutions<T>> {
    if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_speed(req.speed); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_points(req.launch_point, req.target, air); !ok)
      return unexpected<error>(ok.error());
    const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.reference);
    if (!frame) return unexpected<error>(frame.error());
    if constexpr (model_traits<M>::closed_form) {
      return detail::aim_closed(model, air, *frame, req, o);
    } else {
      return detail::aim_direct(model, air, *frame, req, o);
    }
  });
}

namespace detail {

template <Real T>
struct speed_hit {
  T speed, drift;
  probe_result<T> shot;
};

// The speed at a fixed elevation and azimuth whose flight passes the target's distance
// at its height: the miss grows with speed towards the line of sight, so TOMS 748 on a
// bracket opened from the vacuum speed by halving and doubling.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<speed_hit<T>> speed_at(const shooter<M>& sh, const T& elevation, const T& azimuth) {
  using std::cos;
  using std::sqrt;
  using std::tan;
  const T g = sqrt(T(sh.air.gravity.squaredNorm()));
  const T c = cos(elevation);
  const T lift = sh.distance * T(tan(elevation)) - sh.rise;  // > 0: above the line of sight
  // Vacuum: u^2 = g d^2 / (2 cos^2 e (d tan e - H)) (any mechanics textbook).
  T lo = sh.distance / c * sqrt(T(g / (2 * lift)));
  auto miss = [&](const T& u) { return sh.probe(elevation, azimuth, u).miss; };
  T f_lo = miss(lo);
  for (int i = 0; !(f_lo < T(0)); ++i) {
    if (i > 200) return fail(errc::no_convergence, "speed for elevation: no lower bracket");
    lo /= 2;
    f_lo = miss(lo);
  }
  T hi = lo * 2;
  T f_hi = miss(hi);
  for (int i = 0; !(f_hi > T(0)); ++i) {
    if (i > 200 || !is_finite(hi))  // unless trial flights failed: then that is why
      return unexpected<error>(sh.explain(error(errc::out_of_reach, "no speed makes this elevation reach the target")));
    lo = hi;
    f_lo = f_hi;
    hi *= 2;
    f_hi = miss(hi);
  }
  const result<T> u = bracketed_root(miss, lo, hi, f_lo, f_hi, sh.opts.max_iterations,
                                     "speed for elevation did not converge");
  if (!u) return unexpected<error>(u.error());
  const probe_result<T> p = sh.probe(elevation, azimuth, *u);
  return speed_hit<T>{*u, p.drift, p};
}

template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solution<T>> speed_direct(const shooter<M>& sh, const T& elevation) {
  using std::abs;
  const T tol = miss_tolerance(sh.opts, T(sh.distance + abs(sh.rise)));
  result<speed_hit<T>> hit = speed_at(sh, elevation, sh.bearing);
  if (hit && abs(hit->drift) * sh.distance > tol) {
    auto solve_at = [&](const T& az) { return speed_at(sh, elevation, az); };
    hit = correct_azimuth(solve_at, sh.bearing, sh.distance, tol, sh.opts.max_azimuth_iterations);
  }
  if (!hit) return unexpected<error>(hit.error());
  return complete(sh.model, sh.air, sh.frame, sh.launch, hit->shot.velocity, hit->shot.at.time, sh.opts);
}

}  // namespace detail

/// The launch speed that makes a flight at `req.elevation` pass through `req.target`
/// (azimuth corrected for a crosswind), with the full solution. Any model, by TOMS 748
/// on the speed. Errors: `invalid_argument` for bad input, a target straight above or
/// below, or an elevation outside (-pi/2, pi/2); `out_of_reach` for an elevation at or
/// below the line of sight to the target (no speed can get there).
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solution<T>> speed_for_elevation(const M& model, const medium<T>& air,
                                                          const elevation_request<T>& req,
                                                          const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<aim_solution<T>> {
    using std::abs;
    using std::atan2;
    if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_points(req.launch_point, req.target, air); !ok)
      return unexpected<error>(ok.error());
    if (!is_finite(req.elevation) || !(abs(req.elevation) < detail::half_pi<T>()))
      return fail(errc::invalid_argument, "elevation must be finite and inside (-pi/2, pi/2)", req.elevation);
    const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.reference);
    if (!frame) return unexpected<error>(frame.error());
    const detail::shooter<M> sh =
        detail::shooter<M>::make(model, air, *frame, o, req.launch_point, req.target);
    if (!(sh.distance > T(0)))
      return fail(errc::invalid_argument, "target straight above or below: the elevation must be vertical");
    const T sight = atan2(sh.rise, sh.distance);
    if (!(req.elevation > sight))
      return fail(errc::out_of_reach,
                  "elevation is at or below the line of sight to the target, which is [rad]", sight);
    return detail::speed_direct(sh, req.elevation);
  });
}

/// The smallest launch speed that reaches `req.target`, with its elevation, azimuth and
/// arrival. Vacuum and linear drag: the minimum of the needed speed over the time of
/// flight (exact, any wind). Other models: Brent's method over the elevation of
/// `speed_for_elevation` (elevation to about half the digits of T, speed to nearly all).
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<aim_solution<T>> least_speed(const M& model, const medium<T>& air,
                                                  const target_request<T>& req,
                                                  const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<aim_solution<T>> {
    using std::atan2;
    if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_points(req.launch_point, req.target, air); !ok)
      return unexpected<error>(ok.error());
    const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.reference);
    if (!frame) return unexpected<error>(frame.error());
    if constexpr (model_traits<M>::closed_form) {
      const vec3<T> offset = req.target - req.launch_point;
      const detail::time_form<T> f =
          detail::make_time_form(model_traits<M>::linear_rate(model), air, offset, vec3<T>(vec3<T>::Zero()));
      const result<T> t = detail::least_time(f, detail::time_scale(offset, air), o.max_iterations);
      if (!t) return unexpected<error>(t.error());
      return detail::complete(model, air, *frame, req.launch_point, f.velocity(*t), *t, o);
    } else {
      const detail::shooter<M> sh =
          detail::shooter<M>::make(model, air, *frame, o, req.launch_point, req.target);
      if (!(sh.distance > T(0)))
        return fail(errc::invalid_argument,
                    "target straight above or below: least speed needs a closed-form model");
      const T sight = atan2(sh.rise, sh.distance);
      const T top = detail::half_pi<T>() * (T(1) - T(1) / T(1 << 20));
      const T big = std::numeric_limits<T>::max() / T(16);
      auto need = [&](const T& e) {
        const result<detail::speed_hit<T>> h = detail::speed_at(sh, e, sh.bearing);
        return h ? h->speed : big;
      };
      const result<std::pair<T, T>> m =
          detail::brent_min(need, T(sight + (top - sight) / T(1 << 20)), top, o.max_iterations,
                            std::numeric_limits<T>::digits / 2, "least speed: Brent search did not converge");
      if (!m) return unexpected<error>(sh.explain(m.error()));
      return detail::speed_direct(sh, m->first);
    }
  });
}

}  // namespace lob
