#pragma once
/// \file lob/integrate/fixed_step.hpp
/// Fixed-step methods for deterministic flight (classical Runge–Kutta 4 and semi-implicit
/// Euler) and the cubic Hermite interpolant that events are located on between steps.
/// Internal building blocks of `integrated_flight`.

#include "lob/integrate/dormand_prince.hpp"

namespace lob::detail {

/// One classical Runge–Kutta step (Kutta 1901; order 4) of size `h` from `y0` for
/// x' = v, v' = accel(v), with k1 = derivative(accel, y0) given. The stage positions are
/// not needed (the acceleration depends on the velocity only) and are not formed. The
/// operations are always the same and in the same order, so a run is reproducible bit
/// for bit on one build.
template <Real T, class Accel>
[[nodiscard]] phase<T> rk4_step(const Accel& accel, const phase<T>& y0, const phase<T>& k1, const T& h) {
  const T half = h / T(2);
  const vec3<T> v2 = y0.velocity + half * k1.velocity;
  const vec3<T> a2 = accel(v2);
  const vec3<T> v3 = y0.velocity + half * a2;
  const vec3<T> a3 = accel(v3);
  const vec3<T> v4 = y0.velocity + h * a3;
  const vec3<T> a4 = accel(v4);
  const T sixth = h / T(6);
  phase<T> y1;
  y1.position = y0.position + sixth * (y0.velocity + T(2) * v2 + T(2) * v3 + v4);
  y1.velocity = y0.velocity + sixth * (k1.velocity + T(2) * a2 + T(2) * a3 + a4);
  return y1;
}

/// One semi-implicit (symplectic) Euler step as game engines take it: the velocity first
/// from the acceleration at the start, then the position with the new velocity. `f0` is
/// f(y0); order 1.
template <Real T>
[[nodiscard]] phase<T> semi_implicit_euler_step(const phase<T>& y0, const phase<T>& f0, const T& h) {
  phase<T> y1;
  y1.velocity = y0.velocity + h * f0.velocity;
  y1.position = y0.position + h * y1.velocity;
  return y1;
}

/// The cubic Hermite interpolant of a step from (t0, y0, f0) to (t0 + h, y1, f1): for the
/// position with the velocities as slopes, for the velocity with the accelerations as
/// slopes. Locating an event on it keeps third-order accuracy between steps, where a
/// straight line between the step ends would be only second order.
template <Real T>
class hermite_piece {
 public:
  hermite_piece(const T& t0, const T& h, const phase<T>& y0, const phase<T>& f0, const phase<T>& y1,
                const phase<T>& f1)
      : t0_(t0), h_(h), y0_(y0), f0_(f0), y1_(y1), f1_(f1) {}

  /// The interpolated position alone at time `t` (what event functions need).
  [[nodiscard]] vec3<T> position(const T& t) const {
    const weights w = basis(t);
    return vec3<T>(w.h00 * y0_.position + w.h10 * f0_.position + w.h01 * y1_.position + w.h11 * f1_.position);
  }

  /// The slope of the interpolated position at time `t`: the velocities at the ends, but
  /// between them not the interpolated velocity (the two cubics differ by the step's error).
  [[nodiscard]] vec3<T> position_slope(const T& t) const {
    const T s = (t - t0_) / h_;
    const T s2 = s * s;
    return vec3<T>(T(T(6) * (s2 - s) / h_) * vec3<T>(y0_.position - y1_.position) +
                   T(T(3) * s2 - T(4) * s + T(1)) * f0_.position + T(T(3) * s2 - T(2) * s) * f1_.position);
  }

  [[nodiscard]] phase<T> operator()(const T& t) const {
    const weights w = basis(t);
    phase<T> y;
    y.position = w.h00 * y0_.position + w.h10 * f0_.position + w.h01 * y1_.position + w.h11 * f1_.position;
    y.velocity = w.h00 * y0_.velocity + w.h10 * f0_.velocity + w.h01 * y1_.velocity + w.h11 * f1_.velocity;
    return y;
  }

 private:
  // The four cubic Hermite basis polynomials on [0, 1] at s = (t - t0)/h, the slope ones times h.
  struct weights {
    T h00, h10, h01, h11;
  };
  [[nodiscard]] weights basis(const T& t) const {
    const T s = (t - t0_) / h_;
    const T s2 = s * s;
    const T s3 = s2 * s;
    return {T(T(2) * s3 - T(3) * s2 + T(1)), T(T(s3 - T(2) * s2 + s) * h_), T(T(-2) * s3 + T(3) * s2),
            T(T(s3 - s2) * h_)};
  }

  T t0_;
  T h_;
  phase<T> y0_, f0_, y1_, f1_;
};

}  // namespace lob::detail
