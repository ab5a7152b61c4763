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

/// An aim for a stepped body: launch point [m], the target's position at launch [m], the
/// launch speed [m/s], and the target's velocity [m/s] (zero, when left out, for a fixed
/// target; last, because an Eigen vector given as `{}` is left uninitialised).
template <Real T>
struct stepped_aim_request {
  vec3<T> launch_point = vec3<T>::Zero();
  vec3<T> target = vec3<T>::Zero();
  T speed{};
  vec3<T> target_velocity = vec3<T>::Zero();
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
  // Of the sign of d need2/dn: M.M' A - |M|^2 A' (need2 = |M|^2/A^2, A > 0).
  [[nodiscard]] W need2_slope(const W& n) const {
    const auto [m, a] = continued(n);
    const auto s = form.slopes(n);
    const vec3<W> m1 = drift - s.pull;
    return W(W(m.dot(m1)) * a - W(m.squaredNorm()) * s.launch);
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
  // nearest `hint`; none if there is no root there. First the roots of the quadratic
  // Q(s) = |M|^2 - u^2 A^2 = a s^2 + 2 p s + q (the numerically stable pair q/r and r/a,
  // r = -(p + sign(p) sqrt(p^2 - a q)), common practice); then Newton's method on
  // |M(s)| - u A(s), which keeps its accuracy where Q's coefficients cancel (M small
  // against its parts: a far target, a fast one), from each of them and from the hint.
  [[nodiscard]] std::optional<W> fraction_in(std::int64_t j, const W& u2, const W& hint) const {
    using std::abs;
    using std::sqrt;
    const std::pair<vec3<W>, W> c0 = continued(W(j)), c1 = continued(W(j + 1));
    const vec3<W> m0 = c0.first;
    const W a0 = c0.second;
    const vec3<W> dm = c1.first - m0;
    const W da = W(c1.second - a0);
    const W u = sqrt(u2);
    const W eps = std::numeric_limits<W>::epsilon();
    const W size = W(scaled_norm(m0) + scaled_norm(dm) + u * W(abs(a0) + abs(da)));
    auto miss = [&](const W& s) { return W(scaled_norm(vec3<W>(m0 + dm * s)) - u * W(a0 + da * s)); };
    auto polish = [&](W s) -> std::optional<W> {
      for (int i = 0; i < 12; ++i) {
        const vec3<W> mm = m0 + dm * s;
        const W len = scaled_norm(mm);
        const W slope = W((len > W(0) ? W(W(mm.dot(dm)) / len) : W(0)) - u * da);
        if (!(slope != W(0)) || !is_finite(slope)) break;
        const W step = W(W(len - u * W(a0 + da * s)) / slope);
        W next = W(s - step);
        next = next < W(0) ? W(0) : (next > W(1) ? W(1) : next);
        if (next == s) break;
        s = next;
        if (abs(step) <= W(4) * eps) break;
      }
      if (!(abs(miss(s)) <= W(64) * eps * size)) return std::nullopt;
      return s;
    };
    std::optional<W> candidates[3];
    candidates[0] = hint >= W(0) && hint <= W(1) ? std::optional<W>(hint) : std::optional<W>(W(1) / W(2));
    const W a = W(W(dm.squaredNorm()) - u2 * da * da);
    const W p = W(W(m0.dot(dm)) - u2 * a0 * da);
    const W q = W(W(m0.squaredNorm()) - u2 * a0 * a0);
    const W disc = W(p * p - a * q);
    if (disc >= W(0)) {
      const W r = W(-(p + (p < W(0) ? W(-sqrt(disc)) : W(sqrt(disc)))));
      if (r != W(0)) candidates[1] = W(q / r);
      if (a != W(0)) candidates[2] = W(r / a);
    }
    std::optional<W> best;
    for (const std::optional<W>& c : candidates) {
      if (!c || !(*c >= W(-1) / W(8) && *c <= W(9) / W(8))) continue;
      const std::optional<W> s = polish(*c < W(0) ? W(0) : (*c > W(1) ? W(1) : *c));
      if (s && (!best || abs(W(*s - hint)) < abs(W(*best - hint)))) best = s;
    }
    return best;
  }
};

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
///   auto s = lob::aim(step, air, {{0, 0, 1}, {30, 0, 0}, 20.0f});
///   if (s && s->flat) body.velocity = s->flat->solution.velocity;
/// \endcode
template <Real T>
[[nodiscard]] result<stepped_aims<T>> aim(const engine_step<T>& rule, const medium<T>& air,
                                          const stepped_aim_request<T>& req, const stepped_aim_options<T>& opts = {}) {
  using W = std::conditional_t<std::is_same_v<T, float>, double, T>;
  using std::abs;
  using std::floor;
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

  // The least needed speed on the continued path (need2 falls, then rises, with n): walk
  // by factors of sqrt(2) from the vacuum estimate of the flight's steps, downhill, until
  // it rises, then Brent's minimum in the bracket.
  using std::sqrt;
  const W gn = W(scaled_norm(air.gravity));
  const W dist = scaled_norm(m.offset);
  const W t0 = gn > W(0) ? W(sqrt(W(2 * dist / gn))) : W(dist / W(req.speed));
  const W lowest = W(1) / W(1099511627776);  // 2^-40 steps
  auto clamp = [&](const W& n) { return n < lowest ? lowest : (n > last ? last : n); };
  const W ratio = sqrt(W(2));
  W mid = clamp(W(t0 / W(rule.dt)));
  W f_mid = m.need2(mid);
  W left = clamp(W(mid / ratio)), right = clamp(W(mid * ratio));
  W f_left = m.need2(left), f_right = m.need2(right);
  for (int i = 0; i < 400 && (f_left < f_mid || f_right < f_mid); ++i) {
    if (f_left < f_mid && left > lowest) {
      right = mid, f_right = f_mid, mid = left, f_mid = f_left;
      left = clamp(W(mid / ratio)), f_left = m.need2(left);
    } else if (f_right < f_mid && right < last) {
      left = mid, f_left = f_mid, mid = right, f_mid = f_right;
      right = clamp(W(mid * ratio)), f_right = m.need2(right);
    } else {
      break;  // the least need lies at an end of the searched steps
    }
  }
  // The least need: where its slope changes sign, to full precision (Brent's minimum stops
  // at half of it, too coarse where a passing target makes the dip sharp).
  auto slope = [&](const W& n) { return m.need2_slope(n); };
  W n_least = mid;
  const W s_left = slope(left), s_right = slope(right);
  if (s_left < W(0) && s_right > W(0)) {
    const result<W> r = detail::bracketed_root(slope, left, right, s_left, s_right, opts.max_iterations,
                                               "stepped aim: least-speed step did not converge");
    if (!r) return unexpected<error>(r.error());
    n_least = *r;
  } else if (!(s_left < W(0))) {
    n_least = left;
  } else {
    n_least = right;
  }
  const std::pair<W, W> least{n_least, m.need2(n_least)};
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
    const vec3<W> v0 = len > W(0) ? vec3<W>(vec3<W>(mm / len) * W(req.speed)) : vec3<W>(mm / a);
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
    if (!(abs(W(W(sol.speed) - W(req.speed))) <= W(64) * std::numeric_limits<T>::epsilon() * W(req.speed)))
      return fail(errc::invalid_argument, "speed too small: the launch velocity underflows T; speed", req.speed);
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
