#pragma once
/// \file lob/solve/common.hpp
/// What every inverse problem in `solve/` shares: the aiming frame (how elevation and
/// azimuth are measured for any gravity direction), the `Trajectory` concept the solvers
/// are written against, the solver options, and small internal helpers.

#include <cstdint>
#include <optional>
#include <type_traits>
#include <utility>

#include <Eigen/Geometry>
#include <boost/math/constants/constants.hpp>
#include <boost/math/tools/minima.hpp>
#include <boost/math/tools/roots.hpp>
#include <boost/math/tools/toms748_solve.hpp>

#include "lob/core/flight_types.hpp"
#include "lob/core/options.hpp"
#include "lob/core/result.hpp"
#include "lob/detail/math.hpp"
#include "lob/flight.hpp"
#include "lob/models/traits.hpp"

namespace lob {

/// A flight the solvers can question: the query interface `lob::fly()` returns for every
/// model. Heights are absolute (along "up" from the world origin), distances horizontal
/// from the launch point.
template <class F, class T>
concept Trajectory = Real<T> && requires(const F& f, const T& x, side branch) {
  { f.at(x) } -> std::convertible_to<result<state<T>>>;
  { f.apex() } -> std::convertible_to<result<state<T>>>;
  { f.crossing(x, branch) } -> std::convertible_to<result<state<T>>>;
  { f.landing(x) } -> std::convertible_to<result<state<T>>>;
  { f.range(x) } -> std::convertible_to<result<T>>;
  { f.at_distance(x) } -> std::convertible_to<result<state<T>>>;
};

/// The trajectory type `lob::fly()` gives for model `M`.
template <DragModel M>
using trajectory_of = typename decltype(fly(std::declval<const M&>(),
                                            std::declval<const medium<scalar_of<M>>&>(),
                                            std::declval<const shot<scalar_of<M>>&>()))::value_type;

/// How elevation and azimuth are measured, for any direction of gravity.
///
/// `up` is minus gravity's direction. `ahead` is the caller's reference direction with its
/// vertical part removed, normalised (world +x by default; if the reference is within
/// about 0.06 degrees of vertical, world +x, then world +y, is used instead). `left` is
/// up x ahead. Elevation is the angle above the horizontal plane in [-pi/2, pi/2];
/// azimuth is measured in that plane from `ahead` towards `left`, in (-pi, pi]. For the
/// default z-up medium and reference +x this is the usual convention: azimuth from +x
/// towards +y, the same as `lob::launch_velocity`.
template <Real T>
struct aim_frame {
  vec3<T> up = vec3<T>(T(0), T(0), T(1));
  vec3<T> ahead = vec3<T>(T(1), T(0), T(0));
  vec3<T> left = vec3<T>(T(0), T(1), T(0));

  /// The frame of `air` with azimuth 0 along `reference` (see above). Gravity must be
  /// finite and non-zero, `reference` finite.
  [[nodiscard]] static result<aim_frame> make(const medium<T>& air,
                                              const vec3<T>& reference = vec3<T>(T(1), T(0), T(0))) {
    using std::sqrt;
    if (!is_finite(air.gravity)) return fail(errc::invalid_argument, "gravity must be finite");
    const T g = sqrt(T(air.gravity.squaredNorm()));
    if (!(g > T(0))) return fail(errc::invalid_argument, "aiming needs gravity, got |g| =", g);
    if (!is_finite(reference))
      return fail(errc::invalid_argument, "azimuth reference direction must be finite");
    aim_frame f;
    f.up = vec3<T>(-air.gravity / g);
    const vec3<T> candidates[3] = {reference, vec3<T>(T(1), T(0), T(0)), vec3<T>(T(0), T(1), T(0))};
    for (const vec3<T>& c : candidates) {
      const T n = sqrt(T(c.squaredNorm()));
      if (!(n > T(0))) continue;
      const vec3<T> h = c - T(f.up.dot(c)) * f.up;
      const T hn = sqrt(T(h.squaredNorm()));
      if (hn > n / T(1000)) {
        f.ahead = vec3<T>(h / hn);
        f.left = vec3<T>(f.up.cross(f.ahead));
        return f;
      }
    }
    return fail(errc::invalid_argument, "azimuth reference direction must be non-zero");
  }

  /// The unit launch direction for an elevation and an azimuth [rad].
  [[nodiscard]] vec3<T> direction(const T& elevation, const T& azimuth) const {
    using std::cos;
    using std::sin;
    const T c = cos(elevation);
    return vec3<T>(up * T(sin(elevation)) + ahead * T(c * cos(azimuth)) + left * T(c * sin(azimuth)));
  }

  /// Elevation of a vector above the horizontal plane [rad].
  [[nodiscard]] T elevation_of(const vec3<T>& v) const {
    using std::atan2;
    using std::sqrt;
    const T a = ahead.dot(v);
    const T l = left.dot(v);
    return atan2(T(up.dot(v)), T(sqrt(T(a * a + l * l))));
  }

  /// Azimuth of a vector's horizontal part [rad], 0 for a vertical vector.
  [[nodiscard]] T azimuth_of(const vec3<T>& v) const {
    using std::atan2;
    const T a = ahead.dot(v);
    const T l = left.dot(v);
    if (a == T(0) && l == T(0)) return T(0);
    return atan2(l, a);
  }
};

/// Settings shared by the solvers. Every iteration is capped; exhausting a cap is
/// `errc::no_convergence`.
template <Real T>
struct solve_options {
  /// How each trial flight is computed (integrated models only; closed forms ignore it).
  flight_options<T> flight{};
  /// Azimuth 0 points along this direction's horizontal part (see `aim_frame`).
  vec3<T> reference = vec3<T>(T(1), T(0), T(0));
  /// Iteration budget of each one-dimensional root or minimum search.
  std::uintmax_t max_iterations = 200;
  /// Budget of the outer azimuth correction under a crosswind.
  int max_azimuth_iterations = 40;
  /// Total integration steps of all the trial flights of one solver call (each step of
  /// each query; a hodograph-path query counts as `detail::hodograph_query_cost`). When it
  /// runs out the call returns `step_limit`. The default keeps any call below about 0.1 s
  /// on the 2-core development machine (measured: 0.1-0.5 us per step, the most for stiff
  /// flights with many rejected steps; ordinary aims take 5 000-25 000 steps); closed-form
  /// models take no steps.
  std::int64_t max_total_steps = 400000;
  /// Misses [m] below this count as hits when the flat and lofted solutions merge at
  /// the edge of reach and when a crosswind correction stops; 0 picks 64 ulp of the
  /// problem's length scale (|target - launch| + 1 m).
  T tolerance = T(0);
};

namespace detail {

/// Runs one solver call `solve(options)` on a step pool of `o.max_total_steps` shared by
/// all its trial flights (or on the caller's pool, when `o.flight.shared_steps` is set, so
/// that a solver called by another draws from the outer budget); `step_limit` when the
/// pool ran dry, whatever the search made of the refused flights.
template <Real T, class Solve>
[[nodiscard]] auto within_budget(const solve_options<T>& o, Solve&& solve) -> decltype(solve(o)) {
  using R = decltype(solve(o));
  if (o.max_total_steps < 1)
    return R(fail(errc::invalid_argument, "max_total_steps must be >= 1", o.max_total_steps));
  if (o.flight.shared_steps) {
    // A caller's pool: a call that drew it dry says so, whatever its search concluded
    // from the trials the budget cut short (it said out_of_reach).
    R r = solve(o);
    if (o.flight.shared_steps->exhausted)
      return R(fail(errc::step_limit, "the solver used its whole step budget (the caller's step_pool)"));
    return r;
  }
  step_pool pool{o.max_total_steps};
  solve_options<T> budgeted = o;
  budgeted.flight.shared_steps = &pool;
  R r = solve(std::as_const(budgeted));
  if (pool.exhausted)
    return R(
        fail(errc::step_limit, "the solver used its whole step budget (max_total_steps)", o.max_total_steps));
  return r;
}

template <Real T>
[[nodiscard]] T half_pi() {
  return boost::math::constants::half_pi<T>();
}
template <Real T>
[[nodiscard]] T pi() {
  return boost::math::constants::pi<T>();
}

/// Bits asked of Boost.Math's root finders: all of T but two.
template <Real T>
[[nodiscard]] int root_bits() {
  return std::numeric_limits<T>::digits - 2;
}

/// The tolerance of a problem of length scale `scale` [m].
template <Real T>
[[nodiscard]] T miss_tolerance(const solve_options<T>& o, const T& scale) {
  if (o.tolerance > T(0)) return o.tolerance;
  return T(64) * epsilon<T>() * (scale + T(1));
}

/// TOMS 748 (Alefeld, Potra & Shi 1995; Boost.Math, non-throwing policy) on [lo, hi]
/// where f changes sign; returns the middle of the final bracket, 2^(1-bits) relative wide
/// (a few ulp by default).
/// (Boost 1.74's Newton and Halley iterations take no policy and may throw, so lob's
/// solvers use TOMS 748 throughout.)
template <Real T, class F>
[[nodiscard]] result<T> bracketed_root(F&& f, const T& lo, const T& hi, const T& f_lo, const T& f_hi,
                                       std::uintmax_t max_iter, const char* what, int bits = root_bits<T>()) {
  if (f_lo == T(0)) return lo;
  if (f_hi == T(0)) return hi;
  if ((f_lo > T(0)) == (f_hi > T(0)))
    return fail(errc::no_convergence, what);  // callers only call with a sign change
  std::uintmax_t iters = max_iter;
  const boost::math::tools::eps_tolerance<T> tol(bits);
  const std::pair<T, T> r =
      boost::math::tools::toms748_solve(f, lo, hi, f_lo, f_hi, tol, iters, no_throw_policy{});
  if (iters >= max_iter) return fail(errc::no_convergence, what, static_cast<long double>(iters));
  return T((r.first + r.second) / 2);
}

/// Newton's method safeguarded by bisection on [lo, hi], where f changes sign; `fdf`
/// returns (f, f'). Hand-written because Boost 1.74's newton_raphson_iterate takes no
/// error policy and throws when it loses its bracket, which lob's core must not do; this
/// one keeps the bracket, bisects whenever a Newton step leaves it or fails to halve it,
/// and stops at a step of 2 ulp. Capped at `max_iter`.
template <Real T, class FdF>
[[nodiscard]] result<T> safe_newton(FdF&& fdf, T lo, T hi, T f_lo, T guess, std::uintmax_t max_iter,
                                    const char* what) {
  using std::abs;
  const T eps = epsilon<T>();
  const bool rising = f_lo < T(0);
  T t = (guess > lo && guess < hi) ? guess : T((lo + hi) / 2);
  T last_step = hi - lo;
  for (std::uintmax_t i = 0; i < max_iter; ++i) {
    const std::pair<T, T> v = fdf(t);
    if (v.first == T(0)) return t;
    if ((v.first < T(0)) == rising) lo = t;
    else hi = t;
    T next = v.second != T(0) ? T(t - v.first / v.second) : T((lo + hi) / 2);
    if (!(next > lo && next < hi) || abs(T(next - t)) > last_step / 2) next = (lo + hi) / 2;
    last_step = abs(T(next - t));
    t = next;
    if (last_step <= 2 * eps * abs(t) || !(hi - lo > 2 * eps * abs(t))) return t;
  }
  return fail(errc::no_convergence, what);
}

/// A root of f in [lo, hi] (f changes sign) by secant steps from `guess`, kept inside
/// the shrinking bracket (a step that leaves it, or three steps that do not halve it, are
/// followed by bisection). Stops when |f| <= f_tol or the bracket or step is below
/// 2^(1-bits) relative. Hand-written because it starts from a guess that is usually
/// within 1e-3 of the root, which TOMS 748 cannot use (it needs the bracket only, and
/// spends 10 or more evaluations narrowing a wide one); Boost.Math has no secant method.
template <Real T, class F>
[[nodiscard]] result<T> secant_in_bracket(F&& f, T lo, T hi, T f_lo, T f_hi, const T& guess, const T& f_tol,
                                          int bits, std::uintmax_t max_iter, const char* what) {
  using std::abs;
  using std::ldexp;
  const T rel = T(ldexp(T(1), 1 - bits));
  if (f_lo == T(0)) return lo;
  if (f_hi == T(0)) return hi;
  if ((f_lo > T(0)) == (f_hi > T(0))) return fail(errc::no_convergence, what);
  T x0 = (guess > lo && guess < hi) ? guess : T((lo + hi) / 2);
  T f0 = f(x0);
  if (abs(f0) <= f_tol) return x0;
  auto shrink = [&](const T& x, const T& fx) {
    if ((fx > T(0)) == (f_lo > T(0))) {
      lo = x;
      f_lo = fx;
    } else {
      hi = x;
      f_hi = fx;
    }
  };
  shrink(x0, f0);
  // Second point: a small step from the guess towards the root's side.
  const T step = (hi - lo) / T(1024);
  T x1 = x0 == lo ? T(x0 + step) : T(x0 - step);
  if (!(x1 > lo && x1 < hi)) x1 = (lo + hi) / 2;
  T f1 = f(x1);
  if (abs(f1) <= f_tol) return x1;
  shrink(x1, f1);
  T width = hi - lo;
  for (std::uintmax_t i = 0; i < max_iter; ++i) {
    T x2 = f1 != f0 ? T(x1 - f1 * (x1 - x0) / (f1 - f0)) : T((lo + hi) / 2);
    // Bisect when the step leaves the bracket, and every third step unless the last
    // three have at least halved it (secant steps stall on a kinked or jumping f).
    const bool slow = i % 3 == 2 && hi - lo > width / 2;
    if (i % 3 == 2) width = hi - lo;
    if (slow || !(x2 > lo && x2 < hi)) x2 = (lo + hi) / 2;
    const T f2 = f(x2);
    if (abs(f2) <= f_tol) return x2;
    shrink(x2, f2);
    const T scale = T(1) + abs(x2);
    if (!(hi - lo > rel * scale) || abs(T(x2 - x1)) <= rel * scale) return x2;
    x0 = x1;
    f0 = f1;
    x1 = x2;
    f1 = f2;
  }
  return fail(errc::no_convergence, what);
}

/// Boost.Math's Brent minimiser of f on [lo, hi] with half of T's bits (the best it can
/// do); returns (argmin, min) or `no_convergence` when the budget runs out.
template <Real T, class F>
[[nodiscard]] result<std::pair<T, T>> brent_min(F&& f, const T& lo, const T& hi, std::uintmax_t max_iter,
                                                int bits, const char* what) {
  std::uintmax_t iters = max_iter;
  const std::pair<T, T> r = boost::math::tools::brent_find_minima(f, lo, hi, bits, iters);
  if (iters >= max_iter) return fail(errc::no_convergence, what, static_cast<long double>(iters));
  return r;
}

/// Signed angle [rad] from horizontal vector a to horizontal vector b about `up`.
template <Real T>
[[nodiscard]] T signed_angle(const vec3<T>& a, const vec3<T>& b, const vec3<T>& up) {
  using std::atan2;
  const T s = up.dot(a.cross(b));
  const T c = a.dot(b);
  return atan2(s, c);
}

}  // namespace detail
}  // namespace lob
