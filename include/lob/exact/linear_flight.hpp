#pragma once
/// \file lob/exact/linear_flight.hpp
/// `linear_flight`: the exact flight of a body under linear drag (rate k >= 0; k = 0 is
/// vacuum) in 3-D with constant wind. Closed forms for the state at any time; the apex in
/// closed form; height crossings through the Lambert W function, made uniformly accurate.
///
/// Why a reformulation is needed: the textbook flight time (Warburton & Wang, Am. J. Phys.
/// 72 (2004); Packel & Yuen, College Math. J. 35 (2004)) is t = (1 + x + W0(z))/k with
/// x = k v/g and z = -(1 + x) e^-(1 + x). As k -> 0, z sits next to the branch point -1/e
/// and 1 + W0(z) ~ sqrt(2 (1 + e z)): rounding z alone (relative 1e-16) leaves 1 + e z
/// with an absolute error of 1e-16, so 1 + W0 and t lose half their digits at x = 1e-8 and
/// all of them below. Here the crossing time is written as
///   t = t_apex + k (H - dh)/G + u(p)/k,   p = k sqrt(2 (H - dh)/G),
/// with G = g - k w (w the vertical wind), H the apex height above the launch in a form
/// that does not cancel (v^2/G * m(x), m = -log1pmx(x)/x^2), and u = 1 + W(z) found from p
/// itself: by a branch-point series in p when |p| <= 1/2, by Boost's lambert_w0/lambert_wm1
/// of z = -exp(-p^2/2 - 1) (far enough from -1/e to be well conditioned) otherwise.
/// u(p)/k = sqrt(2 (H - dh)/G) * (u/p), so k = 0 is the vacuum formula with no special case
/// and the transition is smooth. Every term is >= 0 on the falling branch of an upward or
/// level shot, so nothing cancels there and no iteration is needed (the reference tests
/// show a few ulps). On the rising branch, where terms of opposite sign meet, the value is
/// polished by safeguarded Newton on the explicit height. A downward shot has its apex in
/// the past, so its crossing is solved in a form of positive terms instead (see
/// downward_crossing). Measured against 50-digit references (tests/exact): double within
/// 2e-15 relative in time, range, apex height and landing speed; float 1.1e-6.

#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <type_traits>
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
  /// non-finite rate, a non-finite gravity, wind, position or velocity, a gravity, wind or
  /// launch (air) velocity whose square overflows T, or a `max_time` [s] not > 0.
  /// Every query whose event lies after `max_time` returns `time_limit` (as integrated
  /// flights do); `fly()` passes `flight_options::max_time`, and a flight built here
  /// directly has no cap (the closed forms need none).
  [[nodiscard]] static result<linear_flight> make(const T& rate, const medium<T>& air, const shot<T>& launch,
                                                  const T& max_time = std::numeric_limits<T>::infinity()) {
    if (!is_finite(rate)) return fail(errc::invalid_argument, "drag rate must be finite", rate);
    if (rate < T(0)) return fail(errc::invalid_argument, "drag rate must be >= 0", rate);
    if (const status ok = detail::check_air_and_launch(air, launch); !ok)
      return unexpected<error>(ok.error());
    if (!(max_time > T(0))) return fail(errc::invalid_argument, "max_time must be > 0", max_time);
    // The closed forms carry gravity + k wind: a rate of 1.8e308 /s in a wind of 10 m/s
    // gave an infinite pull and a state of inf at t = 0 (fuzz_flight crash-f190bbb5).
    if (!is_finite(vec3<T>(air.gravity + rate * air.wind)))
      return fail(errc::invalid_argument, "drag rate times the wind overflows T; rate", rate);
    return linear_flight(rate, air, launch, max_time);
  }

  /// The state at time `t` [s] after launch, t >= 0 and finite. Errors: `invalid_argument`
  /// for a negative or non-finite time, or a time so late that the state overflows T.
  [[nodiscard]] result<state<T>> at(const T& t) const {
    // Up to safe_time_ (found at construction) the state cannot leave the range of T and
    // the cap cannot be passed: no checks on the hot path.
    if (t >= T(0) && t <= safe_time_) return state_at(t);
    if (!is_finite(t) || t < T(0))
      return fail(errc::invalid_argument, "time must be finite and >= 0", t);
    return checked(state_at(t));
  }

  /// The highest point of the flight at or after launch: where the vertical velocity is
  /// zero, or the launch point for a shot that starts level or downward. The state's
  /// height is the closed-form apex height (`max_height()`) and its vertical velocity is
  /// exactly zero. Errors: `invalid_argument` without gravity; `never_reaches` when an
  /// upward wind at least as fast as the body's fall speed carries it up forever.
  [[nodiscard]] result<state<T>> apex() const {
    if (g_ == T(0)) return fail(errc::invalid_argument, "apex needs gravity, got |g| =", g_);
    if (!falls_)
      return fail(errc::never_reaches, "no apex: upward wind is at least the fall speed, wind =", w_);
    if (!(climb0() > T(0))) return state_at(T(0));
    const detail::decay_pair<T> d = detail::decay(T(k_ * t_turn_));
    state<T> s;
    s.time = t_turn_;
    s.position = launch_.position + drift(t_turn_, d) + up_ * top_;
    s.velocity = v0_h_ * d.factor + wind_h_ * T(k_ * t_turn_ * d.phi1);
    return checked(s);
  }

  /// The height [m] of the apex (absolute, along "up"): the launch height for a shot that
  /// starts level or downward. Errors as for `apex()`. Computed in closed form,
  /// h0 + v^2/G * m(x) with m(x) = -log1pmx(x)/x^2 (x = k v/G, G = g - k w), which has no
  /// cancellation for any k.
  [[nodiscard]] result<T> max_height() const {
    if (g_ == T(0)) return fail(errc::invalid_argument, "apex needs gravity, got |g| =", g_);
    if (!falls_)
      return fail(errc::never_reaches, "no apex: upward wind is at least the fall speed, wind =", w_);
    if (!(climb0() > T(0))) return h0_;
    return T(h0_ + top_);
  }

  /// The state where the body crosses `height` [m] on the rising or falling branch. The
  /// state's height is `height` itself. Errors: `invalid_argument` for a non-finite height
  /// or zero gravity; `never_reaches` when that branch never passes the height (above the
  /// apex, or below the launch on the rising branch). Accuracy: a few ulps of T in time,
  /// position and velocity, times the condition number |H - dh| / (t |v_up|) of a
  /// crossing near the apex (where the time depends sensitively on the height itself).
  [[nodiscard]] result<state<T>> crossing(const T& height, side branch) const {
    if (!is_finite(height)) return fail(errc::invalid_argument, "height must be finite", height);
    if (g_ == T(0))
      return fail(errc::invalid_argument, "height crossings need gravity, got |g| =", g_);
    const T dh = height - h0_;
    const result<T> t = crossing_time(dh, branch);
    if (!t) return unexpected<error>(t.error());
    return checked(state_at_height(*t, dh));
  }

  /// Where the body comes down through `height` [m] (the falling crossing): time,
  /// position and velocity; `speed()` and `path_angle_below_horizon()` of the result give
  /// the landing speed and impact angle. Errors as for `crossing()`.
  [[nodiscard]] result<state<T>> landing(const T& height = T(0)) const {
    return crossing(height, side::falling);
  }

  /// Horizontal distance [m] from the launch point to the landing at `height` [m],
  /// computed from the displacement itself (no subtraction of positions). Errors as for
  /// `crossing()`.
  [[nodiscard]] result<T> range(const T& height = T(0)) const {
    using std::sqrt;
    if (!is_finite(height)) return fail(errc::invalid_argument, "height must be finite", height);
    if (g_ == T(0))
      return fail(errc::invalid_argument, "height crossings need gravity, got |g| =", g_);
    const result<T> t = crossing_time(T(height - h0_), side::falling);
    if (!t) return unexpected<error>(t.error());
    if (*t > max_time_) return fail(errc::time_limit, "the event lies beyond max_time, at t =", *t);
    const T r = scaled_norm(drift(*t));
    if (!is_finite(r)) return fail(errc::invalid_argument, "the range overflows T; landing time", *t);
    return r;
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
      const T u = sqrt(T(v0_h_.squaredNorm()));
      if (!(u > T(0)))
        return fail(errc::never_reaches, "no horizontal motion, so no distance is reached; asked", distance);
      if (k_ == T(0)) return checked(state_at(T(distance / u)));
      const T x = k_ * distance / u;
      if (!(x < T(1)))
        return fail(errc::never_reaches,
                    "drag stops the body short of that distance; limit u/k =", T(u / k_));
      return checked(state_at(T(distance / u * detail::log1p_over_x(T(-x)))));
    }
    const result<T> t = distance_time_in_wind(distance, wind_speed);
    if (!t) return unexpected<error>(t.error());
    return checked(state_at(*t));
  }

  /// Writes `out.size()` evenly spaced states from launch to `t_end` [s] (both included)
  /// into the caller's span; returns the number written. No allocation.
  [[nodiscard]] result<std::size_t> sample(std::span<state<T>> out, const T& t_end) const {
    if (!is_finite(t_end) || t_end < T(0))
      return fail(errc::invalid_argument, "sample end time must be finite and >= 0", t_end);
    const std::size_t n = out.size();
    for (std::size_t i = 0; i < n; ++i) {
      const T t = n == 1 || i + 1 == n
                      ? (n == 1 ? T(0) : t_end)
                      : T(t_end * T(static_cast<long long>(i)) / T(static_cast<long long>(n - 1)));
      const result<state<T>> s = checked(state_at(t));
      if (!s) return unexpected<error>(s.error());
      out[i] = *s;
    }
    return n;
  }

  [[nodiscard]] const shot<T>& launch() const noexcept { return launch_; }
  [[nodiscard]] const medium<T>& air() const noexcept { return air_; }
  /// The drag rate k [1/s]; 0 in vacuum.
  [[nodiscard]] const T& rate() const noexcept { return k_; }

 private:
  linear_flight(const T& rate, const medium<T>& air, const shot<T>& launch, const T& max_time)
      : k_(rate), air_(air), launch_(launch), max_time_(max_time) {
    using std::sqrt;
    g_ = sqrt(T(air.gravity.squaredNorm()));
    up_ =
        g_ > T(0) ? vec3<T>(-air.gravity / g_) : vec3<T>(vec3<T>::Zero());  // exact for axis-aligned gravity
    w_ = up_.dot(air.wind);
    v_ = up_.dot(launch.velocity);
    h0_ = up_.dot(launch.position);
    wind_h_ = across(air.wind);
    v0_h_ = across(launch.velocity);
    u0_h_ = across(vec3<T>(launch.velocity - air.wind));
    G_ = g_ - k_ * w_;
    pull_ = air.gravity + k_ * air.wind;
    has_side_wind_ = k_ > T(0) && wind_h_.squaredNorm() > T(0);
    safe_time_ = safe_time(max_time);
    falls_ = g_ > T(0) && (k_ == T(0) || G_ > T(0));
    if (falls_) {
      inv_G_ = T(1) / G_;
      inv_k_ = k_ > T(0) ? T(T(1) / k_) : T(0);
      vertical_constants();
    }
  }

  // A time up to which every state is finite: |x(t)| <= |x0| + |v0| t + |pull| t^2 and
  // |v(t)| <= |v0| + |pull| t (e^-kt, phi1 <= 1, phi2 <= 1/2; max norms): with t, |v0| t,
  // |pull| t^2 and t^2 below a sixteenth of the largest T, so is every term (|pull| t <=
  // |pull| t^2 + 1); capped by max_time.
  [[nodiscard]] T safe_time(const T& max_time) const {
    using std::sqrt;
    const T big = std::numeric_limits<T>::max() / T(16);
    const T a = launch_.position.cwiseAbs().maxCoeff();
    const T b = launch_.velocity.cwiseAbs().maxCoeff();
    const T c = pull_.cwiseAbs().maxCoeff();
    if (!(a < big) || !(b < big) || !(c < big)) return T(-1);
    T t = max_time;
    if (T(sqrt(big)) < t) t = T(sqrt(big));  // t^2 itself stays finite
    if (b > T(0) && T(big / b) < t) t = T(big / b);
    if (c > T(0) && T(sqrt(big) / sqrt(c)) < t) t = T(sqrt(big) / sqrt(c));
    return t;
  }

  // The apex of the vertical motion v(t) = -G/k + (v + G/k) e^-kt (v = climb0()): at
  // t_turn = log1p(x)/k, rise H = -log1pmx(x) G/k^2 (x = k v/G). For a downward shot
  // with x > -1 these describe the virtual apex before launch (t_turn < 0). With
  // y = x/(2 + x), log1p(x) = 2 atanh(y) = 2y (1 + y^2 S) and -log1pmx(x)/x^2 =
  // (1 - y)/2 (1 - y (1 - y) S), S = sum_j y^2j/(2j + 3): for |y| <= 1/3 neither form
  // cancels nor under- or overflows as k -> 0 (t_turn -> v/g, H -> v^2/2g). Outside,
  // log1p(x) is used directly; x - log1p(x) then loses at most about 6 ulps.
  void vertical_constants() {
    const T v = climb0();
    if (k_ == T(0)) {
      x_ = T(0);
      t_turn_ = v / g_;
      top_ = v * v / (2 * g_);
      return;
    }
    x_ = k_ * v / G_;
    if (!(x_ > T(-1))) return;  // launched down at least as fast as the fall speed
    const T y = x_ / (T(2) + x_);
    if (T(3) * y <= T(1) && T(3) * y >= T(-1)) {
      const T sum = detail::log1pmx_series(T(y * y));
      t_turn_ = v / G_ * T(T(1) - y) * T(T(1) + y * y * sum);
      top_ = v * v / G_ * T(T(1) - y) / T(2) * T(T(1) - y * (T(1) - y) * sum);
    } else {
      const T l = detail::log1p(x_);
      t_turn_ = l / k_;
      top_ = T(x_ - l) / k_ * (G_ / k_);
    }
  }

  // The part of a vector across "up" (the whole vector when there is no gravity).
  [[nodiscard]] vec3<T> across(const vec3<T>& v) const { return vec3<T>(v - T(up_.dot(v)) * up_); }

  // The motion is x(t) = x0 + v0 t phi1(kt) + A t^2 phi2(kt), v(t) = v0 e^-kt + A t phi1(kt)
  // with A = g + k wind: the solution of a = g - k (v - wind) written without the
  // relative velocity v0 - wind, whose wind part would cancel against wind * t when the
  // wind is strong and k t small (wind t (1 - phi1) = k wind t^2 phi2 is the same term
  // without the cancellation); k -> 0 needs no special case (phi1 -> 1, phi2 -> 1/2).

  // Horizontal displacement from the launch at time t (d = decay(k t)); phi2 only when
  // there is wind across "up".
  [[nodiscard]] vec3<T> drift(const T& t, const detail::decay_pair<T>& d) const {
    if (!has_side_wind_) return vec3<T>(v0_h_ * T(t * d.phi1));
    const T z = k_ * t;
    return vec3<T>(v0_h_ * T(t * d.phi1) + wind_h_ * T(k_ * t * t * detail::phi2(z, d)));
  }
  [[nodiscard]] vec3<T> drift(const T& t) const { return drift(t, detail::decay(T(k_ * t))); }

  [[nodiscard]] state<T> state_at(const T& t) const {
    if (k_ == T(0)) {  // vacuum: the values below at phi1 = 1, phi2 = 1/2, without the series
      state<T> s;
      s.time = t;
      s.position = launch_.position + launch_.velocity * t + pull_ * T(t * t / 2);
      s.velocity = launch_.velocity + pull_ * t;
      return s;
    }
    const T z = k_ * t;
    const detail::decay_pair<T> d = detail::decay(z);
    const T p2 = detail::phi2(z, d);
    state<T> s;
    s.time = t;
    s.position = launch_.position + launch_.velocity * T(t * d.phi1) + pull_ * T(t * t * p2);
    s.velocity = launch_.velocity * d.factor + pull_ * T(t * d.phi1);
    return s;
  }

  // The state at a crossing time t of the height change dh: the horizontal part from the
  // closed form, the height set to dh exactly (it is the defining property of t).
  [[nodiscard]] state<T> state_at_height(const T& t, const T& dh) const {
    const detail::decay_pair<T> d = detail::decay(T(k_ * t));
    state<T> s;
    s.time = t;
    s.position = launch_.position + drift(t, d) + up_ * dh;
    s.velocity = launch_.velocity * d.factor + pull_ * T(t * d.phi1);
    return s;
  }

  // Every answer passes here: a state beyond max_time is time_limit, as for integrated
  // flights (the closed forms find it, but the cap means the same for every model).
  [[nodiscard]] result<state<T>> checked(const state<T>& s) const {
    if (s.time > max_time_) return fail(errc::time_limit, "the event lies beyond max_time, at t =", s.time);
    if (!is_finite(s.position) || !is_finite(s.velocity) || !is_finite(s.time))
      return fail(errc::invalid_argument, "the state overflows T at time", s.time);
    return s;
  }

  // Height above the launch point along "up": v t phi1 - G t^2 phi2.
  [[nodiscard]] T rise(const T& t) const { return detail::vertical_motion<T>{k_, v_, G_}.rise(t); }
  [[nodiscard]] const T& climb0() const { return v_; }

  [[nodiscard]] result<T> crossing_time(const T& dh, side branch) const {
    if (!falls_) return crossing_in_updraft(dh, branch);
    const T v = climb0();
    if (v < T(0)) {
      if (dh > T(0)) return fail(errc::never_reaches, "a downward shot never rises to that height, by", dh);
      if (branch == side::rising && dh < T(0))
        return fail(errc::never_reaches, "rising branch starts above that height, by", T(-dh));
      if (dh == T(0)) return T(0);
      return downward_crossing(dh);
    }
    // The path rises on [0, t_turn] and falls on [t_turn, inf) (t_turn = 0 if v = 0).
    if (dh > top_) return fail(errc::never_reaches, "height is above the apex by", T(dh - top_));
    if (dh == top_) return t_turn_;
    if (branch == side::rising) {
      if (dh < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-dh));
      if (dh == T(0)) return T(0);
      if (k_ == T(0)) return vacuum_crossing(dh, branch);
      return polish(dh, T(0), t_turn_, apex_form(dh, branch), +1);
    }
    const T t = apex_form(dh, branch);
    // Every term of apex_form is >= 0 here: for T up to 64 bits it is already within a
    // few ulps (the reference tests show it); wider types polish the series' guess.
    if (std::numeric_limits<T>::digits <= 64) return t;
    return polish_open(dh, t_turn_, t, -1);
  }

  // t = t_turn + k D/G +- sqrt(2 D/G) * (u(p)/p), D = H - dh >= 0, p = +-k sqrt(2 D/G)
  // (see the file comment); + on the falling branch (W0), - on the rising one (W-1).
  [[nodiscard]] T apex_form(const T& dh, side branch) const {
    using std::exp;
    using std::sqrt;
    const T D = top_ - dh;
    const T DG = D * inv_G_;  // D/G; reciprocals kept from the constructor: no division here
    const T fall = sqrt(T(2 * DG));
    const T p = branch == side::falling ? T(k_ * fall) : T(-k_ * fall);
    T tail;
    if (p <= T(1) / T(2) && p >= T(-1) / T(2)) {
      tail = branch == side::falling ? T(fall * detail::branch_ratio(p)) : T(-fall * detail::branch_ratio(p));
    } else {
      // Types wider than long double take W from long double (Boost's multiprecision
      // Lambert W would pull in __float128) and are polished afterwards.
      using W = std::conditional_t<(std::numeric_limits<T>::digits <= 64), T, long double>;
      const W z = W(-exp(T(-p * p / 2 - 1)));
      const W w = branch == side::falling ? W(boost::math::lambert_w0(z, detail::no_throw_policy{}))
                                          : W(boost::math::lambert_wm1(z, detail::no_throw_policy{}));
      tail = (T(1) + T(w)) * inv_k_;
    }
    return T(t_turn_ + k_ * DG + tail);
  }

  // A downward shot (v < 0) crossing dh < 0. Vacuum: the root 2 dh/(v - sqrt(v^2 - 2 g dh)),
  // which does not cancel. With drag, the apex form would subtract the time of the virtual
  // apex before launch, so another form is used. In tau = k t the crossing solves
  // (1 + x)(1 - e^-tau) - tau = q (x = k v/G, q = k^2 dh/G). For -1 < x < 0 put
  // tau = (1 + x) a - q: then -log1pmx(-a) + |x| a = |q| with a in (0, 1), i.e.
  //   h(a) = a^2 m(-a) + |x| a - |q| = 0,   m = -log1pmx(x)/x^2 (detail::log1pmx_ratio),
  // whose terms are all positive (so t = ((1 + x) a + |q|)/k does not cancel either) and
  // which is increasing and convex: Newton from the vacuum value a0 = 2|q|/(|x| +
  // sqrt(x^2 + 2|q|)), an upper bound (m >= 1/2), descends monotonically onto the root.
  // (This is the W0 root u = a (1 + x) - x of the Lambert form, solved for u + x directly.)
  // For x <= -1 (launched down at least as fast as the fall speed) put rho = -(1 + x) >= 0:
  // H(tau) = rho (1 - e^-tau) + tau - |q| = 0, increasing and concave, so Newton from the
  // lower bound max(|q|/(1 + rho), |q| - rho) climbs monotonically onto the root. Below
  // tau = 1 H is summed as written (positive terms, -expm1); above, as
  // C + tau - rho e^-tau with C = rho - |q| = (k (|v| - k |dh|) - G)/G formed once in a
  // wider type: when the drop is about |v|/k (the shot sheds its speed right at the
  // plane) rho and |q| are large and nearly equal, and C carries the answer. If either
  // iteration gives out, safeguarded Newton on the explicit height, in the wider type,
  // between |dh| / max(|v|, G/k) and |dh| / min(|v|, G/k), takes over.
  [[nodiscard]] result<T> downward_crossing(const T& dh) const {
    using std::abs;
    using std::sqrt;
    if (k_ == T(0)) return vacuum_crossing(dh, side::falling);
    if (x_ > T(-1)) {
      const T ax = -x_;
      const T aq = -k_ * k_ * dh / G_;
      const T eps = detail::epsilon<T>();
      T a = T(2) * aq / (ax + sqrt(T(ax * ax + 2 * aq)));
      if (!(a < T(1))) a = T(1) - eps;
      for (int i = 0; i < 100; ++i) {
        const T h = T(a * a * detail::log1pmx_ratio(T(-a)) + ax * a - aq);
        const T slope = a / (T(1) - a) + ax;
        const T step = h / slope;
        const T next = a - step;
        if (!(next > T(0) && next < T(1))) break;
        a = next;
        const T as = abs(step);
        if (as <= 2 * eps * a) return T((T(T(1) + x_) * a + aq) / k_);
        // Newton error estimate h'' s^2 / (2 h'), h'' = 1/(1 - a)^2, once within sqrt(eps).
        if (as * as <= eps * a * a && as * as <= eps * a * slope * T(T(1) - a) * T(T(1) - a) / 2)
          return T((T(T(1) + x_) * a + aq) / k_);
      }
    }
    if (!(x_ > T(-1))) {
      using std::exp;
      using W = detail::wider_t<T>;
      const W kw(k_), gw(G_), vw(-v_), dw(-dh);
      const T rho = T((kw * vw - gw) / gw);
      const T aq = T(kw * kw * dw / gw);
      const T c = T((kw * (vw - kw * dw) - gw) / gw);
      const T eps = detail::epsilon<T>();
      T tau = aq / (T(1) + rho);
      if (-c > tau) tau = -c;
      for (int i = 0; i < 100; ++i) {
        const T e = exp(-tau);
        const T h = tau < T(1) ? T(rho * T(-detail::expm1(T(-tau))) + tau - aq) : T(c + tau - rho * e);
        const T slope = rho * e + T(1);
        const T step = -h / slope;
        if (!(step >= T(0)) || !is_finite(step)) break;  // from below, steps never go back
        tau += step;
        if (step <= 2 * eps * tau) return T(tau / k_);
        if (step * step <= eps * tau * tau && rho * e * step * step <= eps * tau * slope / 2)
          return T(tau / k_);
      }
    }
    const T speed = abs(climb0());
    const T fall_speed = G_ / k_;
    const T lo = -dh / (speed > fall_speed ? speed : fall_speed);
    const T hi = -dh / (speed > fall_speed ? fall_speed : speed);
    return polish(dh, lo, hi, T((lo + hi) / 2), -1);
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

  // Safeguarded Newton on rise(t) = dh inside [lo, hi], where rise - dh changes sign and
  // `direction` is +1 (rising) or -1 (falling). rise(t) is evaluated in the phi1/phi2
  // form, which is accurate for every k, in a type wider than T where one exists
  // (detail::wider_t: long double for double, double for float): near a crossing the
  // height is a sum of terms much larger than the residual (a fast downward shot that
  // sheds its speed within the drop: |v|/k ~ |dh|), and the extra bits absorb that loss,
  // so the root gets the full precision of T.
  [[nodiscard]] result<T> polish(const T& dh, const T& lo, const T& hi, const T& guess, int direction) const {
    using W = detail::wider_t<T>;
    const detail::vertical_motion<W> m{W(k_), W(v_), W(G_)};
    W t;
    if (!m.newton(W(dh), W(lo), W(hi), W(guess), direction, t))
      return fail(errc::no_convergence, "height crossing did not converge, at t =", t);
    return T(t);
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
    const T G = G_;
    const bool turns = v < T(0) && G < T(0);
    const T t_turn = turns ? T(detail::log1p(T(k_ * v / G)) / k_) : T(0);
    if (v >= T(0) && branch == side::falling)
      return fail(errc::never_reaches,
                  "the body never falls: the upward wind is at least the fall speed, wind", w_);
    if (v >= T(0) || branch == side::rising) {
      const T start = v >= T(0) ? T(0) : t_turn;
      if (v < T(0) && !turns)
        return fail(errc::never_reaches, "the body sinks towards a level it never passes, height change", dh);
      const T low = rise(start);
      if (dh < low)
        return fail(errc::never_reaches, "rising branch starts above that height, by", T(low - dh));
      if (dh == low) return start;
      return polish_open(dh, start, start, +1);
    }
    if (dh > T(0)) return fail(errc::never_reaches, "the falling branch starts below that height, by", dh);
    if (dh == T(0)) return T(0);
    if (!turns) return polish_open(dh, T(0), T(0), -1);
    const T bottom = rise(t_turn);
    if (dh < bottom)
      return fail(errc::never_reaches, "the body never sinks that low, short by", T(bottom - dh));
    return polish(dh, T(0), t_turn, t_turn / 2, -1);
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
  T k_;
  medium<T> air_;
  shot<T> launch_;
  T max_time_;  // [s]: events after it are time_limit, as for integrated flights
  T safe_time_{-1};  // [s]: at(t) needs no checks for 0 <= t <= safe_time_
  T g_{};
  vec3<T> up_;
  T w_{};   // vertical wind
  T v_{};   // vertical launch velocity
  T h0_{};  // launch height
  vec3<T> wind_h_;  // wind across "up"
  vec3<T> v0_h_;    // launch velocity across "up"
  vec3<T> u0_h_;    // launch velocity relative to the air, across "up"
  vec3<T> pull_;    // g + k wind: the acceleration of a body at rest on the ground
  bool has_side_wind_{};  // k > 0 and wind across "up"
  T G_{};           // g - k w: the net downward pull on a body at rest in the air
  bool falls_{};    // g > 0 and (k = 0 or G > 0): the body eventually falls
  T x_{};           // k v / G
  T t_turn_{};      // time of the (possibly virtual) apex
  T top_{};         // rise of the (possibly virtual) apex above the launch
  T inv_G_{};       // 1/G (when the body falls)
  T inv_k_{};       // 1/k, 0 in vacuum
};

}  // namespace lob
