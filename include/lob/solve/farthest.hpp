#pragma once
/// \file lob/solve/farthest.hpp
/// `farthest_elevation()`: for a launch speed and a landing height, the elevation that
/// lands farthest, with that range and flight time. Closed form for vacuum and linear
/// drag in still air (Lambert W, made accurate as drag vanishes); Boost.Math's Brent
/// minimiser on `fly()` for every other model or with wind.

#include <limits>

#include <boost/math/special_functions/lambert_w.hpp>

#include "lob/solve/common.hpp"

namespace lob {

/// A farthest-range question: launch point [m], launch speed [m/s], azimuth [rad] (see
/// `aim_frame`) and the absolute height [m] of the landing plane (above or below launch).
template <Real T>
struct farthest_request {
  vec3<T> launch_point = vec3<T>::Zero();
  T speed{};
  T azimuth{};
  T landing_height{};
};

/// The farthest-landing shot: elevation [rad], azimuth [rad], horizontal range [m] from
/// the launch point to the landing, time of flight [s], launch velocity [m/s], and the
/// landing state.
template <Real T>
struct farthest_shot {
  T elevation{};
  T azimuth{};
  T range{};
  T time_of_flight{};
  vec3<T> velocity = vec3<T>::Zero();
  state<T> landing{};
};

namespace detail {

// q(s) = 1 - (1 - s) e^s, summed as its series sum_{n>=2} (n-1) s^n / n! below s = 1/2
// (the closed form cancels there: q ~ s^2/2), closed form above (loses < 3 bits).
template <Real T>
[[nodiscard]] T q_of_s(const T& s) {
  using std::abs;
  using std::exp;
  if (abs(s) < T(1) / T(2)) {
    const T eps = epsilon<T>();
    T power = s * s / T(2);  // s^n / n!, n = 2
    T sum = power;
    for (int n = 3; n < 200; ++n) {  // at |s| < 1/2 the terms fall faster than 2^-n
      power *= s / T(n);
      const T term = T(n - 1) * power;
      sum += term;
      if (abs(term) <= eps * abs(sum)) break;
    }
    return sum;
  }
  return T(-detail::expm1(s) + s * T(exp(s)));
}

/// The scaled flight time s = k T* of the farthest shot under linear drag in still air,
/// alpha = k v / g, eta = k^2 h / g (h: launch height above the landing plane). It solves
/// P(s) = 1 - (1 + eta - s) e^s = alpha^2, the same equation as
/// s = 1 + eta + W0((alpha^2 - 1) e^-(1 + eta)) (the envelope of the family of paths),
/// on s >= max(eta, log1p(alpha)), where P increases. Away from the branch point the
/// closed form is evaluated with Boost.Math's W0. Near it (alpha, eta -> 0, z -> -1/e,
/// 1 + e z < 1/100) W0 is ill-conditioned and its argument has lost the digits that
/// matter, so the root is found by TOMS 748 on P written without cancellation (q_of_s),
/// which keeps every digit as alpha -> 0.
/// Then sin(theta*) = alpha / expm1(s). `out_of_reach` when the landing plane is
/// above the reach of a vertical shot.
template <Real T>
[[nodiscard]] result<T> linear_farthest_s(const T& alpha, const T& eta, std::uintmax_t max_iter) {
  using std::exp;
  using std::sqrt;
  // Reachable iff the vertical shot's apex, (g/k^2)(alpha - log1p alpha), is at or above
  // the plane: -eta <= alpha - log1p(alpha), written with log1pmx to keep small alpha.
  const T lmx = detail::log1pmx(alpha);
  if (eta < lmx) return fail(errc::out_of_reach, "landing plane is above the highest reachable point");
  const T lo = eta > detail::log1p(alpha) ? eta : T(detail::log1p(alpha));
  const T a2 = alpha * alpha;
  auto p_minus = [&](const T& s) { return T(q_of_s(s) - eta * T(exp(s)) - a2); };
  if (p_minus(lo) >= T(0)) return lo;  // vertical at the edge of reach
  const T z = (a2 - 1) * T(exp(T(-(1 + eta))));
  const T branch_gap = T(1) + boost::math::constants::e<T>() * z;  // 0 at the branch point
  // Far from the branch point: the closed form itself (Boost.Math's W0). Built-in types
  // only: Boost's W0 for multiprecision types pulls in __float128 (libquadmath).
  if constexpr (std::is_floating_point_v<T>) {
    if (branch_gap > T(1) / T(100)) {
      const T s = T(1) + eta + T(boost::math::lambert_w0(z, no_throw_policy{}));
      if (is_finite(s) && s >= lo) return s;
    }
  }
  T hi = lo > T(1) ? T(2 * lo) : T(2);
  for (int i = 0; p_minus(hi) < T(0); ++i) {
    if (i >= 2000 || !is_finite(hi))
      return fail(errc::no_convergence, "farthest shot: no upper bound for k T");
    hi *= 2;
  }
  const result<T> s = bracketed_root(p_minus, lo, hi, p_minus(lo), p_minus(hi), max_iter,
                                     "farthest shot: k T did not converge");
  return s;
}

template <Real T>
[[nodiscard]] status check_speed(const T& speed) {
  if (!is_finite(speed)) return fail(errc::invalid_argument, "launch speed must be finite", speed);
  if (!(speed > T(0))) return fail(errc::invalid_argument, "launch speed must be > 0", speed);
  // As fly() says of a launch velocity: every model's flight forms |v|^2 (the closed forms
  // gave no_convergence for 1e155 m/s, the integrated ones invalid_argument).
  if (!is_finite(T(speed * speed)))
    return fail(errc::invalid_argument, "launch speed is too large: its square overflows T; speed", speed);
  return {};
}

// Flies one shot at (elevation, azimuth) and lands it on the plane.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<farthest_shot<T>> land_shot(const M& model, const medium<T>& air,
                                                 const aim_frame<T>& frame, const farthest_request<T>& req,
                                                 const T& elevation, const solve_options<T>& o) {
  farthest_shot<T> out;
  out.elevation = elevation;
  out.azimuth = req.azimuth;
  out.velocity = vec3<T>(req.speed * frame.direction(elevation, req.azimuth));
  const auto flight = fly(model, air, shot<T>{req.launch_point, out.velocity}, o.flight);
  if (!flight) return unexpected<error>(flight.error());
  const result<state<T>> land = flight->landing(req.landing_height);
  if (!land) return unexpected<error>(land.error());
  out.landing = *land;
  out.time_of_flight = land->time;
  out.range = horizontal_distance(*land, shot<T>{req.launch_point, out.velocity}, air);
  // Far from the origin (a launch point much larger than the range) the difference of the
  // positions has lost the range's digits: take it from the flight's own displacement.
  if (!(scaled_norm(req.launch_point) < T(4) * out.range)) {
    const result<T> r = flight->range(req.landing_height);
    if (!r) return unexpected<error>(r.error());
    out.range = *r;
  }
  return out;
}

/// Direct maximisation of the range over the elevation (Boost.Math's Brent minimiser) for
/// any model. The search runs over [theta_min, pi/2), theta_min = 0 for a landing plane
/// at or below the launch, else the elevation whose apex just reaches the plane.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<farthest_shot<T>> farthest_direct(const M& model, const medium<T>& air,
                                                       const aim_frame<T>& frame,
                                                       const farthest_request<T>& req,
                                                       const solve_options<T>& o) {
  const T top = half_pi<T>() * (T(1) - T(64) * epsilon<T>());
  auto apex_excess = [&](const T& elev) -> T {
    const shot<T> s{req.launch_point, vec3<T>(req.speed * frame.direction(elev, req.azimuth))};
    const auto f = fly(model, air, s, o.flight);
    if (!f) return -std::numeric_limits<T>::max();
    const result<state<T>> a = f->apex();
    if (!a) return std::numeric_limits<T>::max();  // rises for ever: reaches any plane
    return T(height(a->position, air) - req.landing_height);
  };
  T lo = T(0);
  const T launch_h = height(req.launch_point, air);
  if (req.landing_height > launch_h) {
    const T e_top = apex_excess(top);
    if (e_top < T(0))
      return fail(errc::out_of_reach, "landing plane is above the highest reachable point, by", -e_top);
    const result<T> r = bracketed_root(apex_excess, T(0), top, apex_excess(T(0)), e_top, o.max_iterations,
                                       "farthest shot: lowest elevation reaching the plane did not converge");
    if (!r) return unexpected<error>(r.error());
    lo = *r;
  }
  auto neg_range = [&](const T& elev) -> T {
    const result<farthest_shot<T>> s = land_shot(model, air, frame, req, elev, o);
    return s ? T(-s->range) : T(0);
  };
  const result<std::pair<T, T>> m =
      brent_min(neg_range, lo, top, o.max_iterations, std::numeric_limits<T>::digits / 2,
                "farthest shot: Brent maximisation did not converge");
  if (!m) return unexpected<error>(m.error());
  return land_shot(model, air, frame, req, m->first, o);
}

}  // namespace detail

/// The elevation of maximum range for `req.speed` onto the plane of height
/// `req.landing_height`, with that range and the flight time.
///
/// Vacuum and linear drag in still air use closed forms: in vacuum
/// sin(theta*) = v / sqrt(2 v^2 + 2 g h); under linear drag with alpha = k v / g and
/// eta = k^2 h / g, sin(theta*) = alpha / (exp(1 + eta + W0((alpha^2 - 1) e^-(1+eta))) - 1),
/// evaluated without loss as alpha -> 0 (see `detail::linear_farthest_s`); the flight
/// time is then k T* = 1 + eta + W0(...). Other models, or wind, are maximised directly
/// with Brent's method (elevation to about half the digits of T, range to nearly all).
/// Errors: `invalid_argument` for bad input, `out_of_reach` if the plane is above
/// everything the speed reaches.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<farthest_shot<T>> farthest_elevation(const M& model, const medium<T>& air,
                                                          const farthest_request<T>& req,
                                                          const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<farthest_shot<T>> {
    using std::asin;
    using std::sqrt;
    if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_speed(req.speed); !ok) return unexpected<error>(ok.error());
    if (!is_finite(req.launch_point)) return fail(errc::invalid_argument, "launch point must be finite");
    if (!is_finite(req.azimuth)) return fail(errc::invalid_argument, "azimuth must be finite", req.azimuth);
    if (!is_finite(req.landing_height))
      return fail(errc::invalid_argument, "landing height must be finite", req.landing_height);
    if (!is_finite(air.wind)) return fail(errc::invalid_argument, "wind must be finite");
    const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.reference);
    if (!frame) return unexpected<error>(frame.error());

    if constexpr (model_traits<M>::closed_form) {
      if (air.wind == vec3<T>::Zero()) {
        const T k = model_traits<M>::linear_rate(model);
        const T g = sqrt(T(air.gravity.squaredNorm()));
        const T v = req.speed;
        const T h = height(req.launch_point, air) - req.landing_height;
        const T alpha = k * v / g;
        T sin_e;
        if (alpha <= detail::epsilon<T>()) {
          // Vacuum (Lichtenberg & Wills, Am. J. Phys. 46 (1978)); the drag correction is
          // O(alpha) relative, below one ulp here.
          const T den = 2 * v * v + 2 * g * h;
          if (!(den >= v * v))
            return fail(errc::out_of_reach, "landing plane is above the highest reachable point");
          sin_e = v / sqrt(den);
        } else {
          const result<T> s = detail::linear_farthest_s(alpha, T(k * k * h / g), o.max_iterations);
          if (!s) return unexpected<error>(s.error());
          sin_e = alpha / detail::expm1(*s);
        }
        if (sin_e > T(1)) sin_e = T(1);
        return detail::land_shot(model, air, *frame, req, T(asin(sin_e)), o);
      }
    }
    return detail::farthest_direct(model, air, *frame, req, o);
  });
}

}  // namespace lob
