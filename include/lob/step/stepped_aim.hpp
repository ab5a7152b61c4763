#pragma once
/// \file lob/step/stepped_aim.hpp
/// Aiming a stepped body (`engine_step`, linear rules): `velocity_to_meet()`, the launch
/// velocity that puts the engine's body on a (moving) target at a given step or between
/// steps, and `aim()`, the flat and lofted launches at a given speed that do.
///
/// Between steps the engine's body is where its linear interpolation puts it: at
/// tau = n + s steps, x(tau) = (1 - s) x[n] + s x[n+1] = x0 + A v0 + B with A, B the
/// interpolated weights of lob/step/linear_step_form.hpp. Linear in v0, so the velocity
/// meeting the target point X + V tau dt is v0(tau) = M(tau)/A(tau), M = X + V tau dt - x0 - B.
/// Aiming at speed u solves |M|^2 = u^2 A^2: the roots are located on the smooth continued
/// path (real n), then solved exactly on the engine's interpolation, where within one step
/// it is a quadratic in s.

#include <cstdint>
#include <optional>

#include "lob/solve/aim.hpp"
#include "lob/step/stepped_flight.hpp"

namespace lob {

/// An aim for a stepped body: launch point [m], the target's position at launch [m] and
/// its velocity [m/s] (zero for a fixed target), and the launch speed [m/s].
template <Real T>
struct stepped_aim_request {
  vec3<T> launch_point = vec3<T>::Zero();
  vec3<T> target = vec3<T>::Zero();
  vec3<T> target_velocity = vec3<T>::Zero();
  T speed{};
};

/// One stepped launch through the target: `solution` as for continuous aims
/// (`time_of_flight` = (step - 1 + fraction) dt, `arrival` the interpolated point with its
/// segment velocity), and where the engine meets the target: between steps `step - 1` and
/// `step`, at `fraction` of the way.
template <Real T>
struct stepped_aim {
  aim_solution<T> solution{};
  std::int64_t step = 0;
  T fraction{};
};

/// The flat (fewer steps) and lofted stepped launches; either may be absent.
template <Real T>
struct stepped_aims {
  std::optional<stepped_aim<T>> flat;
  std::optional<stepped_aim<T>> lofted;
  [[nodiscard]] int count() const noexcept { return (flat ? 1 : 0) + (lofted ? 1 : 0); }
};

/// Settings of a stepped aim: the latest step searched, the iteration cap of each root or
/// minimum search, and the azimuth reference (as `solve_options::reference`).
template <Real T>
struct stepped_aim_options {
  std::int64_t max_steps = 10000000;
  std::uintmax_t max_iterations = 200;
  vec3<T> reference = vec3<T>(T(1), T(0), T(0));
};

namespace detail {

template <Real T>
[[nodiscard]] status check_stepped_aim(const engine_step<T>& rule, const medium<T>& air, const vec3<T>& launch,
                                       const vec3<T>& target, const vec3<T>& target_velocity) {
  if (const status ok = rule.check(); !ok) return ok;
  if (rule.quadratic != T(0))
    return fail(errc::invalid_argument, "stepped aims need a linear rule; quadratic term", rule.quadratic);
  if (const status ok = check_air_and_launch(air, shot<T>{launch, vec3<T>::Zero()}); !ok) return ok;
  if (!(air.wind == vec3<T>::Zero())) return fail(errc::invalid_argument, "an engine step needs zero wind");
  if (!is_finite(target) || !is_finite(target_velocity))
    return fail(errc::invalid_argument, "target position and velocity must be finite");
  if (!square_is_finite(vec3<T>(target - launch)) || !square_is_finite(target_velocity))
    return fail(errc::invalid_argument, "target too far or too fast: its square overflows T");
  return {};
}

// The meeting equation of one stepped aim, in the working type W.
template <Real W>
struct stepped_meeting {
  linear_step_form<W> form;
  vec3<W> offset;  // X - x0
  vec3<W> drift;   // V dt: the target's motion per step

  // M and A on the continued path at real n.
  [[nodiscard]] std::pair<vec3<W>, W> continued(const W& n) const {
    const auto w = form.at(n);
    return {vec3<W>(offset + drift * n - w.pull), w.launch};
  }
  [[nodiscard]] W need2(const W& n) const {
    const auto [m, a] = continued(n);
    return W(W(m.squaredNorm()) / W(a * a));
  }
  // M and A of the engine's interpolation at tau = j + s.
  [[nodiscard]] std::pair<vec3<W>, W> interpolated(std::int64_t j, const W& s) const {
    const auto [m0, a0] = continued(W(j));
    if (s == W(0)) return {m0, a0};
    const auto [m1, a1] = continued(W(j + 1));
    return {vec3<W>(m0 + (m1 - m0) * s), W(a0 + (a1 - a0) * s)};
  }
  // The fraction s in [0, 1] of step j where |M| = u A on the interpolation, the one
  // nearest `hint`; none if the quadratic has no root there. Q(s) = a s^2 + 2 p s + q with
  // the numerically stable pair of roots (q/r and r/a, r = -(p + sign(p) sqrt(p^2 - a q)),
  // common practice).
  [[nodiscard]] std::optional<W> fraction_in(std::int64_t j, const W& u2, const W& hint) const {
    using std::abs;
    using std::sqrt;
    const auto [m0, a0] = continued(W(j));
    const auto [m1, a1] = continued(W(j + 1));
    const vec3<W> dm = m1 - m0;
    const W da = W(a1 - a0);
    const W a = W(W(dm.squaredNorm()) - u2 * da * da);
    const W p = W(W(m0.dot(dm)) - u2 * a0 * da);
    const W q = W(W(m0.squaredNorm()) - u2 * a0 * a0);
    const W disc = W(p * p - a * q);
    if (!(disc >= W(0))) return std::nullopt;
    const W r = W(-(p + (p < W(0) ? W(-sqrt(disc)) : W(sqrt(disc)))));
    std::optional<W> best;
    for (const W s : {r != W(0) ? W(q / r) : W(-1), a != W(0) ? W(r / a) : W(-1)}) {
      if (!(s >= W(0) && s <= W(1))) continue;
      if (!best || abs(W(s - hint)) < abs(W(*best - hint))) best = s;
    }
    return best;
  }
};

// Steps of the continued path at which the interpolated aim is searched: n = 2^(i/4).
template <Real W>
[[nodiscard]] W search_node(int i) {
  using std::pow;
  return W(pow(W(2), W(i) / W(4)));
}

}  // namespace detail

/// The launch velocity [m/s] that puts the engine's body (linear rule) on the target
/// at `steps` steps after launch (a whole number: at that step; else between steps, by
/// the engine's interpolation); the target starts at `target` and moves at
/// `target_velocity`. Any speed: the answer of "arrive in exactly n frames". Errors:
/// `invalid_argument` for bad inputs, a quadratic term, wind, or steps not > 0.
template <Real T>
[[nodiscard]] result<vec3<T>> velocity_to_meet(const engine_step<T>& rule, const medium<T>& air,
                                               const vec3<T>& launch_point, const vec3<T>& target, const T& steps,
                                               const vec3<T>& target_velocity = vec3<T>::Zero()) {
  using W = std::conditional_t<std::is_same_v<T, float>, double, T>;
  using std::floor;
  if (const status ok = detail::check_stepped_aim(rule, air, launch_point, target, target_velocity); !ok)
    return unexpected<error>(ok.error());
  if (!is_finite(steps) || !(steps > T(0)) || !(steps < T(std::numeric_limits<std::int64_t>::max() / 2)))
    return fail(errc::invalid_argument, "steps must be finite and > 0", steps);
  const detail::stepped_meeting<W> m{detail::linear_step_form<W>::make(rule, air.gravity),
                                     vec3<W>((target - launch_point).template cast<W>()),
                                     vec3<W>(target_velocity.template cast<W>() * W(rule.dt))};
  const W n = floor(W(steps));
  const auto [mm, a] = m.interpolated(static_cast<std::int64_t>(n), W(W(steps) - n));
  const vec3<T> v = vec3<W>(mm / a).template cast<T>();
  if (!is_finite(v)) return fail(errc::invalid_argument, "the meeting velocity overflows T; steps", steps);
  return v;
}

/// Every launch at `req.speed` whose engine-stepped body (linear rule) meets the target
/// (moving at `req.target_velocity`) by the engine's interpolation: flat and lofted.
/// Errors: `invalid_argument` for bad inputs, a quadratic term or wind; `out_of_reach`
/// when no step count reaches it at this speed (`error::detail_value()`: the least speed
/// that would, in [m/s]); `no_convergence` when a search runs out of iterations.
/// \code
///   lob::engine_step<float> step;                     // 60 Hz, semi-implicit, rational damping
///   step.damping = 0.1f;
///   auto s = lob::aim(step, air, {{0, 0, 1}, {30, 0, 0}, {}, 20.0f});
///   if (s && s->flat) body.velocity = s->flat->solution.velocity;
/// \endcode
template <Real T>
[[nodiscard]] result<stepped_aims<T>> aim(const engine_step<T>& rule, const medium<T>& air,
                                          const stepped_aim_request<T>& req, const stepped_aim_options<T>& opts = {}) {
  using W = std::conditional_t<std::is_same_v<T, float>, double, T>;
  using std::abs;
  using std::floor;
  using std::sqrt;
  if (const status ok = detail::check_stepped_aim(rule, air, req.launch_point, req.target, req.target_velocity); !ok)
    return unexpected<error>(ok.error());
  if (const status ok = detail::check_speed(req.speed); !ok) return unexpected<error>(ok.error());
  if (!(scaled_norm(vec3<T>(req.target - req.launch_point)) > T(0)))
    return fail(errc::invalid_argument, "target is at the launch point");
  if (opts.max_steps < 1) return fail(errc::invalid_argument, "max_steps must be >= 1", opts.max_steps);
  const result<aim_frame<T>> frame = aim_frame<T>::make(air, opts.reference);
  if (!frame) return unexpected<error>(frame.error());
  const detail::stepped_meeting<W> m{detail::linear_step_form<W>::make(rule, air.gravity),
                                     vec3<W>((req.target - req.launch_point).template cast<W>()),
                                     vec3<W>(req.target_velocity.template cast<W>() * W(rule.dt))};
  const W u2 = W(W(req.speed) * W(req.speed));
  const W last = W(opts.max_steps);
  auto excess = [&](const W& n) { return W(m.need2(n) - u2); };

  // The least needed speed on the continued path: a coarse scan, then Brent's minimum.
  int best = -40;
  W best_need = m.need2(detail::search_node<W>(best));
  int top = best;
  for (int i = best + 1; i < 400 && detail::search_node<W>(i) <= last; ++i) {
    top = i;
    const W v = m.need2(detail::search_node<W>(i));
    if (v < best_need) {
      best_need = v;
      best = i;
    }
  }
  std::uintmax_t iters = opts.max_iterations;
  const auto least = boost::math::tools::brent_find_minima(
      [&](const W& n) { return m.need2(n); }, detail::search_node<W>(best - 1),
      detail::search_node<W>(best < top ? best + 1 : best), std::numeric_limits<W>::digits / 2, iters);
  const W n_least = least.first;
  if (!(least.second <= u2)) {
    error e(errc::out_of_reach, "no step count meets the target at this speed; least speed needed",
            static_cast<long double>(sqrt(least.second)));
    return unexpected<error>(e.with_detail_value(static_cast<long double>(sqrt(least.second))));
  }

  // One meeting: the root of the continued equation in [lo, hi], then the exact fraction on
  // the engine's interpolation in that step or a neighbour.
  auto meeting = [&](W lo, W hi) -> result<stepped_aim<T>> {
    const result<W> root =
        detail::bracketed_root(excess, lo, hi, excess(lo), excess(hi), opts.max_iterations, "stepped aim root");
    if (!root) return unexpected<error>(root.error());
    const auto j0 = static_cast<std::int64_t>(floor(*root));
    std::optional<std::pair<std::int64_t, W>> hit;
    for (std::int64_t j : {j0, j0 - 1, j0 + 1}) {
      if (j < 0 || j >= opts.max_steps) continue;
      const std::optional<W> s = m.fraction_in(j, u2, W(*root - W(j)));
      if (s && (!hit || abs(W(W(j) + *s - *root)) < abs(W(W(hit->first) + hit->second - *root)))) hit = {{j, *s}};
    }
    if (!hit) return fail(errc::no_convergence, "stepped aim: no interpolated meeting near step", *root);
    const auto [j, s] = *hit;
    const auto [mm, a] = m.interpolated(j, s);
    // |M|/A is u to the accuracy of M, whose rounding (an ulp of the offset and of the
    // drop) is large against a small M; taking the direction of M at exactly speed u
    // moves the meeting point by no more than that rounding.
    const W len = scaled_norm(mm);
    const vec3<W> v0 = len > W(0) ? vec3<W>(mm * W(W(req.speed) / len)) : vec3<W>(mm / a);
    stepped_aim<T> out;
    out.step = j + 1;
    out.fraction = T(s);
    aim_solution<T>& sol = out.solution;
    sol.velocity = v0.template cast<T>();
    sol.speed = scaled_norm(sol.velocity);
    sol.elevation = frame->elevation_of(sol.velocity);
    sol.azimuth = frame->azimuth_of(sol.velocity);
    sol.time_of_flight = T(W(W(j) + s) * W(rule.dt));
    // Arrival: the interpolated point and the velocity of its segment.
    const std::int64_t seg = rule.order == euler_order::velocity_first ? j + 1 : j;
    sol.arrival.time = sol.time_of_flight;
    sol.arrival.position = req.target + req.target_velocity * sol.time_of_flight;
    sol.arrival.velocity = m.form.velocity(W(seg), v0).template cast<T>();
    sol.arrival_speed = scaled_norm(sol.arrival.velocity);
    sol.descent_angle = -frame->elevation_of(sol.arrival.velocity);
    if (!is_finite(sol.velocity) || !is_finite(sol.arrival.velocity))
      return fail(errc::invalid_argument, "the stepped aim overflows T at step", out.step);
    return out;
  };

  stepped_aims<T> out;
  // Flat: below the least-speed step, where the need grows without bound as n -> 0.
  W lo = n_least;
  for (int i = 0; i < 200 && !(excess(lo) > W(0)); ++i) lo /= 2;
  if (excess(lo) > W(0) && excess(n_least) <= W(0)) {
    const result<stepped_aim<T>> flat = meeting(lo, n_least);
    if (!flat) return unexpected<error>(flat.error());
    out.flat = *flat;
  }
  // Lofted: above it, up to max_steps.
  W hi = n_least;
  for (int i = 0; i < 200 && hi < last && !(excess(hi) > W(0)); ++i) hi = hi * 2 < last ? W(hi * 2) : last;
  if (excess(hi) > W(0)) {
    const result<stepped_aim<T>> lofted = meeting(n_least, hi);
    if (!lofted) return unexpected<error>(lofted.error());
    out.lofted = *lofted;
  }
  if (out.count() == 0) return fail(errc::no_convergence, "stepped aim: no meeting found near step", n_least);
  return out;
}

}  // namespace lob
