#pragma once
/// \file lob/step/engine_step.hpp
/// `engine_step`: how a game or simulation engine steps a body (time step, Euler order,
/// damping rule, when gravity is added, an optional quadratic drag term), and
/// `advance()`, one step taken with the engine's own operations in the engine's order.

#include <cstdint>

#include "lob/core/checks.hpp"
#include "lob/core/flight_types.hpp"
#include "lob/core/result.hpp"

namespace lob {

/// Which of position and velocity a step updates first.
enum class euler_order {
  velocity_first,  ///< semi-implicit (symplectic) Euler: v += ..., then x += dt v (new v)
  position_first,  ///< explicit Euler: x += dt v (old v), then v += ...
};

/// The per-step factor an engine multiplies the velocity by, from its damping d.
enum class damping_rule {
  power,     ///< f = (1 - d)^dt: d is the fraction of velocity lost per second, in [0, 1)
  rational,  ///< f = 1 / (1 + dt d): d [1/s] >= 0
  linear,    ///< f = 1 - dt d: d [1/s] >= 0 with dt d < 1
  factor,    ///< f = d: the engine's per-step factor itself, in (0, 1]
};

/// Whether gravity (and the quadratic term) is added to the velocity before or after the
/// damping factor multiplies it.
enum class gravity_timing {
  before_damping,  ///< v = (v + dt a) f
  after_damping,   ///< v = v f + dt a
};

/// One engine step, in the engine's scalar T (float or double). With a = g - c |v| v (the
/// quadratic term evaluated at the velocity the step starts from; c = 0 leaves a = g
/// exactly), a step is, component by component:
///   velocity_first: v = (v + dt a) f  or  v f + dt a;  then x = x + dt v
///   position_first: x = x + dt v;  then v as above
/// Engines damp the world velocity, so a medium with wind is refused where the step is
/// flown. With c = 0 the rule is linear and `stepped_flight` has it in closed form.
template <Real T>
struct engine_step {
  T dt = T(1) / T(60);  ///< the time step [s], > 0
  euler_order order = euler_order::velocity_first;
  damping_rule rule = damping_rule::rational;
  T damping = T(0);  ///< d of `rule`
  gravity_timing gravity = gravity_timing::before_damping;
  T quadratic = T(0);  ///< c [1/m] >= 0 of the optional drag term -c |v| v

  /// The per-step factor f, computed in T exactly as the step uses it.
  [[nodiscard]] T factor() const {
    using std::pow;
    switch (rule) {
      case damping_rule::power: return T(pow(T(T(1) - damping), dt));
      case damping_rule::rational: return T(T(1) / T(T(1) + T(dt * damping)));
      case damping_rule::linear: return T(T(1) - T(dt * damping));
      case damping_rule::factor: return damping;
    }
    return damping;
  }

  /// `invalid_argument` naming the value unless the step is one lob can fly: dt finite and
  /// > 0, d in the range of its rule, c finite and >= 0, and a factor in (0, 1].
  [[nodiscard]] status check() const {
    if (const status ok = first_failure(require_positive(dt, "time step dt must be finite and > 0"),
                                        require_non_negative(damping, "damping must be finite and >= 0"),
                                        require_non_negative(quadratic, "quadratic drag term must be finite and >= 0"));
        !ok)
      return ok;
    if ((rule == damping_rule::power || rule == damping_rule::factor) && !(damping <= T(1)))
      return fail(errc::invalid_argument, "damping of the power and factor rules must be <= 1", damping);
    const T f = factor();
    if (!is_finite(f) || !(f > T(0)) || !(f <= T(1)))
      return fail(errc::invalid_argument, "the per-step damping factor must be in (0, 1]", f);
    return {};
  }
};

/// Position and velocity of a stepped body after some whole number of steps.
template <Real T>
struct step_state {
  std::int64_t step = 0;
  vec3<T> position = vec3<T>::Zero();
  vec3<T> velocity = vec3<T>::Zero();
};

/// One step of `rule` under `gravity` with factor `f` (from `rule.factor()`), in T, in the
/// engine's order of operations: the exact bits an engine written as in `engine_step`
/// produces (IEEE arithmetic without contraction into fused multiply-adds).
template <Real T>
void advance(const engine_step<T>& rule, const vec3<T>& gravity, const T& f, step_state<T>& s) {
  using std::sqrt;
  const T dt = rule.dt;
  vec3<T> a = gravity;
  if (rule.quadratic != T(0)) {
    const vec3<T>& v = s.velocity;
    const T speed = sqrt(T(T(T(v.x() * v.x()) + T(v.y() * v.y())) + T(v.z() * v.z())));
    const T cs = T(rule.quadratic * speed);
    for (int i = 0; i < 3; ++i) a[i] = T(gravity[i] - T(cs * v[i]));
  }
  if (rule.order == euler_order::position_first)
    for (int i = 0; i < 3; ++i) s.position[i] = T(s.position[i] + T(dt * s.velocity[i]));
  for (int i = 0; i < 3; ++i) {
    T& v = s.velocity[i];
    v = rule.gravity == gravity_timing::before_damping ? T(T(v + T(dt * a[i])) * f) : T(T(v * f) + T(dt * a[i]));
  }
  if (rule.order == euler_order::velocity_first)
    for (int i = 0; i < 3; ++i) s.position[i] = T(s.position[i] + T(dt * s.velocity[i]));
  ++s.step;
}

}  // namespace lob
