#pragma once
/// \file lob/batch/batch_states.hpp
/// The state of N bodies at once, on structure-of-arrays columns (lob/batch/columns.hpp):
/// `states_at()` at a time t for the closed-form models (vacuum, linear drag), and
/// `states_at_step()` at a step n of an engine's linear rule. Every body shares the model,
/// the medium and t, so the time functions (e^-kt, phi1, phi2, or the step weights) are
/// computed once and each coordinate is one fused pass over its column (Eigen arrays,
/// vectorised), in blocks small enough for the checks to read them from cache. Each body's
/// answer is the scalar query's to the last bit: `fly(model, air, shot).at(t)` and
/// `fly(rule, air, shot).at_step(n)`, whose formulas are evaluated here in the same order.

#include <algorithm>
#include <cstdint>
#include <type_traits>

#include <Eigen/Core>

#include "lob/batch/columns.hpp"
#include "lob/detail/math.hpp"
#include "lob/models/traits.hpp"
#include "lob/step/linear_step_form.hpp"

namespace lob {

namespace detail {

inline constexpr std::size_t batch_block = 256;

template <Real T>
using column = Eigen::Map<const Eigen::Array<T, Eigen::Dynamic, 1>>;
template <Real T>
using out_column = Eigen::Map<Eigen::Array<T, Eigen::Dynamic, 1>>;

// Refuses the inputs fly() refuses (a non-finite position or velocity, a velocity whose
// square overflows) and an output that left the range of T, for bodies [b, b + m).
template <Real T>
[[nodiscard]] status check_block(const shot_columns<T>& in, const state_columns<T>& out, std::size_t b,
                                 std::size_t m) {
  const column<T> x(in.x.data() + b, m), y(in.y.data() + b, m), z(in.z.data() + b, m);
  const column<T> vx(in.vx.data() + b, m), vy(in.vy.data() + b, m), vz(in.vz.data() + b, m);
  // x * 0 is 0 for finite x and NaN otherwise: one vectorised sum tests a whole block.
  const T in_sum = (x * T(0) + y * T(0) + z * T(0) + (vx.square() + vy.square() + vz.square()) * T(0)).sum();
  const T out_sum = (column<T>(out.x.data() + b, m) * T(0) + column<T>(out.y.data() + b, m) * T(0) +
                     column<T>(out.z.data() + b, m) * T(0) + column<T>(out.vx.data() + b, m) * T(0) +
                     column<T>(out.vy.data() + b, m) * T(0) + column<T>(out.vz.data() + b, m) * T(0))
                        .sum();
  const bool inputs = in_sum == T(0);
  const bool outputs = out_sum == T(0);
  if (inputs && outputs) return {};
  for (std::size_t i = b; i < b + m; ++i) {  // name the first offending body
    const vec3<T> p(in.x[i], in.y[i], in.z[i]), v(in.vx[i], in.vy[i], in.vz[i]);
    if (!is_finite(p) || !is_finite(v) || !square_is_finite(v))
      return fail(errc::invalid_argument, "batch launch must be finite, with a representable speed; body",
                  static_cast<long double>(i));
  }
  return fail(errc::invalid_argument, "batch state overflows T; body", static_cast<long double>(b));
}

}  // namespace detail

/// Positions and velocities at time `t` [s] of the N bodies launched as `in`, flown by the
/// closed-form `model` (vacuum or linear drag) through `air`, into `out`. Equal, body by
/// body, to `fly(model, air, shot).at(t)`. Errors: `invalid_argument` for columns of
/// different sizes, a bad model, medium or time, or a body that `fly()` refuses or whose
/// state overflows (named by index; `out` is then partly written).
template <DragModel M, Real T = scalar_of<M>>
  requires(model_traits<M>::closed_form)
[[nodiscard]] status states_at(const M& model, const medium<T>& air, const shot_columns<T>& in, const T& t,
                               const state_columns<T>& out) {
  if (const status ok = detail::check_columns(in, out); !ok) return ok;
  if (const status ok = check_model(model); !ok) return ok;
  if (const status ok = detail::check_air_and_launch(air, shot<T>{}); !ok) return ok;
  if (!is_finite(t) || t < T(0)) return fail(errc::invalid_argument, "time must be finite and >= 0", t);
  const T k = model_traits<M>::linear_rate(model);
  const vec3<T> pull = air.gravity + k * air.wind;
  const T zt = k * t;
  const detail::decay_pair<T> d = detail::decay(zt);
  const T tau = T(t * d.phi1);
  const T psi = T(t * t * detail::phi2(zt, d));
  using detail::column;
  using detail::out_column;
  for (std::size_t b = 0; b < in.size(); b += detail::batch_block) {
    const std::size_t m = std::min(detail::batch_block, in.size() - b);
    const column<T> p[3] = {{in.x.data() + b, Eigen::Index(m)}, {in.y.data() + b, Eigen::Index(m)},
                            {in.z.data() + b, Eigen::Index(m)}};
    const column<T> v[3] = {{in.vx.data() + b, Eigen::Index(m)}, {in.vy.data() + b, Eigen::Index(m)},
                            {in.vz.data() + b, Eigen::Index(m)}};
    T* const po[3] = {out.x.data() + b, out.y.data() + b, out.z.data() + b};
    T* const vo[3] = {out.vx.data() + b, out.vy.data() + b, out.vz.data() + b};
    for (int c = 0; c < 3; ++c) {
      out_column<T>(po[c], Eigen::Index(m)) = p[c] + v[c] * tau + pull[c] * psi;
      out_column<T>(vo[c], Eigen::Index(m)) = v[c] * d.factor + pull[c] * tau;
    }
    if (const status ok = detail::check_block(in, out, b, m); !ok) return ok;
  }
  return {};
}

/// Positions and velocities after `n` steps of the engine's linear `rule` (no quadratic
/// term) of the N bodies launched as `in`, into `out`. Equal, body by body, to
/// `fly(rule, air, shot).at_step(n)`: the closed form evaluated in the same order (in
/// double for a float engine, then rounded). Errors as for `states_at`, and
/// `invalid_argument` for a rule with a quadratic term, wind, or n < 0.
template <Real T>
[[nodiscard]] status states_at_step(const engine_step<T>& rule, const medium<T>& air, const shot_columns<T>& in,
                                    std::int64_t n, const state_columns<T>& out) {
  using W = std::conditional_t<std::is_same_v<T, float>, double, T>;
  if (const status ok = detail::check_columns(in, out); !ok) return ok;
  if (const status ok = rule.check(); !ok) return ok;
  if (rule.quadratic != T(0))
    return fail(errc::invalid_argument, "batch steps need a linear rule; quadratic term", rule.quadratic);
  if (const status ok = detail::check_air_and_launch(air, shot<T>{}); !ok) return ok;
  if (!(air.wind == vec3<T>::Zero())) return fail(errc::invalid_argument, "an engine step needs zero wind");
  if (n < 0) return fail(errc::invalid_argument, "step must be >= 0", n);
  const detail::linear_step_form<W> form = detail::linear_step_form<W>::make(rule, air.gravity);
  // stepped_flight: position = x0 + (c v0 + e) tau + g' psi at t = n dt (its continued
  // linear-drag flight), velocity = v0 e^-nz + b (n phi1(nz)/phi1(z)).
  const W t = W(W(n) * W(rule.dt));
  const W zt = W(form.rate() * t);
  const detail::decay_pair<W> d = detail::decay(zt);
  const W tau = W(t * d.phi1);
  const W psi = W(t * t * detail::phi2(zt, d));
  using std::exp;
  const W nz = W(W(n) * form.z);
  const W fn = W(exp(-nz));
  const W sn = W(W(n) * detail::phi1(nz) / form.phi1_z);
  for (std::size_t b = 0; b < in.size(); b += detail::batch_block) {
    const std::size_t m = std::min(detail::batch_block, in.size() - b);
    const detail::column<T> p[3] = {{in.x.data() + b, Eigen::Index(m)}, {in.y.data() + b, Eigen::Index(m)},
                                    {in.z.data() + b, Eigen::Index(m)}};
    const detail::column<T> v[3] = {{in.vx.data() + b, Eigen::Index(m)}, {in.vy.data() + b, Eigen::Index(m)},
                                    {in.vz.data() + b, Eigen::Index(m)}};
    T* const po[3] = {out.x.data() + b, out.y.data() + b, out.z.data() + b};
    T* const vo[3] = {out.vx.data() + b, out.vy.data() + b, out.vz.data() + b};
    for (int c = 0; c < 3; ++c) {
      const auto v0 = v[c].template cast<W>();
      const auto launch = (v0 * form.c + form.e[c]).eval();  // the continued flight's launch velocity
      detail::out_column<T>(po[c], Eigen::Index(m)) =
          (p[c].template cast<W>() + launch * tau + form.gp[c] * psi).template cast<T>();
      detail::out_column<T>(vo[c], Eigen::Index(m)) = (v0 * fn + form.b[c] * sn).template cast<T>();
    }
    if (const status ok = detail::check_block(in, out, b, m); !ok) return ok;
  }
  return {};
}

}  // namespace lob
