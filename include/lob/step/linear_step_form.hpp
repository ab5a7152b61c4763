#pragma once
/// \file lob/step/linear_step_form.hpp
/// The closed form of a linear engine step (no quadratic term): after n steps
///   x[n] = x0 + A(n) v0 + B(n),   v[n] = f^n v0 + S(n) b,
/// with the scalar weight A, the vector B (gravity's share) and S(n) = sum_{k<n} f^k.
///
/// The velocity obeys v[n+1] = f v[n] + b (b = dt g f with gravity before damping, dt g
/// after), so v[n] = f^n v0 + b S(n); the position is its sum (geometric series, common
/// practice). Continued to real n, that sum is exactly the position of a continuous
/// linear-drag flight at t = n dt with rate k = z/dt (z = -ln f), gravity
/// g' = b/(dt phi1(z)) and launch velocity v0' = c v0 + e, where
///   velocity_first: c = f/phi1(z), e = b (phi1(z) - phi2(z))/phi1(z)^2
///   position_first: c = 1/phi1(z), e = -b phi2(z)/phi1(z)^2
/// (match the terms in n and in f^n = e^-nz; phi1, phi2 as in lob/detail/math.hpp). So
/// A(n) = c t phi1(k t), B(n) = e t phi1(k t) + g' t^2 phi2(k t), uniformly accurate as the
/// damping vanishes (f = 1: vacuum, v0' = v0 +- b/2), and lob's linear_flight answers the
/// crossing and apex questions of the continued path.

#include "lob/core/flight_types.hpp"
#include "lob/detail/math.hpp"
#include "lob/step/engine_step.hpp"

namespace lob::detail {

template <Real W>
struct linear_step_form {
  W dt{};        // [s]
  W z{};         // -ln f per step
  W phi1_z{1};   // phi1(z): (1 - f)/z, S(n) = n phi1(n z)/phi1(z)
  W c{1};        // launch weight of the continued flight
  vec3<W> b = vec3<W>::Zero();   // per-step velocity kick
  vec3<W> e = vec3<W>::Zero();   // launch offset of the continued flight
  vec3<W> gp = vec3<W>::Zero();  // gravity of the continued flight

  template <Real T>
  [[nodiscard]] static linear_step_form make(const engine_step<T>& rule, const vec3<T>& gravity) {
    using std::exp;
    using std::log;
    linear_step_form s;
    const W f = W(rule.factor());
    s.dt = W(rule.dt);
    // z from f - 1, which is exact for f in [1/2, 1].
    s.z = f >= W(1) / W(2) ? W(-log1p(W(f - W(1)))) : W(-log(f));
    const W p1 = phi1(s.z);
    const W p2 = phi2(s.z);
    // phi1 - phi2 = (1 - e^-z (1 + z))/z^2: the difference cancels for large z, the
    // closed form for small z.
    const W psi = s.z < W(1) ? W(p1 - p2) : W(W(W(1) - exp(-s.z) * W(W(1) + s.z)) / W(s.z * s.z));
    const vec3<W> g = gravity.template cast<W>();
    s.b = rule.gravity == gravity_timing::before_damping ? vec3<W>(g * W(s.dt * f)) : vec3<W>(g * s.dt);
    s.phi1_z = p1;
    if (rule.order == euler_order::velocity_first) {
      s.c = W(f / p1);
      s.e = s.b * W(psi / W(p1 * p1));
    } else {
      s.c = W(W(1) / p1);
      s.e = -s.b * W(p2 / W(p1 * p1));
    }
    s.gp = s.b / W(s.dt * p1);
    return s;
  }

  [[nodiscard]] W rate() const { return W(z / dt); }
  [[nodiscard]] vec3<W> continued_launch_velocity(const vec3<W>& v0) const { return vec3<W>(v0 * c + e); }

  struct weights {
    W launch;       // A(n)
    vec3<W> pull;   // B(n)
  };
  // A and B at real n >= 0.
  [[nodiscard]] weights at(const W& n) const {
    const W t = W(n * dt);
    const W kt = W(n * z);
    const decay_pair<W> d = decay(kt);
    const W tp1 = W(t * d.phi1);
    return {W(c * tp1), vec3<W>(e * tp1 + gp * W(t * t * phi2(kt, d)))};
  }
  // dA/dn and dB/dn at real n >= 0: d(t phi1(kt))/dt = e^-kt, d(t^2 phi2(kt))/dt = t phi1(kt).
  [[nodiscard]] weights slopes(const W& n) const {
    const W t = W(n * dt);
    const decay_pair<W> d = decay(W(n * z));
    return {W(c * dt * d.factor), vec3<W>((e * d.factor + gp * W(t * d.phi1)) * dt)};
  }
  // v[n] = f^n v0 + b S(n).
  [[nodiscard]] vec3<W> velocity(const W& n, const vec3<W>& v0) const {
    using std::exp;
    const W nz = W(n * z);
    return vec3<W>(v0 * W(exp(-nz)) + b * W(n * phi1(nz) / phi1_z));
  }
};

}  // namespace lob::detail
