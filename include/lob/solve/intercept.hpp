#pragma once
/// \file lob/solve/intercept.hpp
/// `intercept()`: launch at a given speed so that the body meets a receiver moving with
/// constant velocity; the earliest and the latest meeting.

#include <optional>

#include "lob/solve/aim.hpp"

namespace lob {

/// A receiver moving with constant velocity: position [m] at launch time and velocity
/// [m/s], in the world frame.
template <Real T>
struct receiver {
  vec3<T> position = vec3<T>::Zero();
  vec3<T> velocity = vec3<T>::Zero();
};

/// An interception question: launch point [m], receiver, launch speed [m/s], and the
/// latest meeting time searched [s] (`horizon`; 0 picks twice the time a vertical shot
/// takes to come down to 1 m below the lower of the launch point and the receiver's
/// starting point).
template <Real T>
struct intercept_request {
  vec3<T> launch_point = vec3<T>::Zero();
  receiver<T> target{};
  T speed{};
  T horizon{};
};

/// The earliest and the latest meeting (equal when there is one); `time_of_flight` of
/// each is the meeting time, `arrival` the body's state there.
template <Real T>
struct intercept_solutions {
  std::optional<aim_solution<T>> earliest;
  std::optional<aim_solution<T>> latest;
};

/// Options of `intercept()`: the solver options and the number of meeting times sampled
/// over (0, horizon] to bracket meetings (meetings closer together than horizon/samples
/// may be merged or missed).
template <Real T>
struct intercept_options {
  solve_options<T> solve{};
  int samples = 256;
};

namespace detail {

template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<T> auto_horizon(const M& model, const medium<T>& air, const intercept_request<T>& req,
                                     const solve_options<T>& o) {
  const T h0 = height(req.launch_point, air);
  const T h1 = height(req.target.position, air);
  const auto flight = fly(model, air, shot<T>{req.launch_point, vec3<T>(req.speed * up(air))}, o.flight);
  if (!flight) return unexpected<error>(flight.error());
  const result<state<T>> down = flight->landing(T((h0 < h1 ? h0 : h1) - T(1)));
  if (!down)
    return fail(errc::invalid_argument,
                "no automatic horizon for this flight; give intercept_request::horizon");
  return T(2 * down->time);
}

// Scans g over a grid of meeting times (t_i = horizon i / n) for sign changes and polishes
// each by TOMS 748; keeps the first and the last root. g(t) returns nullopt where it is
// undefined (then no bracket spans that sample).
template <Real T, class G>
[[nodiscard]] result<std::pair<std::optional<T>, std::optional<T>>> scan_roots(G&& g, const T& horizon, int n,
                                                                               std::uintmax_t max_iter) {
  std::optional<T> first, last;
  std::optional<T> prev_g;
  T prev_t = T(0);
  for (int i = 1; i <= n; ++i) {
    const T t = horizon * T(i) / T(n);
    const std::optional<T> gi = g(t);
    if (gi && prev_g && ((*gi > T(0)) != (*prev_g > T(0)) || *gi == T(0))) {
      auto plain = [&](const T& x) {
        const std::optional<T> v = g(x);
        return v ? *v : T(0);
      };
      const result<T> r =
          bracketed_root(plain, prev_t, t, *prev_g, *gi, max_iter, "meeting time did not converge");
      if (!r) return unexpected<error>(r.error());
      if (!first) first = *r;
      last = *r;
    }
    prev_g = gi;
    prev_t = t;
  }
  return std::pair<std::optional<T>, std::optional<T>>(first, last);
}

/// The any-model interception: for a meeting time t, aim (flat and lofted) at where the
/// receiver is at t; a meeting is a root of (that aim's time of flight - t).
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<intercept_solutions<T>> intercept_direct(const M& model, const medium<T>& air,
                                                              const intercept_request<T>& req,
                                                              const T& horizon,
                                                              const intercept_options<T>& o) {
  const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.solve.reference);
  if (!frame) return unexpected<error>(frame.error());
  std::optional<T> first, last;
  for (int b = 0; b < 2; ++b) {
    auto g = [&](const T& t) -> std::optional<T> {
      const vec3<T> where = req.target.position + req.target.velocity * t;
      const result<aim_solutions<T>> a =
          aim(model, air, aim_request<T>{req.launch_point, where, req.speed}, o.solve);
      if (!a) return std::nullopt;
      const std::optional<aim_solution<T>>& s = b == 0 ? a->flat : a->lofted;
      if (!s) return std::nullopt;
      return T(s->time_of_flight - t);
    };
    const auto r = scan_roots(g, horizon, o.samples, o.solve.max_iterations);
    if (!r) return unexpected<error>(r.error());
    if (r->first && (!first || *r->first < *first)) first = r->first;
    if (r->second && (!last || *r->second > *last)) last = r->second;
  }
  if (!first)
    return fail(errc::out_of_reach, "the body cannot meet the receiver within the horizon [s]", horizon);
  intercept_solutions<T> out;
  for (int k = 0; k < 2; ++k) {
    const T t = k == 0 ? *first : *last;
    const vec3<T> where = req.target.position + req.target.velocity * t;
    const result<aim_solutions<T>> a =
        aim(model, air, aim_request<T>{req.launch_point, where, req.speed}, o.solve);
    if (!a) return unexpected<error>(a.error());
    // The branch whose flight time matches t.
    const aim_solution<T>* best = nullptr;
    using std::abs;
    for (const std::optional<aim_solution<T>>* s : {&a->flat, &a->lofted})
      if (*s && (!best || abs(T((*s)->time_of_flight - t)) < abs(T(best->time_of_flight - t)))) best = &**s;
    if (best == nullptr) return fail(errc::no_convergence, "interception: meeting lost on polishing");
    (k == 0 ? out.earliest : out.latest) = *best;
  }
  return out;
}

}  // namespace detail

/// Launch directions at `req.speed` whose flight meets the receiver: the earliest and
/// the latest meeting within the horizon. Vacuum and linear drag: the exact time-of-flight
/// reduction (`detail::time_form` with the receiver's velocity), sampled over (0, horizon]
/// and polished by TOMS 748, so meetings hit to rounding, launched at exactly `req.speed`
/// (to an ulp) along the meeting's direction. Other models: the meeting is a
/// root of (aim time of flight - meeting time), each evaluation a full `aim()`
/// (`detail::intercept_direct`), so expect it to cost some hundred aims.
/// Errors: `invalid_argument` for bad input or a receiver starting at the launch point;
/// `out_of_reach` when no meeting exists within the horizon.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<intercept_solutions<T>> intercept(const M& model, const medium<T>& air,
                                                       const intercept_request<T>& req,
                                                       const intercept_options<T>& opts = {}) {
  return detail::within_budget(
      opts.solve, [&](const solve_options<T>& budgeted) -> result<intercept_solutions<T>> {
        intercept_options<T> o = opts;
        o.solve = budgeted;
        if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
        if (const status ok = detail::check_speed(req.speed); !ok) return unexpected<error>(ok.error());
        if (!is_finite(req.target.velocity))
          return fail(errc::invalid_argument, "receiver velocity must be finite");
        if (const status ok = detail::check_points(req.launch_point, req.target.position, air); !ok)
          return unexpected<error>(ok.error());
        if (!is_finite(req.horizon) || req.horizon < T(0))
          return fail(errc::invalid_argument, "horizon must be finite and >= 0", req.horizon);
        if (o.samples < 2 || o.samples > 100000)
          return fail(errc::invalid_argument, "intercept samples must be in [2, 100000]", o.samples);
        const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.solve.reference);
        if (!frame) return unexpected<error>(frame.error());
        T horizon = req.horizon;
        if (horizon == T(0)) {
          const result<T> h = detail::auto_horizon(model, air, req, o.solve);
          if (!h) return unexpected<error>(h.error());
          horizon = *h;
        }
        if constexpr (model_traits<M>::closed_form) {
          const detail::time_form<T> f =
              detail::make_time_form(model_traits<M>::linear_rate(model), air,
                                     vec3<T>(req.target.position - req.launch_point), req.target.velocity);
          const T u2 = req.speed * req.speed;
          auto g = [&](const T& t) -> std::optional<T> { return T(f.need2(t) - u2); };
          // F -> +inf as t -> 0: a first sample already below u^2 hides an earlier root, so
          // the lower end is halved until F is positive and that stretch is searched first.
          T t1 = horizon / T(o.samples);
          T lo = t1;
          for (int i = 0; i < 2000 && !(*g(lo) > T(0)); ++i) lo /= 2;
          std::optional<T> early;
          if (lo<t1&& * g(lo)> T(0)) {
            const result<T> r =
                detail::bracketed_root([&](const T& x) { return *g(x); }, lo, t1, *g(lo), *g(t1),
                                       o.solve.max_iterations, "meeting time did not converge");
            if (!r) return unexpected<error>(r.error());
            early = *r;
          }
          const auto r = detail::scan_roots(g, horizon, o.samples, o.solve.max_iterations);
          if (!r) return unexpected<error>(r.error());
          const std::optional<T> first = early ? early : r->first;
          const std::optional<T> last = r->second ? r->second : early;
          if (!first)
            return fail(errc::out_of_reach, "the body cannot meet the receiver within the horizon [s]",
                        horizon);
          // The launch velocity is M(t) along its direction at exactly the asked speed, as
          // in the aim: |M|/tau is that speed only to the rounding of M = D + V t - g psi,
          // which cancels for a receiver far below (5e7 m below at speed 1: 7e-12 off).
          intercept_solutions<T> out;
          const result<aim_solution<T>> a =
              detail::complete(model, air, *frame, req.launch_point, f.velocity_at_speed(*first, req.speed), *first,
                                 o.solve);
          if (!a) return unexpected<error>(a.error());
          out.earliest = *a;
          const result<aim_solution<T>> b =
              detail::complete(model, air, *frame, req.launch_point, f.velocity_at_speed(*last, req.speed), *last,
                                 o.solve);
          if (!b) return unexpected<error>(b.error());
          out.latest = *b;
          return out;
        } else {
          return detail::intercept_direct(model, air, req, horizon, o);
        }
      });
}

}  // namespace lob
