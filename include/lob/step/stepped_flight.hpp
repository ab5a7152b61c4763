#pragma once
/// \file lob/step/stepped_flight.hpp
/// `stepped_flight`: a body flown step by step as an engine flies it (`engine_step`), and
/// `fly(engine_step, medium, shot)`, its entry point. For the linear rules (no quadratic
/// term) every query is in closed form, O(1) in the number of steps: the velocity obeys
/// v[n+1] = f v[n] + b, so v[n] = f^n v0 + b S(n) and the position is a geometric sum.
///
/// The closed form and its derivation: lob/step/linear_step_form.hpp.

#include <cstdint>
#include <limits>
#include <optional>
#include <type_traits>

#include "lob/exact/linear_flight.hpp"
#include "lob/step/engine_step.hpp"
#include "lob/step/linear_step_form.hpp"

namespace lob {

/// Where a stepped body crosses a height: `step` is the first step at (or past) the
/// height, and the crossing point lies between steps `step - 1` and `step` at `fraction`
/// in [0, 1] of the way, by the engine's linear interpolation of positions (for step 0,
/// a launch exactly at the height, fraction is 1). `point.time` is (step - 1 + fraction)
/// dt; `point.velocity` is the velocity of that straight segment (the velocity after
/// `step` for velocity_first, after `step - 1` for position_first).
template <Real T>
struct step_crossing {
  std::int64_t step = 0;
  T fraction{};
  state<T> point{};
};

/// A body flown by an engine's step. Built by `lob::fly(engine_step, medium, shot)`; a
/// cheap value whose `const` queries never allocate. With a quadratic term the queries
/// step the body (O(n), each capped by `max_steps`); without, they are closed forms.
/// Heights are absolute, along "up" (minus gravity's direction), as in `linear_flight`.
template <Real T>
class stepped_flight {
  // The closed forms of a float engine are evaluated in double: they then give the exact
  // recurrence rounded to float, whose own float loop (`replay`) drifts by its roundings.
  using W = std::conditional_t<std::is_same_v<T, float>, double, T>;

 public:
  /// Default cap on the steps a query may take or find: 10^7 (46 hours at 60 Hz).
  static constexpr std::int64_t default_max_steps = 10000000;

  /// Checks the inputs and builds the flight. Errors: `invalid_argument` for a step that
  /// fails `engine_step::check()`, a medium with wind (engines damp the world velocity),
  /// non-finite or overflowing gravity, position or velocity, or `max_steps` < 1.
  [[nodiscard]] static result<stepped_flight> make(const engine_step<T>& rule, const medium<T>& air,
                                                   const shot<T>& launch,
                                                   std::int64_t max_steps = default_max_steps) {
    if (const status ok = rule.check(); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_air_and_launch(air, launch); !ok) return unexpected<error>(ok.error());
    if (!(air.wind == vec3<T>::Zero()))
      return fail(errc::invalid_argument, "an engine step damps the world velocity: wind must be zero, |wind|",
                  scaled_norm(air.wind));
    if (max_steps < 1) return fail(errc::invalid_argument, "max_steps must be >= 1", max_steps);
    stepped_flight s(rule, air, launch, max_steps);
    if (s.linear_) {
      const result<linear_flight<W>> e = s.make_extension();
      if (!e) return unexpected<error>(e.error());
      s.extension_ = *e;
    }
    return s;
  }

  /// True when the queries are closed forms (the rule has no quadratic term).
  [[nodiscard]] bool closed_form() const noexcept { return linear_; }
  [[nodiscard]] const engine_step<T>& rule() const noexcept { return rule_; }
  [[nodiscard]] const shot<T>& launch() const noexcept { return launch_; }

  /// Position and velocity after `n` steps: closed form for the linear rules (the exact
  /// recurrence, rounded once to T), else `replay(n)`. Errors: `invalid_argument` for
  /// n < 0, `step_limit` for n > max_steps, `invalid_argument` when the state overflows.
  [[nodiscard]] result<step_state<T>> at_step(std::int64_t n) const {
    if (!linear_) return replay(n);
    if (const status ok = check_step(n); !ok) return unexpected<error>(ok.error());
    return checked(exact_state(n));
  }

  /// The engine's own loop: `n` calls of `advance()` in T from the launch, the same bits an
  /// engine computing as `engine_step` describes produces. O(n). Errors as for `at_step`.
  [[nodiscard]] result<step_state<T>> replay(std::int64_t n) const {
    if (const status ok = check_step(n); !ok) return unexpected<error>(ok.error());
    step_state<T> s = start();
    while (s.step < n) advance(rule_, gravity_, f_, s);
    return checked(s);
  }

  /// The interpolated state at time `t` [s]: position linear between the steps around t
  /// (the engine's interpolation), velocity that of the segment. Errors as for `at_step`.
  [[nodiscard]] result<state<T>> at(const T& t) const {
    using std::floor;
    if (!is_finite(t) || t < T(0)) return fail(errc::invalid_argument, "time must be finite and >= 0", t);
    const W steps = W(t) / W(rule_.dt);
    if (!(steps <= W(max_steps_))) return fail(errc::step_limit, "time lies beyond max_steps; t =", t);
    const auto n = static_cast<std::int64_t>(floor(steps));
    const T s = T(steps - W(n));
    const result<step_state<T>> a = at_step(n);
    if (!a) return unexpected<error>(a.error());
    if (s == T(0)) return state<T>{t, a->position, segment_velocity(*a, *a)};
    const result<step_state<T>> b = at_step(n + 1);
    if (!b) return unexpected<error>(b.error());
    return state<T>{t, vec3<T>(a->position + (b->position - a->position) * s), segment_velocity(*a, *b)};
  }

  /// The highest step: the first n whose successor is not higher (step 0 for a shot that
  /// does not climb in its first step). Closed form: from the root of the vertical
  /// velocity, n = ln(1 + q)/z with q = w0 (1 - f)/|b_up|, confirmed on the neighbours.
  /// Errors: `invalid_argument` without gravity; `step_limit` past max_steps.
  [[nodiscard]] result<step_state<T>> apex() const {
    const result<std::int64_t> n = apex_step();
    if (!n) return unexpected<error>(n.error());
    return at_step(*n);
  }

  /// Where the body crosses `height` [m] on the rising or falling branch (see
  /// `step_crossing`). Rising: the first step at or above the height, from a launch at or
  /// below it. Falling: the first step after the apex at or below it, from an apex at or
  /// above it. Errors: `invalid_argument` for a non-finite height or without gravity;
  /// `never_reaches` when the branch does not pass the height; `step_limit` past max_steps;
  /// `no_convergence` when the crossing point (or a range) overflows T, as it can for a
  /// launch at 1e308 m.
  [[nodiscard]] result<step_crossing<T>> crossing(const T& height, side branch) const {
    if (!is_finite(height)) return fail(errc::invalid_argument, "height must be finite", height);
    const result<std::int64_t> top = apex_step();
    if (!top) return unexpected<error>(top.error());
    const result<std::int64_t> n = branch == side::rising ? rising_step(height, *top) : falling_step(height, *top);
    if (!n) return unexpected<error>(n.error());
    return crossing_at(*n, height);
  }

  /// The falling crossing of `height` [m]: where the engine's body comes down through it.
  [[nodiscard]] result<step_crossing<T>> landing(const T& height = T(0)) const {
    return crossing(height, side::falling);
  }

  /// Horizontal distance [m] from the launch point to the landing at `height`.
  [[nodiscard]] result<T> range(const T& height = T(0)) const {
    const result<step_crossing<T>> c = landing(height);
    if (!c) return unexpected<error>(c.error());
    const vec3<T> d = c->point.position - launch_.position;
    const T r = scaled_norm(vec3<T>(d - up_ * T(up_.dot(d))));
    if (!is_finite(r)) return fail(errc::no_convergence, "the range overflows T at step", c->step);
    return r;
  }

 private:
  stepped_flight(const engine_step<T>& rule, const medium<T>& air, const shot<T>& launch, std::int64_t max_steps)
      : rule_(rule), launch_(launch), gravity_(air.gravity), max_steps_(max_steps) {
    f_ = rule.factor();
    linear_ = rule.quadratic == T(0);
    g_ = scaled_norm(air.gravity);
    if (g_ > T(0)) up_ = vec3<T>(-air.gravity / g_);
    axis_up_ = (up_.array() != T(0)).count() == 1;
  }

  [[nodiscard]] status check_step(std::int64_t n) const {
    if (n < 0) return fail(errc::invalid_argument, "step must be >= 0", n);
    if (n > max_steps_) return fail(errc::step_limit, "step lies beyond max_steps", n);
    return {};
  }

  [[nodiscard]] step_state<T> start() const { return {0, launch_.position, launch_.velocity}; }

  [[nodiscard]] result<step_state<T>> checked(const step_state<T>& s) const {
    if (!is_finite(s.position) || !is_finite(s.velocity))
      return fail(errc::invalid_argument, "the stepped state overflows T at step", s.step);
    return s;
  }

  // The velocity of the straight segment from step a to step b = a + 1 (or of step a alone).
  [[nodiscard]] vec3<T> segment_velocity(const step_state<T>& a, const step_state<T>& b) const {
    return rule_.order == euler_order::velocity_first ? b.velocity : a.velocity;
  }

  // ---- closed form (linear rules) ----

  // The continuous linear-drag flight through every step (linear_step_form).
  [[nodiscard]] result<linear_flight<W>> make_extension() {
    form_ = detail::linear_step_form<W>::make(rule_, gravity_);
    medium<W> ext_air;
    ext_air.gravity = form_.gp;
    ext_air.wind = vec3<W>::Zero();
    return linear_flight<W>::make(form_.rate(), ext_air,
                                  shot<W>{launch_.position.template cast<W>(),
                                          form_.continued_launch_velocity(launch_.velocity.template cast<W>())});
  }

  [[nodiscard]] vec3<W> exact_velocity(std::int64_t n) const {
    return form_.velocity(W(n), launch_.velocity.template cast<W>());
  }
  [[nodiscard]] vec3<W> exact_position(std::int64_t n) const {
    const result<state<W>> s = extension_->at(W(W(n) * W(rule_.dt)));
    return s ? s->position : vec3<W>::Constant(std::numeric_limits<W>::quiet_NaN());  // overflow: NaN, refused by checked()
  }
  [[nodiscard]] W exact_height(std::int64_t n) const { return W(up_.template cast<W>().dot(exact_position(n))); }
  [[nodiscard]] step_state<T> exact_state(std::int64_t n) const {
    return {n, exact_position(n).template cast<T>(), exact_velocity(n).template cast<T>()};
  }
  // Vertical velocity after n steps, in W.
  [[nodiscard]] W exact_climb(std::int64_t n) const { return W(up_.template cast<W>().dot(exact_velocity(n))); }

  // ---- the apex and crossings ----

  [[nodiscard]] result<std::int64_t> apex_step() const {
    if (!(g_ > T(0))) return fail(errc::invalid_argument, "apex and crossings need gravity, got |g| =", g_);
    if (!linear_) return apex_by_stepping();
    using std::ceil;
    // Height rises at step n (velocity_first: by dt w[n]; position_first: by dt w[n-1]),
    // w[n] = f^n w0 + b_up S(n) falls with n and is zero at n_c = ln(1 + q)/z.
    const W w0 = W(up_.template cast<W>().dot(launch_.velocity.template cast<W>()));
    const W bu = W(-up_.template cast<W>().dot(form_.b));  // > 0
    const std::int64_t first = rule_.order == euler_order::velocity_first ? 1 : 0;
    if (!(w0 > W(0))) return std::int64_t{0};
    const W ratio = W(w0 * form_.phi1_z / bu);  // n_c at z = 0
    const W q = W(ratio * form_.z);
    const W nc = q == W(0) ? ratio : W(ratio * W(detail::log1p(q) / q));
    if (!(nc <= W(max_steps_))) return fail(errc::step_limit, "the apex lies beyond max_steps, at step", nc);
    // Step n rises (z[n] > z[n-1]) when w[n - 1 + first] > 0, that is n - 1 + first < n_c;
    // the apex is the last rising step.
    auto rises = [&](std::int64_t m) { return m > 0 && exact_climb(m - 1 + first) > W(0); };
    auto n = static_cast<std::int64_t>(ceil(nc)) - first;
    for (int i = 0; i < 4 && n > 0 && !rises(n); ++i) --n;
    for (int i = 0; i < 4 && rises(n + 1); ++i) ++n;
    return n < 0 ? std::int64_t{0} : n;
  }

  [[nodiscard]] result<std::int64_t> apex_by_stepping() const {
    step_state<T> s = start();
    T h = T(up_.dot(s.position));
    while (s.step < max_steps_) {
      step_state<T> next = s;
      advance(rule_, gravity_, f_, next);
      const T hn = T(up_.dot(next.position));
      if (!(hn > h)) return s.step;
      s = next;
      h = hn;
    }
    return fail(errc::step_limit, "the apex lies beyond max_steps", max_steps_);
  }

  [[nodiscard]] W height_at(std::int64_t n) const {
    if (linear_) return exact_height(n);
    return W(up_.dot(replay(n)->position));  // only for n <= max_steps, cannot fail
  }

  // The crossing step by stepping: the first n in (from, max_steps] with the height past h.
  [[nodiscard]] result<std::int64_t> step_until(const T& h, std::int64_t from, std::int64_t to, bool rising) const {
    step_state<T> s = start();
    while (s.step < from) advance(rule_, gravity_, f_, s);
    while (s.step < to) {
      advance(rule_, gravity_, f_, s);
      const T hn = T(up_.dot(s.position));
      if (rising ? hn >= h : hn <= h) return s.step;
    }
    return fail(errc::step_limit, "the crossing lies beyond max_steps", max_steps_);
  }

  [[nodiscard]] result<std::int64_t> rising_step(const T& h, std::int64_t top) const {
    const W wh = W(h);
    const W h0 = W(up_.dot(launch_.position));
    if (h0 > wh) return fail(errc::never_reaches, "rising branch starts above that height, by", T(h0 - wh));
    if (h0 == wh) return std::int64_t{0};
    if (!(height_at(top) >= wh))
      return fail(errc::never_reaches, "height is above the highest step by", T(wh - height_at(top)));
    if (!linear_) return step_until(h, 0, top, true);
    const result<state<W>> c = extension_->crossing(wh, side::rising);
    std::int64_t n = top;
    if (c) n = clamp_step(c->time, 0, top);
    for (int i = 0; i < 8 && n < top && height_at(n) < wh; ++i) ++n;
    for (int i = 0; i < 8 && n > 0 && height_at(n - 1) >= wh; ++i) --n;
    if (!(height_at(n) >= wh) || (n > 0 && height_at(n - 1) >= wh))
      return fail(errc::no_convergence, "rising crossing step not confirmed near step", n);
    return n;
  }

  [[nodiscard]] result<std::int64_t> falling_step(const T& h, std::int64_t top) const {
    const W wh = W(h);
    const W peak = height_at(top);
    if (peak < wh) return fail(errc::never_reaches, "height is above the highest step by", T(wh - peak));
    if (!linear_) return step_until(h, top, max_steps_, false);
    const result<state<W>> c = extension_->crossing(wh, side::falling);
    if (!c) return unexpected<error>(c.error());
    if (!(c->time / W(rule_.dt) <= W(max_steps_)))
      return fail(errc::step_limit, "the crossing lies beyond max_steps, at step", T(c->time / W(rule_.dt)));
    std::int64_t n = clamp_step(c->time, top + 1, max_steps_);
    for (int i = 0; i < 8 && n < max_steps_ && height_at(n) > wh; ++i) ++n;
    for (int i = 0; i < 8 && n > top + 1 && height_at(n - 1) <= wh; ++i) --n;
    if (height_at(n) > wh) return fail(errc::step_limit, "the crossing lies beyond max_steps", max_steps_);
    if (n > top + 1 && height_at(n - 1) <= wh)
      return fail(errc::no_convergence, "falling crossing step not confirmed near step", n);
    return n;
  }

  // ceil(t/dt) clamped to [lo, hi].
  [[nodiscard]] std::int64_t clamp_step(const W& t, std::int64_t lo, std::int64_t hi) const {
    using std::ceil;
    const W n = ceil(W(t / W(rule_.dt)));
    if (!(n >= W(lo))) return lo;
    if (!(n <= W(hi))) return hi;
    return static_cast<std::int64_t>(n);
  }

  [[nodiscard]] result<step_crossing<T>> crossing_at(std::int64_t n, const T& h) const {
    step_crossing<T> c;
    c.step = n;
    const result<step_state<T>> b = at_step(n);
    if (!b) return unexpected<error>(b.error());
    if (n == 0) {
      c.fraction = T(1);
      c.point = state<T>{T(0), b->position, segment_velocity(*b, *b)};
      return c;
    }
    const result<step_state<T>> a = at_step(n - 1);
    if (!a) return unexpected<error>(a.error());
    const W ha = linear_ ? exact_height(n - 1) : W(up_.dot(a->position));
    const W hb = linear_ ? exact_height(n) : W(up_.dot(b->position));
    const W s = ha == hb ? W(1) : W(W(W(h) - ha) / W(hb - ha));
    c.fraction = T(s < W(0) ? W(0) : (s > W(1) ? W(1) : s));
    vec3<T> p = a->position + (b->position - a->position) * c.fraction;
    // The height is the asked one. Along an axis-aligned "up" the level part first, then
    // h, exactly: p + up (h - up.p) lost h beside steps out at 1e306 m.
    if (axis_up_)
      p = vec3<T>(p - up_ * T(up_.dot(p))) + up_ * h;
    else
      p += up_ * T(h - T(up_.dot(p)));
    if (!is_finite(p)) return fail(errc::no_convergence, "the crossing point overflows T at step", n);
    c.point = state<T>{T(T(T(n - 1) + c.fraction) * rule_.dt), p, segment_velocity(*a, *b)};
    return c;
  }

  engine_step<T> rule_;
  shot<T> launch_;
  vec3<T> gravity_;
  std::int64_t max_steps_;
  T f_{};
  T g_{};
  vec3<T> up_ = vec3<T>(T(0), T(0), T(1));
  bool linear_ = true;
  bool axis_up_ = false;  // "up" along a coordinate axis
  detail::linear_step_form<W> form_{};
  std::optional<linear_flight<W>> extension_;
};

/// Flies `launch` through `air` as an engine steps it. See `stepped_flight::make`.
template <Real T>
[[nodiscard]] result<stepped_flight<T>> fly(const engine_step<T>& rule, const medium<T>& air, const shot<T>& launch,
                                            std::int64_t max_steps = stepped_flight<T>::default_max_steps) {
  return stepped_flight<T>::make(rule, air, launch, max_steps);
}

}  // namespace lob
