#pragma once
/// \file lob/integrate/dormand_prince.hpp
/// The Dormand–Prince 5(4) pair with first-same-as-last, its error norm, a
/// proportional–integral step-size controller and its continuous extension (dense
/// output). Internal building blocks of `integrated_flight`; all state lives on the stack.

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>

#include "lob/core/real.hpp"
#include "lob/core/vec.hpp"

namespace lob::detail {

/// The phase of a body: position [m] and velocity [m/s]. Its time derivative is a phase
/// too: (velocity, acceleration).
template <Real T>
struct phase {
  vec3<T> position = vec3<T>::Zero();
  vec3<T> velocity = vec3<T>::Zero();
};

/// The stages of one Dormand–Prince step that the dense output needs (k2 is not used by
/// it). k7 is f(y1): first-same-as-last, it is the next step's k1.
template <Real T>
struct dp5_stages {
  phase<T> k1, k3, k4, k5, k6, k7;
};

/// The phase derivative (velocity, acceleration) for an acceleration that depends on the
/// velocity only, as gravity plus drag does.
template <Real T, class Accel>
[[nodiscard]] phase<T> derivative(const Accel& accel, const phase<T>& y) {
  phase<T> d;
  d.position = y.velocity;
  d.velocity = accel(y.velocity);
  return d;
}

/// One Dormand–Prince 5(4) step of size `h` from `y0` for x' = v, v' = accel(v), with
/// k1 = derivative(accel, y0) given. Tableau: J. R. Dormand & P. J. Prince, "A family of
/// embedded Runge-Kutta formulae", J. Comput. Appl. Math. 6 (1980) 19-26 (table 2; the
/// 5th-order solution is propagated). Because the acceleration does not depend on the
/// position, the stage positions are never needed and are not formed: each stage is the
/// stage velocity and its acceleration, and the result is the same as the general step's.
/// Writes the new phase to `y1`, the stages to `k` (k.k7 = f(y1), first same as last) and
/// returns the error norm of the embedded 4th-order difference (accept when <= 1): the
/// scaled maximum norm of Hairer, Norsett & Wanner, "Solving Ordinary Differential
/// Equations I", 2nd ed. (1993), sec. II.4, with the max norm in place of eq. 4.11's root
/// mean square, each component divided by atol + rtol * max(|y0_i|, |y1_i|). The max
/// norm lets no single component, such as the short horizontal distance of a steep shot,
/// take the whole error budget.
///
/// The stages depend on each other, so a step's time is the chain of its six evaluations.
/// The sums are arranged to keep that chain short: the coefficients are multiplied by h
/// once, every stage sum is accumulated as soon as its terms are known, and only the
/// newest evaluation is added when a stage is needed. The error terms are accumulated in
/// the same way and the error scale is inverted while the last evaluation runs.
template <Real T, class Accel>
[[nodiscard]] T dp5_step(const Accel& accel, const phase<T>& y0, const phase<T>& k1, const T& h, phase<T>& y1,
                         dp5_stages<T>& k, const T& rtol, const T& atol) {
  using std::abs;
  using std::max;
  // Coefficients built from integers so that every type gets all its digits, times h.
  const T a21 = h * (T(1) / T(5));
  const T a31 = h * (T(3) / T(40)), a32 = h * (T(9) / T(40));
  const T a41 = h * (T(44) / T(45)), a42 = h * (T(-56) / T(15)), a43 = h * (T(32) / T(9));
  const T a51 = h * (T(19372) / T(6561)), a52 = h * (T(-25360) / T(2187)), a53 = h * (T(64448) / T(6561)),
          a54 = h * (T(-212) / T(729));
  const T a61 = h * (T(9017) / T(3168)), a62 = h * (T(-355) / T(33)), a63 = h * (T(46732) / T(5247)),
          a64 = h * (T(49) / T(176)), a65 = h * (T(-5103) / T(18656));
  const T b1 = h * (T(35) / T(384)), b3 = h * (T(500) / T(1113)), b4 = h * (T(125) / T(192)),
          b5 = h * (T(-2187) / T(6784)), b6 = h * (T(11) / T(84));
  // e = b - b_hat (5th minus 4th order weights), times h.
  const T e1 = h * (T(71) / T(57600)), e3 = h * (T(-71) / T(16695)), e4 = h * (T(71) / T(1920)),
          e5 = h * (T(-17253) / T(339200)), e6 = h * (T(22) / T(525)), e7 = h * (T(-1) / T(40));

  // Everything in locals first: the outputs may alias the inputs (k7 becomes the next
  // k1), and locals let the compiler keep the stages in registers.
  //
  // With an acceleration of the form gravity + drag(v - wind) (`drag_in_wind`) the stages
  // carry the velocity in the air, u = v - wind, and the drag d alone: gravity enters each
  // stage sum as c_i h g (c_i = sum_j a_ij, the stage's node), formed before the
  // evaluations, so that neither the wind nor gravity lengthens the chain. The error
  // terms use u and d directly: the weights e_i sum to zero, so the constant parts
  // (wind, gravity) cancel from them exactly.
  constexpr bool split = requires { accel.drag(y0.velocity); accel.gravity; accel.wind; };
  vec3<T> g = vec3<T>::Zero();
  vec3<T> w = vec3<T>::Zero();
  if constexpr (split) {
    g = accel.gravity;
    w = accel.wind;
  }
  const auto drag = [&](const vec3<T>& u) {
    if constexpr (split) {
      return vec3<T>(accel.drag(u));
    } else {
      return vec3<T>(accel(u));
    }
  };
  const vec3<T> p0 = y0.position;
  const vec3<T> v0 = y0.velocity;
  const vec3<T> f1 = k1.velocity;
  const vec3<T> u0 = v0 - w;
  // Stage 1 enters through f1 = g + d1 (gravity included); the other stages' gravity
  // through (c_i - a_i1) h g.
  const vec3<T> hg = h * g;
  const vec3<T> u2 = u0 + a21 * f1;
  vec3<T> s3 = u0 + (T(3) / T(10) - T(3) / T(40)) * hg + a31 * f1;
  vec3<T> s4 = u0 + (T(4) / T(5) - T(44) / T(45)) * hg + a41 * f1;
  vec3<T> s5 = u0 + (T(8) / T(9) - T(19372) / T(6561)) * hg + a51 * f1;
  vec3<T> s6 = u0 + (T(1) - T(9017) / T(3168)) * hg + a61 * f1;
  vec3<T> s7 = u0 + (T(1) - T(35) / T(384)) * hg + b1 * f1;
  vec3<T> ev = e1 * f1 - (T(71) / T(57600)) * hg;
  const vec3<T> d2 = drag(u2);
  const vec3<T> u3 = s3 + a32 * d2;
  s4 += a42 * d2;
  s5 += a52 * d2;
  s6 += a62 * d2;
  const vec3<T> d3 = drag(u3);
  const vec3<T> u4 = s4 + a43 * d3;
  s5 += a53 * d3;
  s6 += a63 * d3;
  s7 += b3 * d3;
  ev += e3 * d3;
  const vec3<T> d4 = drag(u4);
  const vec3<T> u5 = s5 + a54 * d4;
  s6 += a64 * d4;
  s7 += b4 * d4;
  ev += e4 * d4;
  const vec3<T> d5 = drag(u5);
  const vec3<T> u6 = s6 + a65 * d5;
  s7 += b5 * d5;
  ev += e5 * d5;
  const vec3<T> d6 = drag(u6);
  const vec3<T> u7 = s7 + b6 * d6;
  ev += e6 * d6;
  const vec3<T> d7 = drag(u7);
  // Off the chain of evaluations: velocities over ground, the new position, the position
  // error and the inverse error scales (they do not need d7).
  const vec3<T> v3 = u3 + w, v4 = u4 + w, v5 = u5 + w, v6 = u6 + w, v7 = u7 + w;
  const vec3<T> p7 = p0 + (b1 * v0 + b3 * v3 + b4 * v4 + b5 * v5 + b6 * v6);
  const vec3<T> ep = e1 * u0 + e3 * u3 + e4 * u4 + e5 * u5 + e6 * u6 + e7 * u7;
  T worst(0);
  vec3<T> inv_sv;
  for (int i = 0; i < 3; ++i) {
    const T sp = atol + rtol * max(T(abs(p0[i])), T(abs(p7[i])));
    inv_sv[i] = T(1) / T(atol + rtol * max(T(abs(v0[i])), T(abs(v7[i]))));
    worst = max(worst, T(abs(ep[i]) / sp));
  }
  ev += e7 * d7;
  for (int i = 0; i < 3; ++i) worst = max(worst, T(abs(ev[i]) * inv_sv[i]));
  y1.position = p7;
  y1.velocity = v7;
  k.k1 = phase<T>{v0, f1};
  k.k3 = phase<T>{v3, vec3<T>(g + d3)};
  k.k4 = phase<T>{v4, vec3<T>(g + d4)};
  k.k5 = phase<T>{v5, vec3<T>(g + d5)};
  k.k6 = phase<T>{v6, vec3<T>(g + d6)};
  k.k7 = phase<T>{v7, vec3<T>(g + d7)};
  return worst;
}

/// An acceleration of the form gravity + drag(v - wind) with its parts visible to
/// `dp5_step`, which then keeps gravity and wind off the chain of evaluations. Also a
/// plain acceleration: `operator()` takes the velocity over ground [m/s].
template <Real T, class M>
struct drag_in_wind {
  const M* model;
  vec3<T> gravity;  ///< [m/s^2]
  vec3<T> wind;     ///< [m/s]
  /// The drag acceleration [m/s^2] for the velocity in the air `u` [m/s].
  [[nodiscard]] vec3<T> drag(const vec3<T>& u) const { return vec3<T>(model->acceleration(u)); }
  /// The whole acceleration [m/s^2] for the velocity over ground `v` [m/s].
  [[nodiscard]] vec3<T> operator()(const vec3<T>& v) const {
    return vec3<T>(gravity + drag(vec3<T>(v - wind)));
  }
};

/// The continuous extension of one Dormand–Prince step: a polynomial of degree 4 in
/// theta = (t - t0) / h that matches y0 and y1 and their derivatives, with local error of
/// order 5 (Hairer, Norsett & Wanner, "Solving ODEs I", sec. II.6, the dense output of
/// DOPRI5, coefficients d_i due to Shampine). Built only for a step that an event or a
/// requested time falls in.
template <Real T>
class dp5_dense {
 public:
  dp5_dense(const T& t0, const T& h, const phase<T>& y0, const phase<T>& y1, const dp5_stages<T>& k)
      : t0_(t0), h_(h), y0_(y0) {
    const T d1 = T(-12715105075LL) / T(11282082432LL), d3 = T(87487479700LL) / T(32700410799LL),
            d4 = T(-10690763975LL) / T(1880347072LL), d5 = T(701980252875LL) / T(199316789632LL),
            d6 = T(-1453857185LL) / T(822651844LL), d7 = T(69997945LL) / T(29380423LL);
    diff_.position = y1.position - y0.position;
    diff_.velocity = y1.velocity - y0.velocity;
    bspl_.position = h * k.k1.position - diff_.position;
    bspl_.velocity = h * k.k1.velocity - diff_.velocity;
    r4_.position = diff_.position - h * k.k7.position - bspl_.position;
    r4_.velocity = diff_.velocity - h * k.k7.velocity - bspl_.velocity;
    r5_.position = h * (d1 * k.k1.position + d3 * k.k3.position + d4 * k.k4.position +
                        d5 * k.k5.position + d6 * k.k6.position + d7 * k.k7.position);
    r5_.velocity = h * (d1 * k.k1.velocity + d3 * k.k3.velocity + d4 * k.k4.velocity +
                        d5 * k.k5.velocity + d6 * k.k6.velocity + d7 * k.k7.velocity);
  }

  /// The interpolated phase at time `t` in [t0, t0 + h].
  [[nodiscard]] phase<T> operator()(const T& t) const {
    const T th = (t - t0_) / h_;
    const T th1 = T(1) - th;
    phase<T> y;
    y.position = y0_.position +
                 th * (diff_.position + th1 * (bspl_.position + th * (r4_.position + th1 * r5_.position)));
    y.velocity = y0_.velocity +
                 th * (diff_.velocity + th1 * (bspl_.velocity + th * (r4_.velocity + th1 * r5_.velocity)));
    return y;
  }

 private:
  T t0_;
  T h_;
  phase<T> y0_, diff_, bspl_, r4_, r5_;
};

namespace approx {

// Base-2 logarithm of a float to 0.009 (absolute) and power of 2 to 0.4 % (relative), as
// measured against std::log2 and std::exp2 in tests/integrate/reference_test.cpp:
// enough for a step-size factor, and much cheaper than std::log2/std::exp2, which sit on
// the chain from one step to the next (the new step size needs the error norm, the next
// step needs the new step size). The exponent field gives the integer part (IEEE 754
// binary32 layout, common practice); the fraction is the quadratic interpolant through
// u = 0, 1/2 and 1 (Lagrange interpolation; its error is at most the largest third
// derivative / 6 times max |u (u - 1/2) (u - 1)| = 0.048 on [0, 1]): log2(1 + u) for the
// mantissa 1 + u in [1, 2) (error below 0.023) and 2^u for u in [0, 1) (below 0.0054).
// No division, no long polynomial: a handful of dependent operations. Only for finite
// normal x > 0 (log2) and |x| < 100 (exp2); the callers clamp their arguments.
[[nodiscard]] inline float log2(float x) {
  const std::uint32_t bits = std::bit_cast<std::uint32_t>(x);
  const int exponent = static_cast<int>((bits >> 23) & 0xffu) - 127;
  const float u = std::bit_cast<float>((bits & 0x007fffffu) | 0x3f800000u) - 1.0f;
  constexpr float c = 0.33985000288462f;  // 4 (log2(3/2) - 1/2): exact at u = 1/2
  return static_cast<float>(exponent) + (u + c * u * (1.0f - u));
}

[[nodiscard]] inline float exp2(float x) {
  const int n = static_cast<int>(x >= 0.0f ? x : x - 1.0f);  // floor for |x| < 100
  const float u = x - static_cast<float>(n);
  constexpr float c = 0.34314575050762f;  // 4 (3/2 - sqrt 2): exact at u = 1/2
  const float e = 1.0f + (u - c * u * (1.0f - u));
  return e * std::bit_cast<float>(static_cast<std::uint32_t>(n + 127) << 23);
}

}  // namespace approx

/// Proportional–integral step-size control (Gustafsson's controller in the form of
/// Hairer, Norsett & Wanner, "Solving ODEs I", sec. IV.2 and the DOPRI5 code):
/// h_new = h * safety * err^-(1/5 - 0.75 beta) * err_old^beta, beta = 0.04, the factor
/// kept in [1/5, 10] (and <= 1 right after a rejection). A step-size factor needs only a
/// few digits, so it is computed in float for every T, from base-2 logarithms of the
/// error norms by the short interpolants of `approx` (the factor good to about 0.5 %; a
/// multiprecision pow would cost more than the step).
template <Real T>
class pi_controller {
 public:
  /// The next step size after a step of size `h` with error norm `err`.
  [[nodiscard]] T next(const T& h, const T& err, bool accepted) {
    constexpr float beta = 0.04f;
    constexpr float alpha = 0.2f - 0.75f * beta;
    constexpr float log_safety = -0.15200309f;  // log2(0.9)
    constexpr float log_lo = -2.3219281f;       // log2(1/5)
    constexpr float log_hi = 3.3219281f;        // log2(10)
    const float e = std::min(std::max(static_cast<float>(err), 1e-9f), 1e9f);
    const float log_e = approx::log2(e);
    float log_factor;
    if (accepted) {
      log_factor = log_safety - alpha * log_e + beta * log_old_;
      log_factor = std::min(rejected_ ? 0.0f : log_hi, std::max(log_lo, log_factor));
      log_old_ = std::max(log_e, -13.287712f);  // err_old >= 1e-4
      rejected_ = false;
    } else {
      log_factor = std::min(0.0f, std::max(log_lo, log_safety - 0.2f * log_e));
      rejected_ = true;
    }
    return T(h * T(approx::exp2(log_factor)));
  }

 private:
  float log_old_ = -13.287712f;  // log2(1e-4), Hairer's starting err_old
  bool rejected_ = false;
};

/// Hairer's starting step (Hairer, Norsett & Wanner, "Solving ODEs I", sec. II.4,
/// "Starting step size"): an explicit Euler probe estimates the second derivative, and
/// the step makes the local error of a 5th-order method about the tolerance. Costs one
/// evaluation of f. Never more than `h_max`.
template <Real T, class Accel>
[[nodiscard]] T dp5_initial_step(const Accel& accel, const phase<T>& y0, const phase<T>& f0, const T& rtol,
                                 const T& atol, const T& h_max) {
  using std::abs;
  using std::max;
  using std::min;
  using std::pow;
  using std::sqrt;
  T dnf(0), dny(0);
  for (int i = 0; i < 3; ++i) {
    const T sp = atol + rtol * T(abs(y0.position[i]));
    const T sv = atol + rtol * T(abs(y0.velocity[i]));
    dnf += T(f0.position[i] / sp) * T(f0.position[i] / sp) + T(f0.velocity[i] / sv) * T(f0.velocity[i] / sv);
    dny += T(y0.position[i] / sp) * T(y0.position[i] / sp) + T(y0.velocity[i] / sv) * T(y0.velocity[i] / sv);
  }
  const T tiny = T(1) / T(10000000000LL);
  T h = (dnf <= tiny || dny <= tiny) ? T(T(1) / T(1000000)) : T(sqrt(T(dny / dnf)) / T(100));
  h = min(h, h_max);
  phase<T> y1;
  y1.position = y0.position + h * f0.position;
  y1.velocity = y0.velocity + h * f0.velocity;
  const phase<T> f1 = derivative(accel, y1);
  T der2(0);
  for (int i = 0; i < 3; ++i) {
    const T sp = atol + rtol * T(abs(y0.position[i]));
    const T sv = atol + rtol * T(abs(y0.velocity[i]));
    const T dp = (f1.position[i] - f0.position[i]) / sp;
    const T dv = (f1.velocity[i] - f0.velocity[i]) / sv;
    der2 += dp * dp + dv * dv;
  }
  der2 = sqrt(der2) / h;
  const T der12 = max(der2, T(sqrt(dnf)));
  const T h1 = der12 <= T(1) / T(1000000000000000LL) ? max(T(T(1) / T(1000000)), T(h / T(1000)))
                                                      : T(pow(T(T(1) / T(100) / der12), T(1) / T(5)));
  return min(T(min(T(100 * h), h1)), h_max);
}

}  // namespace lob::detail
