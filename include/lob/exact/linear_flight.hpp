#pragma once
/// \file lob/exact/linear_flight.hpp
/// `linear_flight`: the exact flight of a body under linear drag (rate k >= 0; k = 0 is
/// vacuum) in 3-D with constant wind. Closed forms for the state at any time; the apex in
/// closed form; height crossings through the Lambert W function, made uniformly accurate.

#include <cstdint>
#include <limits>
#include <utility>

#include <boost/math/special_functions/lambert_w.hpp>
#include <boost/math/tools/toms748_solve.hpp>

#include "lob/core/flight_types.hpp"
#include "lob/core/result.hpp"
#include "lob/detail/math.hpp"

namespace lob {

/// The exact flight under a = g - k (v - wind). Built by `lob::fly()` for `vacuum` and
/// `linear_drag`; a cheap value whose `const` queries never allocate.
///
/// Heights are absolute: a point's coordinate along "up" (minus gravity's direction)
/// measured from the world origin, so `landing(0)` is where the body meets the plane of
/// height 0. Accuracy: time, position and velocity within a few ulps of T for every rate,
/// including rate -> 0 where the textbook Lambert W form loses all its digits.
template <Real T>
class linear_flight {
 public:
  /// Checks the inputs and builds the flight. Errors: `invalid_argument` for a negative or
  /// non-finite rate, or a non-finite gravity, wind, position or velocity.
  [[nodiscard]] static result<linear_flight> make(const T& rate, const medium<T>& air,
                                                  const shot<T>& launch) {
    if (!is_finite(rate)) return fail(errc::invalid_argument, "drag rate must be finite", rate);
    if (rate < T(0)) return fail(errc::invalid_argument, "drag rate must be >= 0", rate);
    if (!is_finite(air.gravity)) return fail(errc::invalid_argument, "gravity must be finite");
    if (!is_finite(air.wind)) return fail(errc::invalid_argument, "wind must be finite");
    if (!is_finite(launch.position))
      return fail(errc::invalid_argument, "launch position must be finite");
    if (!is_finite(launch.velocity))
      return fail(errc::invalid_argument, "launch velocity must be finite");
    return linear_flight(rate, air, launch);
  }

  /// The state at time `t` [s] after launch, t >= 0 and finite.
  [[nodiscard]] result<state<T>> at(const T& t) const {
    if (!is_finite(t) || t < T(0))
      return fail(errc::invalid_argument, "time must be finite and >= 0", t);
    return state_at(t);
  }

  /// The highest point of the flight at or after launch: where the vertical velocity is
  /// zero, or the launch point for a shot that starts level or downward. Errors:
  /// `invalid_argument` without gravity; `never_reaches` when an upward wind at least as
  /// fast as the body's fall speed carries it up forever.
  [[nodiscard]] result<state<T>> apex() const {
    if (g_ == T(0)) return fail(errc::invalid_argument, "apex needs gravity, got |g| =", g_);
    if (k_ > T(0) && !(fall_rate() > T(0)))
      return fail(errc::never_reaches, "no apex: upward wind is at least the fall speed, wind =", w_);
    if (!(climb0() > T(0))) return state_at(T(0));
    return state_at(turn_time());
  }

  /// The state where the body crosses `height` [m] on the rising or falling branch.
  /// Errors: `invalid_argument` for a non-finite height or zero gravity; `never_reaches`
  /// when that branch never passes the height (above the apex, or below the launch on the
  /// rising branch).
  [[nodiscard]] result<state<T>> crossing(const T& height, side branch) const {
    if (!is_finite(height)) return fail(errc::invalid_argument, "height must be finite", height);
    if (g_ == T(0))
      return fail(errc::invalid_argument, "height crossings need gravity, got |g| =", g_);
    const result<T> t = crossing_time(T(height - h0_), branch);
    if (!t) return unexpected<error>(t.error());
    return state_at(*t);
  }

  /// Where the body comes down through `height` [m] (the falling crossing): time,
  /// position and velocity; `speed()` and `path_angle_below_horizon()` of the result give
  /// the landing speed and impact angle.
  [[nodiscard]] result<state<T>> landing(const T& height = T(0)) const {
    return crossing(height, side::falling);
  }

  /// Horizontal distance from the launch point to the landing at `height` [m].
  [[nodiscard]] result<T> range(const T& height = T(0)) const {
    const result<state<T>> s = landing(height);
    if (!s) return unexpected<error>(s.error());
    return horizontal_distance(*s, launch_, air_);
  }

  /// The height [m] of the apex (absolute, along "up"): the launch height for a shot that
  /// starts level or downward. Errors as for `apex()`. Computed in closed form,
  /// h0 + v^2/G * m(x) with m(x) = -log1pmx(x)/x^2 (x = k v/G, G = g - k w), which has no
  /// cancellation for any k, so it is accurate even where the apex state's height is not.
  [[nodiscard]] result<T> max_height() const {
    if (g_ == T(0)) return fail(errc::invalid_argument, "apex needs gravity, got |g| =", g_);
    if (k_ > T(0) && !(fall_rate() > T(0)))
      return fail(errc::never_reaches, "no apex: upward wind is at least the fall speed, wind =", w_);
    if (!(climb0() > T(0))) return h0_;
    return T(h0_ + apex_rise());
  }

  /// The first state at which the horizontal distance from the launch point (the length of
  /// the part of position - launch position across "up"; all three axes when there is no
  /// gravity) reaches `distance` [m], distance >= 0. In still air the path runs straight
  /// ahead and d(t) = u t phi1(k t), so t = -log1p(-k d/u)/k, evaluated as
  /// (d/u) * log1p(-x)/(-x) with x = k d/u (no cancellation as k -> 0; vacuum t = d/u).
  /// With horizontal wind the distance need not grow monotonically (a shot into the wind
  /// can be carried back); the first crossing is then found by a capped branch-and-bound
  /// bisection on bounds that hold on each monotone piece of the along-wind motion.
  /// Errors: `invalid_argument` for a negative or non-finite distance; `never_reaches` when
  /// the distance is never reached (no horizontal motion, or still air with drag where the
  /// distance tends to u/k); `no_convergence` if the capped search gives out.
  [[nodiscard]] result<state<T>> at_distance(const T& distance) const {
    if (!is_finite(distance) || distance < T(0))
      return fail(errc::invalid_argument, "distance must be finite and >= 0", distance);
    if (distance == T(0)) return state_at(T(0));
    using std::sqrt;
    const T wind_speed = sqrt(T(wind_h_.squaredNorm()));
    if (k_ == T(0) || wind_speed == T(0)) {
      // k = 0: the ground-frame horizontal velocity is constant (wind plays no part).
      const T u = k_ == T(0) ? T(sqrt(T(v0_h_.squaredNorm()))) : T(sqrt(T(u0_h_.squaredNorm())));
      if (!(u > T(0)))
        return fail(errc::never_reaches, "no horizontal motion, so no distance is reached; asked", distance);
      if (k_ == T(0)) return state_at(T(distance / u));
      const T x = k_ * distance / u;
      if (!(x < T(1)))
        return fail(errc::never_reaches, "drag stops the body short of that distance; limit u/k =", T(u / k_));
      return state_at(T(distance / u * detail::log1p_over_x(T(-x))));
    }
    const result<T> t = distance_time_in_wind(distance, wind_speed);
    if (!t) return unexpected<error>(t.error());
    return state_at(*t);
  }

  [[nodiscard]] const shot<T>& launch() const noexcept { return launch_; }
  [[nodiscard]] const medium<T>& air() const noexcept { return air_; }
  /// The drag rate k [1/s]; 0 in vacuum.
  [[nodiscard]] const T& rate() const noexcept { return k_; }

 private:
  linear_flight(const T& rate, const medium<T>& air, const shot<T>& launch)
      : k_(rate), air_(air), launch_(launch) {
    using std::sqrt;
    g_ = sqrt(T(air.gravity.squaredNorm()));
    up_ = g_ > T(0) ? vec3<T>(-air.gravity / g_) : vec3<T>(vec3<T>::Zero());
    w_ = up_.dot(air.wind);
    a_ = T(up_.dot(launch.velocity)) - w_;
    h0_ = up_.dot(launch.position);
    wind_h_ = across(air.wind);
    v0_h_ = across(launch.velocity);
    u0_h_ = across(vec3<T>(launch.velocity - air.wind));
  }

  // The part of a vector across "up" (the whole vector when there is no gravity).
  [[nodiscard]] vec3<T> across(const vec3<T>& v) const { return vec3<T>(v - T(up_.dot(v)) * up_); }

  // Apex height above the launch, v^2/G * m(x), m(x) = -log1pmx(x)/x^2 (detail::log1pmx_ratio);
  // needs climb0() > 0 and G > 0 (or k = 0).
  [[nodiscard]] T apex_rise() const {
    const T G = fall_rate();
    const T v = climb0();
    return T(v * v / G * detail::log1pmx_ratio(T(k_ * v / G)));
  }

  // Horizontal distance at time t in a horizontal wind, split along the wind (r_par) and
  // across it (r_perp): r_par = W t + U_par s, r_perp = U_perp s, s = t phi1(k t).
  struct wind_split {
    T speed, along, across;
  };
  [[nodiscard]] wind_split split(const T& wind_speed) const {
    using std::sqrt;
    const T along = T(u0_h_.dot(wind_h_)) / wind_speed;
    const T across2 = T(u0_h_.squaredNorm()) - along * along;
    return {wind_speed, along, across2 > T(0) ? T(sqrt(across2)) : T(0)};
  }
  [[nodiscard]] T along_distance(const wind_split& w, const T& t) const {
    return T(w.speed * t + w.along * t * detail::phi1(T(k_ * t)));
  }
  [[nodiscard]] T across_distance(const wind_split& w, const T& t) const {
    return T(w.across * t * detail::phi1(T(k_ * t)));
  }
  [[nodiscard]] T distance_at(const wind_split& w, const T& t) const {
    using std::sqrt;
    const T p = along_distance(w, t);
    const T q = across_distance(w, t);
    return sqrt(T(p * p + q * q));
  }

  // First time the horizontal distance reaches d > 0 with wind speed W > 0 and k > 0.
  // r_par' = W + U_par e^{-kt}: when U_par >= -W it never turns negative and the distance
  // grows monotonically (both parts grow), so TOMS 748 on [0, hi] finds the one crossing.
  // Otherwise r_par falls until t_a = log(-U_par/W)/k and rises after; on each piece
  // |r_par| is largest at an end of any sub-interval and |r_perp| grows, so
  // sqrt(max(r_par(a)^2, r_par(b)^2) + r_perp(b)^2) bounds the distance on [a, b]. A
  // depth-first, left-first bisection that drops intervals whose bound is below d then
  // finds the first crossing. hi = (d + |U|/k)/W is past it, since s <= 1/k.
  [[nodiscard]] result<T> distance_time_in_wind(const T& d, const T& wind_speed) const {
    using std::abs;
    using std::log;
    using std::sqrt;
    const wind_split w = split(wind_speed);
    const T hi = T((d + sqrt(T(u0_h_.squaredNorm())) / k_) / wind_speed);
    const T eps = detail::epsilon<T>();
    if (w.along >= -wind_speed) {
      std::uintmax_t iterations = 300;
      const auto f = [&](const T& t) { return T(distance_at(w, t) - d); };
      const std::pair<T, T> r = boost::math::tools::toms748_solve(
          f, T(0), hi, T(-d), T(distance_at(w, hi) - d),
          boost::math::tools::eps_tolerance<T>(std::numeric_limits<T>::digits - 2), iterations,
          detail::no_throw_policy{});
      if (iterations >= 300)
        return fail(errc::no_convergence, "distance search did not converge, distance", d);
      return T((r.first + r.second) / 2);
    }
    const T t_a = log(T(-w.along / wind_speed)) / k_;
    struct span {
      T a, b;
    };
    constexpr int depth = 512;
    span stack[depth];
    int n = 0;
    if (t_a < hi) {
      stack[n++] = span{t_a, hi};
      stack[n++] = span{T(0), t_a};
    } else {
      stack[n++] = span{T(0), hi};
    }
    for (int i = 0; i < 100000 && n > 0; ++i) {
      const span s = stack[--n];
      const T pa = along_distance(w, s.a);
      const T pb = along_distance(w, s.b);
      const T qb = across_distance(w, s.b);
      const T big = abs(pa) > abs(pb) ? abs(pa) : abs(pb);
      if (sqrt(T(big * big + qb * qb)) < d) continue;
      const T da = distance_at(w, s.a);
      if (da >= d) return s.a;
      const T db = sqrt(T(pb * pb + qb * qb));
      if (s.b - s.a <= 4 * eps * s.b) {
        if (db < d) continue;
        return T(s.a + (s.b - s.a) * ((d - da) / (db - da)));
      }
      const T m = (s.a + s.b) / 2;
      if (distance_at(w, m) >= d) {
        stack[n++] = span{s.a, m};
      } else {
        if (n + 2 > depth) break;
        stack[n++] = span{m, s.b};
        stack[n++] = span{s.a, m};
      }
    }
    return fail(errc::no_convergence, "distance search did not converge, distance", d);
  }

  // x(t) = x0 + wind t + u0 t phi1(kt) + g t^2 phi2(kt), u0 = v0 - wind: the solution of
  // a = g - k (v - wind) written so that k -> 0 needs no special case (phi1 -> 1, phi2 -> 1/2).
  [[nodiscard]] state<T> state_at(const T& t) const {
    using std::exp;
    const T z = k_ * t;
    const T p1 = detail::phi1(z);
    const T p2 = detail::phi2(z);
    const vec3<T> u0 = launch_.velocity - air_.wind;
    state<T> s;
    s.time = t;
    s.position = launch_.position + air_.wind * t + u0 * (t * p1) + air_.gravity * (t * t * p2);
    s.velocity = air_.wind + u0 * T(exp(-z)) + air_.gravity * (t * p1);
    return s;
  }

  // Height above the launch point and its rate, along "up".
  [[nodiscard]] T rise(const T& t) const {
    const T z = k_ * t;
    return w_ * t + a_ * t * detail::phi1(z) - g_ * t * t * detail::phi2(z);
  }
  [[nodiscard]] T climb(const T& t) const {
    using std::exp;
    const T z = k_ * t;
    return w_ + a_ * T(exp(-z)) - g_ * t * detail::phi1(z);
  }
  [[nodiscard]] T climb0() const { return T(a_ + w_); }
  // G = g - k w: positive when the body's fall speed g/k exceeds the upward wind.
  [[nodiscard]] T fall_rate() const { return T(g_ - k_ * w_); }

  // Time of zero vertical velocity, t = log(1 + k v/G) / k with v the vertical launch
  // velocity; written as (v/G) log1p(x)/x so that k = 0 gives v/g. Needs climb0() > 0 and
  // G > 0 (or k = 0).
  [[nodiscard]] T turn_time() const {
    const T G = fall_rate();
    const T v = climb0();
    return v / G * detail::log1p_over_x(T(k_ * v / G));
  }

  [[nodiscard]] result<T> crossing_time(const T& dh, side branch) const {
    const T v = climb0();
    const bool falls = k_ == T(0) || fall_rate() > T(0);
    if (!falls) return crossing_in_updraft(dh, branch);

    // The path rises on [0, t_turn] and falls on [t_turn, inf) (t_turn = 0 if v <= 0).
    const T t_turn = v > T(0) ? turn_time() : T(0);
    const T top = v > T(0) ? rise(t_turn) : T(0);
    if (dh > top) return fail(errc::never_reaches, "height is above the apex by", T(dh - top));
    if (dh == top) return t_turn;
    if (branch == side::rising) {
      if (dh < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-dh));
      if (dh == T(0)) return T(0);
    }
    if (k_ == T(0)) return vacuum_crossing(dh, branch);
    const T guess = lambert_w_guess(dh, branch);
    if (branch == side::rising) return polish(dh, T(0), t_turn, guess, +1);
    return polish_open(dh, t_turn, guess, -1);
  }

  // Vacuum: roots of (g/2) t^2 - v t + dh = 0 in the form that does not cancel (the
  // smaller root from the product of the roots, 2 dh / g).
  [[nodiscard]] T vacuum_crossing(const T& dh, side branch) const {
    using std::sqrt;
    const T v = climb0();
    T disc = v * v - 2 * g_ * dh;
    if (disc < T(0)) disc = T(0);
    const T s = sqrt(disc);
    if (branch == side::falling) return v >= T(0) ? T((v + s) / g_) : T(2 * dh / (v - s));
    return T(2 * dh / (v + s));  // rising: only asked with v > 0 and 0 < dh < top
  }

  // First estimate of a crossing time from the Lambert W form. With G = g - k w,
  // x = k v / G and q = k^2 dh / G, the crossing satisfies k t = (x - q) + (1 + W(z)),
  // z = -exp(E - 1), E = log1pmx(x) + q, on W0 (falling) or W-1 (rising). Forming z from
  // E (rather than from x and q directly) keeps its distance to the branch point -1/e,
  // s = 1 + e z = -expm1(E), accurate. Near the branch point (s < 1/100) W itself is
  // ill-conditioned, so 1 + W is summed from the branch-point series in p = +-sqrt(2 s)
  // (Corless, Gonnet, Hare, Jeffrey & Knuth, "On the Lambert W function", Adv. Comput.
  // Math. 5 (1996), eq. 4.22; coefficients from memory, the result is polished anyway).
  [[nodiscard]] T lambert_w_guess(const T& dh, side branch) const {
    using std::exp;
    using std::sqrt;
    const T G = fall_rate();
    const T x = k_ * climb0() / G;
    const T q = k_ * k_ * dh / G;
    const T E = detail::log1pmx(x) + q;
    const T s = -detail::expm1(E);
    T one_plus_w;
    if (s < T(1) / T(100)) {
      const T p = branch == side::falling ? T(sqrt(2 * s)) : T(-sqrt(2 * s));
      one_plus_w = p * (T(1) + p * (T(-1) / T(3) + p * (T(11) / T(72) +
                   p * (T(-43) / T(540) + p * (T(769) / T(17280) + p * (T(-221) / T(8505)))))));
    } else {
      const T z = -exp(T(E - 1));
      const T w = branch == side::falling ? T(boost::math::lambert_w0(z, detail::no_throw_policy{}))
                                          : T(boost::math::lambert_wm1(z, detail::no_throw_policy{}));
      one_plus_w = T(1) + w;
    }
    return (x - q + one_plus_w) / k_;
  }

  // Safeguarded Newton on rise(t) = dh inside [lo, hi], where rise - dh changes sign and
  // `direction` is +1 (rising) or -1 (falling). rise(t) is evaluated in the expm1/series
  // form above, which is accurate for every k, so the root gets the full precision of T.
  [[nodiscard]] result<T> polish(const T& dh, T lo, T hi, T t, int direction) const {
    using std::abs;
    const T eps = detail::epsilon<T>();
    if (!(t > lo && t < hi)) t = (lo + hi) / 2;
    for (int i = 0; i < 200; ++i) {
      const T f = T(rise(t) - dh) * T(direction);  // increasing in t on [lo, hi]
      if (f == T(0)) return t;
      if (f < T(0)) lo = t;
      else hi = t;
      const T slope = climb(t) * T(direction);
      T next = slope > T(0) ? T(t - f / slope) : T((lo + hi) / 2);
      if (!(next > lo && next < hi)) next = (lo + hi) / 2;
      const T step = abs(T(next - t));
      t = next;
      if (step <= 2 * eps * abs(t) || !(hi - lo > 2 * eps * abs(t))) return t;
    }
    return fail(errc::no_convergence, "height crossing did not converge, at t =", t);
  }

  // As polish() on [lo, inf): first widens an upper bound until the height is passed.
  [[nodiscard]] result<T> polish_open(const T& dh, const T& lo, const T& guess, int direction) const {
    T hi = guess > lo ? T(guess + (guess - lo) / 8) : T(lo + T(1));
    for (int i = 0; i < 4000; ++i) {
      if (T(rise(hi) - dh) * T(direction) >= T(0)) return polish(dh, lo, hi, guess, direction);
      hi = lo + 2 * (hi - lo);
      if (!is_finite(hi)) break;
    }
    return fail(errc::never_reaches, "no crossing found within the range of T, height change", dh);
  }

  // Upward wind at least the fall speed (G <= 0, k > 0): the body never falls for good.
  // Launched upward it rises forever; launched downward it sinks until its vertical
  // velocity turns (at log1p(k v / G) / k, never if G = 0) and then rises forever.
  [[nodiscard]] result<T> crossing_in_updraft(const T& dh, side branch) const {
    const T v = climb0();
    const T G = fall_rate();
    const bool turns = v < T(0) && G < T(0);
    const T t_turn = turns ? T(detail::log1p(T(k_ * v / G)) / k_) : T(0);
    if (v >= T(0) || branch == side::rising) {
      const T start = v >= T(0) ? T(0) : t_turn;
      if (v < T(0) && !turns) return fail(errc::never_reaches, "the body sinks towards a level it never passes, height change", dh);
      const T low = rise(start);
      if (dh < low) return fail(errc::never_reaches, "rising branch starts above that height, by", T(low - dh));
      if (dh == low) return start;
      return polish_open(dh, start, start, +1);
    }
    if (dh > T(0)) return fail(errc::never_reaches, "the falling branch starts below that height, by", dh);
    if (dh == T(0)) return T(0);
    if (!turns) return polish_open(dh, T(0), T(0), -1);
    const T bottom = rise(t_turn);
    if (dh < bottom) return fail(errc::never_reaches, "the body never sinks that low, short by", T(bottom - dh));
    return polish(dh, T(0), t_turn, t_turn / 2, -1);
  }

  T k_;
  medium<T> air_;
  shot<T> launch_;
  T g_{};
  vec3<T> up_;
  T w_{};   // vertical wind
  T a_{};   // vertical launch velocity relative to the air
  T h0_{};  // launch height
  vec3<T> wind_h_;  // wind across "up"
  vec3<T> v0_h_;    // launch velocity across "up"
  vec3<T> u0_h_;    // launch velocity relative to the air, across "up"
};

}  // namespace lob
