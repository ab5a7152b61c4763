#pragma once
/// \file lob/integrate/integrated_flight.hpp
/// `integrated_flight<M>`: the numerically integrated flight of any drag model without a
/// closed form (quadratic drag, linear plus quadratic drag, user models), in 3-D with
/// constant wind. Built by `lob::fly()`; the same queries as `linear_flight`.

#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <utility>

#include <boost/math/tools/roots.hpp>
#include <boost/math/tools/toms748_solve.hpp>

#include "lob/core/flight_types.hpp"
#include "lob/core/options.hpp"
#include "lob/core/result.hpp"
#include "lob/detail/math.hpp"
#include "lob/integrate/dormand_prince.hpp"
#include "lob/integrate/fixed_step.hpp"
#include "lob/integrate/hodograph.hpp"
#include "lob/models/traits.hpp"

namespace lob {

/// The flight of a body under gravity and the drag of model `M`:
/// x' = v, v' = g + a_drag(v - wind), integrated from the launch by the method that
/// `flight_options::method` names.
///
/// Every query integrates from the launch again: O(1) memory, no stored trajectory, no
/// heap, `const` and safe to call from many threads at once. Heights are absolute (the
/// coordinate along "up", minus gravity's direction, from the world origin), as in
/// `linear_flight`.
///
/// Adaptive method (default): Dormand–Prince 5(4) with proportional–integral step
/// control; events (apex, height crossings, landing, distance) are located on its dense
/// output by Boost.Math's TOMS 748 root finder to the full precision of T. The
/// integration stops at the apex and restarts there, so that the kink of |v| v where a
/// vertical throw turns over does not spoil the steps after it. Each step keeps its error
/// estimate below atol + rtol * max(|y0_i|, |y1_i|) in every position and velocity
/// component (the requested tolerances, positions relative to the launch); the requested
/// relative tolerance is then met on landing time and range (measured against a 25-digit
/// reference in tests/integrate). Fixed-step methods (RK4, semi-implicit Euler) step from the launch
/// with `fixed_step` and are reproducible bit for bit; their events are located on a
/// cubic Hermite interpolant between steps, the apex, in the step where the vertical velocity
/// turns, where the interpolated height stops rising (at or above every step end before
/// it; its vertical velocity is zero to the order of the method). A located crossing or distance is at its
/// height or distance within 2^-30 (about 9.3e-10; 1024 ulps for float) of 1 m + that
/// value + its distance from the launch, else `no_convergence` (the flight moves farther
/// in one ulp of time: an unstable fixed step whose state grows without bound). No answer
/// is inf or NaN: a fixed step whose end state's acceleration overflows T, or a state
/// between two finite steps that overflows (at(), sample(), an event), is `no_convergence`.
///
/// Models with `model_traits<M>::quadratic_fast_path` (quadratic drag) answer `apex()`,
/// `crossing()`, `landing()`, `range()` and (but for a vertical launch) `at()` and
/// `at_distance()` in still air through the hodograph quadrature
/// of integrate/hodograph.hpp when the adaptive method is chosen,
/// `flight_options::use_fast_paths` is set and the launch speed is at most
/// sqrt(largest T) / 16 (`detail::hodograph_speed_cap`).
template <DragModel M>
class integrated_flight {
 public:
  using scalar = scalar_of<M>;
  using T = scalar;

  /// Checks the inputs and builds the flight. Errors (`invalid_argument`): a model whose
  /// `check()` fails (negative or non-finite coefficients), non-finite gravity, wind,
  /// position or velocity, and options out of range: relative tolerance outside
  /// [min(1e-15, 100 eps), 1e-2], absolute tolerance not > 0, a negative initial step, a
  /// fixed step not > 0, `max_steps` < 1, `max_time` not finite and > 0.
  [[nodiscard]] static result<integrated_flight> make(const M& model, const medium<T>& air,
                                                      const shot<T>& launch,
                                                      const flight_options<T>& options = {}) {
    const status ok = check_model(model);
    if (!ok) return unexpected<error>(ok.error());
    if (const status air_ok = detail::check_air_and_launch(air, launch); !air_ok)
      return unexpected<error>(air_ok.error());
    // The drag at the launch must be a number: a coefficient near the top of T's range
    // times the launch air speed overflows, and the integration would carry inf and NaN.
    const vec3<T> air_velocity = launch.velocity - air.wind;
    if (!is_finite(vec3<T>(model.acceleration(air_velocity))))
      return fail(errc::invalid_argument, "the drag at the launch air velocity overflows T; air speed",
                  scaled_norm(air_velocity));
    const status opt = check_options(options);
    if (!opt) return unexpected<error>(opt.error());
    return integrated_flight(model, air, launch, options);
  }

  /// The state at time `t` [s] after launch, t >= 0 and finite. Errors: `invalid_argument`
  /// for a bad `t`, `time_limit` for t > max_time, `step_limit`.
  [[nodiscard]] result<state<T>> at(const T& t) const {
    if (!is_finite(t) || t < T(0)) return fail(errc::invalid_argument, "time must be finite and >= 0", t);
    if (t > options_.max_time) return fail(errc::time_limit, "time is beyond max_time, t =", t);
    if constexpr (model_traits<M>::quadratic_fast_path) {
      if (fast_ && t > T(0) && !detail::hodograph_vertical(theta0_)) return fast_at(t);
    }
    result<state<T>> out = fail(errc::no_convergence, "time was not reached");
    const status walked = walk([&](const auto& p) {
      if (t > p.t1) return false;
      out = checked_state(t, p.at(t));
      return true;
    });
    if (!walked) return unexpected<error>(walked.error());
    return out;
  }

  /// The highest point of the flight at or after launch (vertical velocity zero), or the
  /// launch point for a shot that starts level or downward. Errors: `invalid_argument`
  /// without gravity; `never_reaches` when an upward wind at least as fast as the fall
  /// speed carries the body up forever; `step_limit`, `time_limit`.
  [[nodiscard]] result<state<T>> apex() const {
    if (g_ == T(0)) return fail(errc::invalid_argument, "apex needs gravity, got |g| =", g_);
    if (lifted_)
      return fail(errc::never_reaches, "no apex: upward wind is at least the fall speed, wind =", w_up_);
    if (!(climb0_ > T(0))) return make_state(T(0), y0_);
    if constexpr (model_traits<M>::quadratic_fast_path) {
      if (fast_) return fast_apex();
    }
    result<state<T>> out = fail(errc::no_convergence, "apex was not reached");
    const status walked = walk([&](const auto& p) {
      if (!p.ends_at_apex) return false;
      out = checked_state(p.t1, p.y1);
      return true;
    });
    if (!walked) return unexpected<error>(walked.error());
    return out;
  }

  /// The state where the body crosses `height` [m] on the rising or falling branch.
  /// Errors: `invalid_argument` for a non-finite height or zero gravity; `never_reaches`
  /// when that branch never passes the height (above the apex; below the launch on the
  /// rising branch; a body that an updraft carries up forever never falls);
  /// `step_limit`, `time_limit`, `no_convergence`.
  [[nodiscard]] result<state<T>> crossing(const T& height, side branch) const {
    if (!is_finite(height)) return fail(errc::invalid_argument, "height must be finite", height);
    if (g_ == T(0)) return fail(errc::invalid_argument, "height crossings need gravity, got |g| =", g_);
    const T dh = height - h0_;
    if (lifted_) return lifted_crossing(dh, branch);
    if (!(climb0_ > T(0))) {  // no rising branch: the launch is the top
      if (dh > T(0)) return fail(errc::never_reaches, "height is above the apex by", dh);
      if (dh == T(0)) return make_state(T(0), y0_);
      if (branch == side::rising)
        return fail(errc::never_reaches, "rising branch starts above that height, by", T(-dh));
    } else if (branch == side::rising) {
      if (dh < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-dh));
      if (dh == T(0)) return make_state(T(0), y0_);
    }
    if constexpr (model_traits<M>::quadratic_fast_path) {
      if (fast_) return fast_crossing(dh, branch);
    }
    result<state<T>> out = fail(errc::no_convergence, "height crossing was not reached");
    const status walked = walk([&](const auto& p) {
      const auto f = [&](const T& s) { return T(up_.dot(p.position_at(s)) - dh); };
      if (branch == side::rising) {
        if (p.branch != tag::rising) return false;
        const T fa = f(p.t0);
        const T fb = f(p.t1);
        if (fa < T(0) && fb >= T(0)) {
          out = located(f, p, fa, fb, height);
          return true;
        }
        if (p.ends_at_apex) {
          out = fail(errc::never_reaches, "height is above the apex by", T(dh - up_.dot(p.y1.position)));
          return true;
        }
        return false;
      }
      if (p.branch == tag::rising) {
        if (!p.ends_at_apex) return false;
        const T top = up_.dot(p.y1.position);
        if (top < dh) {
          out = fail(errc::never_reaches, "height is above the apex by", T(dh - top));
          return true;
        }
        if (top == dh) {
          out = checked_state(p.t1, p.y1);
          return true;
        }
        return false;
      }
      const T fa = f(p.t0);
      const T fb = f(p.t1);
      if (fa > T(0) && fb <= T(0)) {
        out = located(f, p, fa, fb, height);
        return true;
      }
      return false;
    });
    if (!walked) return unexpected<error>(walked.error());
    return out;
  }

  /// Where the body comes down through `height` [m]: the falling crossing.
  [[nodiscard]] result<state<T>> landing(const T& height = T(0)) const {
    return crossing(height, side::falling);
  }

  /// Horizontal distance from the launch point to the landing at `height` [m].
  [[nodiscard]] result<T> range(const T& height = T(0)) const {
    // From the displacement itself: the same flight with its launch at the origin (heights
    // stay absolute through h0_), so that a launch point near the top of T's range does
    // not round the range away in landing position - launch position.
    integrated_flight local = *this;
    local.launch_.position = vec3<T>::Zero();
    const result<state<T>> s = local.landing(height);
    if (!s) return unexpected<error>(s.error());
    const T r = level_distance(s->position);
    if (!is_finite(r)) return fail(errc::no_convergence, "range overflows", r);
    return r;
  }

  /// The first state whose horizontal distance from the launch point reaches `distance`
  /// [m] (the flight continues below the landing plane). Errors: `invalid_argument` for a
  /// negative or non-finite distance; `never_reaches` when the flight provably stops short
  /// of it (a vertical launch, or the limit of the descent on the hodograph path and for
  /// models with a linear drag part in air without side wind, as the closed forms say);
  /// `time_limit` when it is not reached by max_time; `step_limit`.
  [[nodiscard]] result<state<T>> at_distance(const T& distance) const {
    if (!is_finite(distance) || distance < T(0))
      return fail(errc::invalid_argument, "distance must be finite and >= 0", distance);
    if (distance == T(0)) return make_state(T(0), y0_);
    if constexpr (model_traits<M>::quadratic_fast_path) {
      if (fast_) return fast_at_distance(distance);  // a vertical launch: never_reaches
    }
    result<state<T>> out = fail(errc::no_convergence, "distance was not reached");
    const status walked = walk([&](const auto& p) {
      const auto f = [&](const T& s) { return T(level_distance(p.position_at(s)) - distance); };
      const T fa = f(p.t0);
      const T fb = f(p.t1);
      if (!(fa < T(0) && fb >= T(0))) return short_of(p.y1, distance, out);
      out = located(f, p, fa, fb, distance);
      return true;
    });
    if (!walked) return unexpected<error>(walked.error());
    return out;
  }

  /// Writes `out.size()` states evenly spaced in time over [0, t_end] (one state: the
  /// launch) in one pass, and returns how many it wrote. Errors: `invalid_argument` for a
  /// negative or non-finite `t_end`, `time_limit` for t_end > max_time, `step_limit`.
  [[nodiscard]] result<std::size_t> sample(std::span<state<T>> out, const T& t_end) const {
    if (!is_finite(t_end) || t_end < T(0))
      return fail(errc::invalid_argument, "sample end time must be finite and >= 0", t_end);
    if (t_end > options_.max_time) return fail(errc::time_limit, "sample end time is beyond max_time", t_end);
    const std::size_t n = out.size();
    if (n == 0) return std::size_t{0};
    std::size_t i = 0;
    status overflow{};
    const auto time_of = [&](std::size_t j) {
      return n == 1 ? T(0) : T(t_end * T(static_cast<long long>(j)) / T(static_cast<long long>(n - 1)));
    };
    const status walked = walk([&](const auto& p) {
      while (i < n) {
        const T t = i + 1 == n ? t_end : time_of(i);
        if (t > p.t1) return false;
        const result<state<T>> s = checked_state(t, p.at(t));
        if (!s) {
          overflow = unexpected<error>(s.error());
          return true;
        }
        out[i] = *s;
        ++i;
      }
      return true;
    });
    if (!walked) return unexpected<error>(walked.error());
    if (!overflow) return unexpected<error>(overflow.error());
    return n;
  }

  [[nodiscard]] const shot<T>& launch() const noexcept { return launch_; }
  [[nodiscard]] const medium<T>& air() const noexcept { return air_; }
  [[nodiscard]] const M& model() const noexcept { return model_; }
  [[nodiscard]] const flight_options<T>& options() const noexcept { return options_; }

 private:
  enum class tag { rising, falling, any };

  // The acceleration of the body for its velocity: gravity plus drag in the moving air.
  struct accel_fn {
    const M* model;
    vec3<T> gravity;
    vec3<T> wind;
    [[nodiscard]] vec3<T> operator()(const vec3<T>& v) const {
      return vec3<T>(gravity + vec3<T>(model->acceleration(vec3<T>(v - wind))));
    }
  };

  // One accepted Dormand–Prince step seen by a query; its dense output is built on first use.
  struct adaptive_piece {
    T t0, t1;
    const detail::phase<T>& y0;
    const detail::phase<T>& y1;
    const detail::dp5_stages<T>& k;
    tag branch;
    bool ends_at_apex;
    mutable std::optional<detail::dp5_dense<T>> dense{};
    [[nodiscard]] detail::phase<T> at(const T& t) const {
      if (t == t1) return y1;
      if (t == t0) return y0;
      if (!dense) dense.emplace(t0, T(t1 - t0), y0, y1, k);
      return (*dense)(t);
    }
    [[nodiscard]] vec3<T> position_at(const T& t) const {
      if (t == t1) return y1.position;
      if (t == t0) return y0.position;
      if (!dense) dense.emplace(t0, T(t1 - t0), y0, y1, k);
      return dense->position(t);
    }
  };

  // A fixed step, or the part of one before or after the apex, over its Hermite interpolant.
  struct fixed_piece {
    T t0, t1;
    const detail::phase<T>& y0;
    const detail::phase<T>& y1;
    const detail::hermite_piece<T>& curve;
    tag branch;
    bool ends_at_apex;
    [[nodiscard]] detail::phase<T> at(const T& t) const {
      if (t == t1) return y1;
      if (t == t0) return y0;
      return curve(t);
    }
    [[nodiscard]] vec3<T> position_at(const T& t) const {
      if (t == t1) return y1.position;
      if (t == t0) return y0.position;
      return curve.position(t);
    }
  };

  integrated_flight(const M& model, const medium<T>& air, const shot<T>& launch,
                    const flight_options<T>& options)
      : model_(model), air_(air), launch_(launch), options_(options) {
    using std::max;
    using std::sqrt;
    g_ = sqrt(T(air.gravity.squaredNorm()));
    up_ = g_ > T(0) ? vec3<T>(-air.gravity / g_) : vec3<T>(vec3<T>::Zero());
    w_up_ = up_.dot(air.wind);
    wind_level_ = level_distance(air.wind);
    climb0_ = up_.dot(launch.velocity);
    h0_ = up_.dot(launch.position);
    // Positions are integrated relative to the launch point: the error control and the
    // events then do not depend on where the world origin is.
    y0_.position = vec3<T>::Zero();
    y0_.velocity = launch.velocity;
    // An updraft lifts the body for good when, at zero vertical velocity (air streaming
    // down past it at the updraft speed), drag pushes up at least as hard as gravity pulls:
    // then the vertical velocity can never turn negative. For quadratic drag this is
    // wind >= terminal speed.
    if (g_ > T(0) && w_up_ > T(0)) {
      const vec3<T> drag = model.acceleration(vec3<T>(-w_up_ * up_));
      lifted_ = T(up_.dot(drag)) >= g_;
    }
    apex_pending_ = g_ > T(0) && !lifted_ && climb0_ > T(0);
    // The steps are controlled at the requested tolerances: each step's error estimate
    // (of the embedded 4th-order solution, while the 5th-order one is propagated) is kept
    // below atol + rtol * max(|y0_i|, |y1_i|) in every component. That keeps the global
    // error of landing time, range and apex below the request over the measured cases
    // (tests/integrate/reference_test.cpp, 1e-6 to 1e-13; worst about 0.7 of it, at 1e-6).
    // Roundoff floor: below about 10 eps the error estimate is noise.
    rtol_ = max(T(options.relative_tolerance), T(10 * detail::epsilon<T>()));
    atol_ = T(options.absolute_tolerance);
    if constexpr (model_traits<M>::quadratic_fast_path) {
      c_ = model_traits<M>::quadratic_coefficient(model);
      fast_ = options.use_fast_paths && options.method == stepper::adaptive && air.wind == vec3<T>::Zero() &&
              c_ > T(0) && g_ > T(0) && launch.velocity != vec3<T>::Zero();
      if (fast_) {
        using std::atan2;
        const vec3<T> level = launch.velocity - climb0_ * up_;
        const T level_speed = sqrt(T(level.squaredNorm()));
        level_ = level_speed > T(0) ? vec3<T>(level / level_speed) : vec3<T>(vec3<T>::Zero());
        v0_ = sqrt(T(launch.velocity.squaredNorm()));
        theta0_ = atan2(climb0_, level_speed);
        // Faster launches fly on the integrated path (see hodograph_speed_cap).
        fast_ = v0_ <= detail::hodograph_speed_cap<T>();
        fast_cost_ = detail::hodograph_query_cost(c_, g_, v0_);
      }
    }
  }

  [[nodiscard]] static status check_options(const flight_options<T>& o) {
    using std::min;
    const T lowest = min(T(T(1) / T(1000000000000000LL)), T(100 * detail::epsilon<T>()));
    if (o.method != stepper::adaptive && o.method != stepper::rk4 && o.method != stepper::semi_implicit_euler)
      return fail(errc::invalid_argument, "unknown stepping method", static_cast<int>(o.method));
    if (!is_finite(o.relative_tolerance) || o.relative_tolerance < lowest ||
        o.relative_tolerance > T(1) / T(100))
      return fail(errc::invalid_argument, "relative tolerance must be in [1e-15, 1e-2]",
                  o.relative_tolerance);
    if (!is_finite(o.absolute_tolerance) || !(o.absolute_tolerance > T(0)))
      return fail(errc::invalid_argument, "absolute tolerance must be finite and > 0", o.absolute_tolerance);
    if (!is_finite(o.initial_step) || o.initial_step < T(0))
      return fail(errc::invalid_argument, "initial step must be finite and >= 0", o.initial_step);
    if (!is_finite(o.fixed_step) || !(o.fixed_step > T(0)))
      return fail(errc::invalid_argument, "fixed step must be finite and > 0", o.fixed_step);
    if (o.max_steps < 1) return fail(errc::invalid_argument, "max_steps must be >= 1", o.max_steps);
    if (!is_finite(o.max_time) || !(o.max_time > T(0)))
      return fail(errc::invalid_argument, "max_time must be finite and > 0", o.max_time);
    return {};
  }

  [[nodiscard]] state<T> make_state(const T& t, const detail::phase<T>& y) const {
    state<T> s;
    s.time = t;
    s.position = launch_.position + y.position;
    s.velocity = y.velocity;
    return s;
  }

  // make_state for an answer: a state between two finite step ends can still overflow T
  // (an interpolant's slope term is a step length times an acceleration, and a launch
  // point near the top of T's range plus the displacement can round to infinity), and
  // a success is never inf or NaN. A semi-implicit Euler step of 1e6 s under a drag rate
  // of 1e300 /s ended at a finite state whose acceleration overflowed, and the crossing
  // in that step had an infinite velocity (fuzz_flight crash-8820781d).
  [[nodiscard]] result<state<T>> checked_state(const T& t, const detail::phase<T>& y) const {
    const state<T> s = make_state(t, y);
    if (!is_finite(s.position) || !is_finite(s.velocity))
      return fail(errc::no_convergence, "the state overflows T between two steps at t =", t);
    return s;
  }

  [[nodiscard]] T horizontal_distance(const vec3<T>& position) const {
    return level_distance(vec3<T>(position - launch_.position));
  }
  // The horizontal length of a displacement.
  [[nodiscard]] T level_distance(const vec3<T>& d) const {
    // Scaled: a fixed-step flight launched at 1e154 m/s lands 1e156 m out, where the
    // squared distance overflows (range() returned inf as success, fuzz_flight).
    return scaled_norm(vec3<T>(d - T(up_.dot(d)) * up_));
  }

  // Locates the root of f in a piece where f changes sign (fa, fb at its ends) with TOMS
  // 748 (Alefeld, Potra & Shi 1995, Boost.Math) to the full precision of T, and returns
  // the state there, or time_limit when it lies beyond max_time. `value` is the event's
  // target (a height or a distance [m]). The state must meet it within
  // event_tolerance() x (1 m + |value| + its distance from the launch); where no time of T
  // does (the root's time or an ulp either side), the flight moves farther than that in
  // one ulp of time at the event, and the answer is no_convergence naming the miss: a
  // semi-implicit Euler step of 1/60 s at a drag coefficient of 8e11 /m, unstable, grew
  // the speed to 1e27 m/s within three steps and put a crossing 12 m off its height
  // (fuzz_flight crash-b86eac39).
  template <class F, class Piece>
  [[nodiscard]] result<state<T>> located(const F& f, const Piece& p, const T& fa, const T& fb,
                                         const T& value) const {
    using std::abs;
    using std::nextafter;
    const result<T> t = root(f, p.t0, p.t1, fa, fb);
    if (!t) return unexpected<error>(t.error());
    if (*t > options_.max_time) return fail(errc::time_limit, "the event lies beyond max_time, at t =", *t);
    // The tolerance of each candidate time comes from its own state: taken from the root's
    // (8.8e39 m out, between a step ending 1.3e26 m out and one 1e71 m out) it passed the
    // previous ulp, the step end, 3.9e23 m off the height.
    const auto off = [&](const T& s, const detail::phase<T>& y) {
      return T(abs(T(f(s))) / (event_tolerance() * (T(1) + abs(value) + T(scaled_norm(y.position)))));
    };
    const detail::phase<T> y = p.at(*t);
    T best = *t;
    T ratio = off(best, y);  // miss over its tolerance
    if (!(ratio <= T(1))) {
      for (const T& s : {T(nextafter(*t, p.t0)), T(nextafter(*t, p.t1))}) {
        if (!(s >= p.t0 && s <= p.t1)) continue;
        const T r = off(s, p.at(s));
        if (r < ratio) {
          best = s;
          ratio = r;
        }
      }
      if (!(ratio <= T(1)))
        return fail(errc::no_convergence,
                    "the event cannot be located: the flight moves farther than the event tolerance "
                    "within one ulp of time (a fixed step too long for this drag?); miss over tolerance",
                    ratio);
    }
    return checked_state(best, best == *t ? y : p.at(best));
  }

  // Relative tolerance of a located event against its size: 2^-30 (about 9.3e-10), or
  // 1024 ulps where T has fewer digits (float). A well-behaved flight meets it with room:
  // the root is located to an ulp or two of time, where the state moves by its speed times
  // that ulp.
  [[nodiscard]] static T event_tolerance() {
    using std::max;
    return max(T(T(1) / T(1LL << 30)), T(1024 * detail::epsilon<T>()));
  }

  template <class F>
  [[nodiscard]] static result<T> root(const F& f, const T& a, const T& b, const T& fa, const T& fb) {
    if (fa == T(0)) return a;
    if (fb == T(0) || (fa < T(0)) == (fb < T(0))) return b;
    std::uintmax_t iterations = 200;
    const std::pair<T, T> r = boost::math::tools::toms748_solve(
        f, a, b, fa, fb, boost::math::tools::eps_tolerance<T>(), iterations, detail::no_throw_policy{});
    if (iterations >= 200)
      return fail(errc::no_convergence, "event location did not converge, near t =", r.first);
    return T((r.first + r.second) / 2);
  }

  // Whether the body provably stops short of `distance` after the phase y (then `out`
  // says never_reaches): for models whose drag per air speed is at least a known rate k
  // (`model_traits<M>::least_rate`), in air without horizontal wind the horizontal
  // velocity shrinks at least like e^-kt along a fixed direction, so at most |u|/k more
  // distance is covered. Other models and side winds search until max_time.
  [[nodiscard]] bool short_of(const detail::phase<T>& y, const T& distance, result<state<T>>& out) const {
    if constexpr (requires(const M& m) {
                    { model_traits<M>::least_rate(m) } -> std::convertible_to<T>;
                  }) {
      const T k = model_traits<M>::least_rate(model_);
      if (!(k > T(0)) || wind_level_ != T(0)) return false;
      const T limit = level_distance(y.position) + level_distance(y.velocity) / k;
      if (!(limit < distance)) return false;
      out = fail(errc::never_reaches, "drag stops the body short of that distance; limit at most", limit);
      return true;
    } else {
      (void)y, (void)distance, (void)out;
      return false;
    }
  }

  // Takes n steps from the solver's shared pool, if there is one.
  [[nodiscard]] status draw_shared(std::int64_t n) const {
    if (options_.shared_steps && !options_.shared_steps->draw(n))
      return fail(errc::step_limit, "the solver used its whole step budget (solve_options::max_total_steps)");
    return {};
  }

  // Walks the flight from the launch, calling visit(piece) for each step (split at the
  // apex) until it returns true. Errors: step_limit, time_limit, no_convergence.
  template <class Visit>
  [[nodiscard]] status walk(const Visit& visit) const {
    if (options_.method == stepper::adaptive) return walk_adaptive(visit);
    return walk_fixed(visit);
  }

  [[nodiscard]] tag current_tag(bool before_apex) const {
    if (lifted_ || g_ == T(0)) return tag::any;
    return before_apex ? tag::rising : tag::falling;
  }

  template <class Visit>
  [[nodiscard]] status walk_adaptive(const Visit& visit) const {
    using std::abs;
    using std::min;
    const detail::drag_in_wind<T, M> f{&model_, air_.gravity, air_.wind};
    detail::phase<T> y = y0_;
    detail::phase<T> fy = detail::derivative(f, y);
    detail::phase<T> y1;
    detail::dp5_stages<T> k;
    detail::pi_controller<T> control;
    T t(0);
    T h = options_.initial_step > T(0)
              ? T(options_.initial_step)
              : detail::dp5_initial_step(f, y, fy, rtol_, atol_, T(options_.max_time));
    bool before_apex = apex_pending_;
    // One piece for the whole walk, its ends updated per step: it refers to y, y1 and k,
    // and building a fresh one each step cleared its dense-output storage every time.
    adaptive_piece p{t, t, y, y1, k, tag::any, false};
    for (std::int64_t n = 0;; ++n) {
      if (!(t < options_.max_time))
        return fail(errc::time_limit, "the event was not reached within max_time =", options_.max_time);
      if (n >= options_.max_steps)
        return fail(errc::step_limit, "integration used its whole step budget (max_steps) at t =", t);
      if (const status d = draw_shared(1); !d) return d;
      const T err = detail::dp5_step(f, y, fy, h, y1, k, rtol_, atol_);
      if (!(err <= T(1))) {  // rejected (or not finite: retry smaller)
        h = control.next(h, is_finite(err) ? err : T(1000000), false);
        if (!(h > T(16) * detail::epsilon<T>() * abs(t)))
          return fail(errc::no_convergence, "step size fell below the resolution of time at t =", t);
        continue;
      }
      const T t1 = t + h;
      if (!(t1 > t))  // a step that does not advance time would be accepted forever
        return fail(errc::no_convergence, "step size fell below the resolution of time at t =", t);
      const T h_next = control.next(h, err, true);
      if (before_apex && !(T(up_.dot(y1.velocity)) > T(0))) {
        // Stop at the apex and restart there: locate it on the dense output, then take
        // the step again with exactly the length that ends there.
        const detail::dp5_dense<T> dense(t, h, y, y1, k);
        const auto climb = [&](const T& s) { return T(up_.dot(dense(s).velocity)); };
        const result<T> ta = root(climb, t, t1, T(up_.dot(y.velocity)), climb(t1));
        if (!ta) return unexpected<error>(ta.error());
        T t_apex = *ta;
        T ha = t_apex - t;
        if (ha > T(0)) {
          (void)detail::dp5_step(f, y, fy, ha, y1, k, rtol_, atol_);
          // Where |v| v has a kink inside the step (a vertical throw turning over), the
          // dense output misplaces the apex; Newton steps on the vertical velocity at the
          // end of the retaken step, v_up' = up . a, put it back to within the tolerance.
          // The slack is a quarter of the step tolerance on the launch speed: a vertical
          // velocity of that size misplaces the apex time by slack / g, which must stay
          // below rtol times the apex time (a small correction costs one evaluation only).
          using std::abs;
          using std::sqrt;
          const T slack = (atol_ + rtol_ * T(sqrt(T(y0_.velocity.squaredNorm())))) / 4;
          for (int i = 0; i < 4; ++i) {
            const T miss = up_.dot(y1.velocity);
            const T slope = up_.dot(k.k7.velocity);
            if (!(abs(miss) > slack) || !(slope < T(0))) break;
            const T dt = -miss / slope;
            const T next = t_apex + dt;
            if (!(next > t) || !(next < t + 2 * h)) break;
            if (abs(dt) < ha / 100) {
              // A small move: a Taylor step from the end of the retaken step (its errors
              // are of order dt^2 |a'| and dt^3 |a'|, far below the tolerance here).
              y1.position += dt * y1.velocity + (dt * dt / 2) * k.k7.velocity;
              y1.velocity += dt * k.k7.velocity;
              k.k7 = detail::derivative(f, y1);
              t_apex = next;
              break;
            }
            t_apex = next;
            ha = t_apex - t;
            (void)detail::dp5_step(f, y, fy, ha, y1, k, rtol_, atol_);
          }
        } else {
          y1 = y;
          k.k7 = fy;
        }
        p.t0 = t;
        p.t1 = t_apex;
        p.branch = tag::rising;
        p.ends_at_apex = true;
        p.dense.reset();
        if (visit(std::as_const(p))) return {};
        t = t_apex;
        before_apex = false;
      } else {
        p.t0 = t;
        p.t1 = t1;
        p.branch = current_tag(before_apex);
        p.ends_at_apex = false;
        p.dense.reset();
        if (visit(std::as_const(p))) return {};
        t = t1;
      }
      y = y1;
      fy = k.k7;  // first same as last
      h = h_next;
    }
  }

  template <class Visit>
  [[nodiscard]] status walk_fixed(const Visit& visit) const {
    const accel_fn f{&model_, air_.gravity, air_.wind};
    const T h = options_.fixed_step;
    const bool rk4 = options_.method == stepper::rk4;
    detail::phase<T> y = y0_;
    detail::phase<T> fy = detail::derivative(f, y);
    if (!is_finite(fy.velocity))
      return fail(errc::invalid_argument, "gravity plus the drag at the launch overflows T; |g| =", g_);
    bool before_apex = apex_pending_;
    for (std::int64_t n = 0;; ++n) {
      // Step times from the step count, never by summing h, so that they do not drift.
      const T t0 = T(n) * h;
      if (!(t0 < options_.max_time))
        return fail(errc::time_limit, "the event was not reached within max_time =", options_.max_time);
      if (n >= options_.max_steps)
        return fail(errc::step_limit, "integration used its whole step budget (max_steps) at t =", t0);
      if (const status d = draw_shared(1); !d) return d;
      const T t1 = T(n + 1) * h;
      const detail::phase<T> y1 =
          rk4 ? detail::rk4_step(f, y, fy, h) : detail::semi_implicit_euler_step(y, fy, h);
      // A fixed step has no error control: too long a step for a strong drag overshoots
      // and the state grows without bound, which must end as an error, not as inf or NaN.
      if (!is_finite(y1.position) || !is_finite(y1.velocity))
        return fail(errc::no_convergence,
                    "the fixed step is unstable for this drag: the state overflows at t =", t0);
      const detail::phase<T> f1 = detail::derivative(f, y1);
      // A finite state whose drag overflows (a step of 1e6 s under a drag rate of 1e300 /s)
      // has no next step and no interpolant: the Hermite slopes would be infinite.
      if (!is_finite(f1.velocity))
        return fail(errc::no_convergence,
                    "the fixed step is unstable for this drag: the acceleration overflows at t =", t1);
      const detail::hermite_piece<T> curve(t0, h, y, fy, y1, f1);
      if (before_apex && !(T(up_.dot(y1.velocity)) > T(0))) {
        // The apex is the top of the interpolated path, where its height stops rising: with
        // a step longer than the rise (semi-implicit Euler, 0.98 s steps, 6 m/s up) the zero
        // of the interpolated velocity lay 1.4 m below the launch.
        const auto climb = [&](const T& s) { return T(up_.dot(curve.position_slope(s))); };
        const result<T> ta = root(climb, t0, t1, T(up_.dot(y.velocity)), T(up_.dot(y1.velocity)));
        if (!ta) return unexpected<error>(ta.error());
        const detail::phase<T> ya = curve(*ta);
        if (visit(fixed_piece{t0, *ta, y, ya, curve, tag::rising, true})) return {};
        if (visit(fixed_piece{*ta, t1, ya, y1, curve, tag::falling, false})) return {};
        before_apex = false;
      } else if (visit(fixed_piece{t0, t1, y, y1, curve, current_tag(before_apex), false})) {
        return {};
      }
      y = y1;
      fy = f1;
    }
  }

  // Under an updraft that lifts the body for good: it rises forever once its vertical
  // velocity is >= 0, so a falling crossing exists only while it still sinks after a
  // downward launch, and a rising crossing only above the lowest point.
  [[nodiscard]] result<state<T>> lifted_crossing(const T& dh, side branch) const {
    if (branch == side::falling && climb0_ >= T(0))
      return fail(errc::never_reaches,
                  "an updraft at least the fall speed carries the body up for good, wind =", w_up_);
    if (branch == side::rising && climb0_ >= T(0)) {
      if (dh < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-dh));
      if (dh == T(0)) return make_state(T(0), y0_);
    }
    if (branch == side::falling && dh >= T(0)) {
      if (dh == T(0)) return make_state(T(0), y0_);
      return fail(errc::never_reaches, "height is above the launch of a sinking body by", dh);
    }
    result<state<T>> out = fail(errc::no_convergence, "height crossing was not reached");
    const status walked = walk([&](const auto& p) {
      const auto f = [&](const T& s) { return T(up_.dot(p.position_at(s)) - dh); };
      const T fa = f(p.t0);
      const T fb = f(p.t1);
      const bool rises_at_end = T(up_.dot(p.y1.velocity)) >= T(0);
      if (branch == side::rising) {
        if (fa < T(0) && fb >= T(0)) {
          out = located(f, p, fa, fb, T(h0_ + dh));
          return true;
        }
        if (rises_at_end && T(up_.dot(p.y0.velocity)) < T(0) && fb > T(0)) {
          out = fail(errc::never_reaches, "the body turns up above that height, by", fb);
          return true;
        }
        return false;
      }
      if (fa > T(0) && fb <= T(0)) {
        out = located(f, p, fa, fb, T(h0_ + dh));
        return true;
      }
      if (rises_at_end) {
        out = fail(errc::never_reaches, "the body turns up before it sinks to that height, short by",
                   T(up_.dot(p.y1.position) - dh));
        return true;
      }
      return false;
    });
    if (!walked) return unexpected<error>(walked.error());
    return out;
  }

  // The hodograph fast path (quadratic drag in still air, integrate/hodograph.hpp): its
  // answers are relative to the launch in the vertical plane of the launch velocity, so
  // they are turned back into a 3-D state along that plane's level direction and "up".
  // Each answer passes through fast_result: an event after max_time is time_limit, as on
  // the integrated path.
  [[nodiscard]] result<state<T>> fast_apex() const {
    if (const status d = draw_shared(fast_cost_); !d) return unexpected<error>(d.error());
    return fast_result(detail::hodograph_apex(c_, g_, v0_, theta0_));
  }
  [[nodiscard]] result<state<T>> fast_crossing(const T& dh, side branch) const {
    if (const status d = draw_shared(fast_cost_); !d) return unexpected<error>(d.error());
    return fast_result(detail::hodograph_crossing(c_, g_, v0_, theta0_, dh, branch));
  }
  [[nodiscard]] result<state<T>> fast_at(const T& t) const {
    if (const status d = draw_shared(fast_cost_); !d) return unexpected<error>(d.error());
    return fast_result(detail::hodograph_at_time(c_, g_, v0_, theta0_, t));
  }
  [[nodiscard]] result<state<T>> fast_at_distance(const T& distance) const {
    if (const status d = draw_shared(fast_cost_); !d) return unexpected<error>(d.error());
    return fast_result(detail::hodograph_at_distance(c_, g_, v0_, theta0_, distance, T(options_.max_time)));
  }
  [[nodiscard]] result<state<T>> fast_result(const result<detail::hodograph_point<T>>& p) const {
    if (!p) return unexpected<error>(p.error());
    if (p->time > options_.max_time)
      return fail(errc::time_limit, "the event lies beyond max_time, at t =", p->time);
    const state<T> s = from_hodograph(*p);
    if (!is_finite(s.position) || !is_finite(s.velocity))
      return fail(errc::no_convergence, "the state overflows T on the hodograph path at t =", p->time);
    return s;
  }
  [[nodiscard]] state<T> from_hodograph(const detail::hodograph_point<T>& p) const {
    using std::cos;
    using std::sin;
    state<T> s;
    s.time = p.time;
    s.position = launch_.position + p.distance * level_ + p.rise * up_;
    s.velocity = p.speed * (T(cos(p.inclination)) * level_ + T(sin(p.inclination)) * up_);
    return s;
  }

  M model_;
  medium<T> air_;
  shot<T> launch_;
  flight_options<T> options_;
  detail::phase<T> y0_;
  T g_{};
  vec3<T> up_;
  T w_up_{};     // wind along up
  T wind_level_{};  // horizontal wind speed
  T climb0_{};   // vertical launch velocity
  T h0_{};       // launch height
  T rtol_{};
  T atol_{};
  T c_{};        // fast path only: quadratic coefficient,
  T v0_{};       // launch speed,
  T theta0_{};   // launch inclination,
  vec3<T> level_ = vec3<T>::Zero();  // and level direction of the launch
  bool lifted_ = false;
  bool apex_pending_ = false;
  bool fast_ = false;
  std::int64_t fast_cost_ = step_pool::fast_query_cost;  // steps charged per fast query
};

}  // namespace lob
