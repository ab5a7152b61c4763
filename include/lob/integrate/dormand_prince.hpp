#pragma once
/// \file lob/integrate/dormand_prince.hpp
/// The Dormand–Prince 5(4) pair with first-same-as-last, its error norm, a
/// proportional–integral step-size controller and its continuous extension (dense
/// output). Internal building blocks of `integrated_flight`; all state lives on the stack.

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>
#include <limits>

#include "lob/core/real.hpp"
#include "lob/core/vec.hpp"
#include "lob/models/traits.hpp"

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
  // k1). The locals are plain arrays of T worked component by component: every loop is
  // three multiply-adds that the compiler unrolls and keeps in registers, where the same
  // sums in Eigen expressions were partly left as out-of-line assignment calls through
  // the stack (seen in perf annotate of the benchmark, g++ 12 -O3).
  //
  // With an acceleration of the form gravity + drag(v - wind) (`drag_in_wind`) the stages
  // carry the velocity in the air, u = v - wind, and the drag d alone: gravity enters each
  // stage sum as c_i h g (c_i = sum_j a_ij, the stage's node), formed before the
  // evaluations, so that neither the wind nor gravity lengthens the chain. The error
  // terms use u and d directly: the weights e_i sum to zero, so the constant parts
  // (wind, gravity) cancel from them exactly.
  constexpr bool split = requires { accel.drag(y0.velocity); accel.gravity; accel.wind; };
  T g[3] = {T(0), T(0), T(0)};
  T w[3] = {T(0), T(0), T(0)};
  if constexpr (split) {
    for (int i = 0; i < 3; ++i) {
      g[i] = accel.gravity[i];
      w[i] = accel.wind[i];
    }
  }
  const auto drag = [&](const T (&u)[3], T (&d)[3]) {
    const vec3<T> uv(u[0], u[1], u[2]);
    vec3<T> dv;
    if constexpr (split) {
      dv = accel.drag(uv);
    } else {
      dv = accel(uv);
    }
    for (int i = 0; i < 3; ++i) d[i] = dv[i];
  };
  T p0[3], v0[3], f1[3], u0[3], hg[3];
  for (int i = 0; i < 3; ++i) {
    p0[i] = y0.position[i];
    v0[i] = y0.velocity[i];
    f1[i] = k1.velocity[i];
    u0[i] = v0[i] - w[i];
    hg[i] = h * g[i];
  }
  // Stage 1 enters through f1 = g + d1 (gravity included); the other stages' gravity
  // through (c_i - a_i1) h g.
  const T c3 = T(3) / T(10) - T(3) / T(40), c4 = T(4) / T(5) - T(44) / T(45),
          c5 = T(8) / T(9) - T(19372) / T(6561), c6 = T(1) - T(9017) / T(3168), c7 = T(1) - T(35) / T(384),
          ce = T(71) / T(57600);
  T u2[3], s3[3], s4[3], s5[3], s6[3], s7[3], ev[3];
  for (int i = 0; i < 3; ++i) {
    u2[i] = u0[i] + a21 * f1[i];
    s3[i] = u0[i] + c3 * hg[i] + a31 * f1[i];
    s4[i] = u0[i] + c4 * hg[i] + a41 * f1[i];
    s5[i] = u0[i] + c5 * hg[i] + a51 * f1[i];
    s6[i] = u0[i] + c6 * hg[i] + a61 * f1[i];
    s7[i] = u0[i] + c7 * hg[i] + b1 * f1[i];
    ev[i] = e1 * f1[i] - ce * hg[i];
  }
  // Each stage: its drag d = drag(u) and the next stage velocity u_next = s + a d. For
  // quadratic drag, d = -c |u| u, the product a d is formed as |u| (-a c u): -a c u is
  // ready before the square root, so that only one multiply and one add follow it on the
  // chain (instead of the drag's two multiplies, then a times d, then the add).
  constexpr bool quadratic = requires { accel.quadratic_coefficient(); };
  T mc(0);
  if constexpr (quadratic) mc = -accel.quadratic_coefficient();
  // With at least double precision, the square of the next stage's air speed is formed
  // without waiting for u_next: |s + |u| w|^2 = s.s + |u| (2 s.w) + |u|^2 w.w with
  // w = -a c u, whose dot products are ready before the square root, so that two
  // multiplies and two adds follow it instead of u_next's multiply-add and then its
  // squared norm. The expansion's rounding is of order eps (|s| + |u| |w|)^2 (clamped at
  // zero): relative to |u_next|^2 at most about eps (1 + 2 r)^2, r = |a d| / |u_next| the
  // stage's change of air velocity by drag over its air speed, which is small but near a
  // zero of the air speed, where the drag itself vanishes. In float that rounding showed
  // in the reference tests (the range of a near-vertical shot went beyond its tolerance,
  // tests/integrate/reference_test.cpp), so float keeps the direct norm.
  T speed(0);  // quadratic drag: |u| of the newest stage
  constexpr bool expand = quadratic && std::numeric_limits<T>::digits >= 53;
  if constexpr (quadratic) {
    using std::sqrt;
    speed = sqrt(T(u2[0] * u2[0] + u2[1] * u2[1] + u2[2] * u2[2]));
  }
  const auto stage = [&](const T (&u)[3], const T& a, const T (&sn)[3], T (&d)[3], T (&un)[3]) {
    if constexpr (quadratic) {
      using std::max;
      using std::sqrt;
      const T am = a * mc;
      T w[3];
      for (int i = 0; i < 3; ++i) w[i] = am * u[i];
      for (int i = 0; i < 3; ++i) un[i] = sn[i] + speed * w[i];
      const T m = mc * speed;
      for (int i = 0; i < 3; ++i) d[i] = m * u[i];
      if constexpr (expand) {
        const T ss = sn[0] * sn[0] + sn[1] * sn[1] + sn[2] * sn[2];
        const T sw = T(2) * (sn[0] * w[0] + sn[1] * w[1] + sn[2] * w[2]);
        const T ww = w[0] * w[0] + w[1] * w[1] + w[2] * w[2];
        speed = sqrt(T(max(T((ss + speed * sw) + (speed * speed) * ww), T(0))));
      } else {
        speed = sqrt(T(un[0] * un[0] + un[1] * un[1] + un[2] * un[2]));
      }
    } else {
      drag(u, d);
      for (int i = 0; i < 3; ++i) un[i] = sn[i] + a * d[i];
    }
  };
  T d2[3], d3[3], d4[3], d5[3], d6[3], d7[3], u3[3], u4[3], u5[3], u6[3], u7[3];
  stage(u2, a32, s3, d2, u3);
  for (int i = 0; i < 3; ++i) {
    s4[i] += a42 * d2[i];
    s5[i] += a52 * d2[i];
    s6[i] += a62 * d2[i];
  }
  stage(u3, a43, s4, d3, u4);
  for (int i = 0; i < 3; ++i) {
    s5[i] += a53 * d3[i];
    s6[i] += a63 * d3[i];
    s7[i] += b3 * d3[i];
    ev[i] += e3 * d3[i];
  }
  stage(u4, a54, s5, d4, u5);
  for (int i = 0; i < 3; ++i) {
    s6[i] += a64 * d4[i];
    s7[i] += b4 * d4[i];
    ev[i] += e4 * d4[i];
  }
  stage(u5, a65, s6, d5, u6);
  for (int i = 0; i < 3; ++i) {
    s7[i] += b5 * d5[i];
    ev[i] += e5 * d5[i];
  }
  stage(u6, b6, s7, d6, u7);
  for (int i = 0; i < 3; ++i) ev[i] += e6 * d6[i];
  if constexpr (quadratic) {
    const T m = mc * speed;
    for (int i = 0; i < 3; ++i) d7[i] = m * u7[i];
  } else {
    drag(u7, d7);
  }
  // Off the chain of evaluations: velocities over ground, the new position, the position
  // error and the inverse error scales (they do not need d7).
  T worst(0);
  T inv_sv[3];
  for (int i = 0; i < 3; ++i) {
    const T v3 = u3[i] + w[i], v4 = u4[i] + w[i], v5 = u5[i] + w[i], v6 = u6[i] + w[i], v7 = u7[i] + w[i];
    const T p7 = p0[i] + ((((b1 * v0[i] + b3 * v3) + b4 * v4) + b5 * v5) + b6 * v6);
    const T ep = ((((e1 * u0[i] + e3 * u3[i]) + e4 * u4[i]) + e5 * u5[i]) + e6 * u6[i]) + e7 * u7[i];
    const T sp = atol + rtol * max(T(abs(p0[i])), T(abs(p7)));
    inv_sv[i] = T(1) / T(atol + rtol * max(T(abs(v0[i])), T(abs(v7))));
    worst = max(worst, T(abs(ep) / sp));
    y1.position[i] = p7;
    y1.velocity[i] = v7;
    k.k1.position[i] = v0[i];
    k.k1.velocity[i] = f1[i];
    k.k3.position[i] = v3;
    k.k3.velocity[i] = g[i] + d3[i];
    k.k4.position[i] = v4;
    k.k4.velocity[i] = g[i] + d4[i];
    k.k5.position[i] = v5;
    k.k5.velocity[i] = g[i] + d5[i];
    k.k6.position[i] = v6;
    k.k6.velocity[i] = g[i] + d6[i];
    k.k7.position[i] = v7;
    k.k7.velocity[i] = g[i] + d7[i];
  }
  for (int i = 0; i < 3; ++i) worst = max(worst, T(abs(T(ev[i] + e7 * d7[i])) * inv_sv[i]));
  // max() drops a NaN operand, and an infinite scale makes any error 0: a step whose end
  // overflows (drag 1e300 /s over a step of 1e-6 s) came back accepted. Zero times the
  // end is NaN exactly where the end is not finite.
  T poison(0);
  for (int i = 0; i < 3; ++i)
    poison += T(T(0) * y1.position[i]) + T(T(0) * y1.velocity[i]) + T(T(0) * k.k7.velocity[i]);
  return worst + poison;
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
  /// The c of a_drag = -c |u| u [1/m], for the models that are pure quadratic drag
  /// (`model_traits<M>::quadratic_fast_path`); `dp5_step` then forms the drag itself.
  [[nodiscard]] T quadratic_coefficient() const
    requires(model_traits<M>::quadratic_fast_path)
  {
    return model_traits<M>::quadratic_coefficient(*model);
  }
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

  /// The interpolated position alone at time `t` in [t0, t0 + h] (what event functions
  /// on heights and distances need: half the work of the whole phase).
  [[nodiscard]] vec3<T> position(const T& t) const {
    const T th = (t - t0_) / h_;
    const T th1 = T(1) - th;
    return vec3<T>(y0_.position +
                   th * (diff_.position + th1 * (bspl_.position + th * (r4_.position + th1 * r5_.position))));
  }

  /// The interpolated phase at time `t` in [t0, t0 + h].
  [[nodiscard]] phase<T> operator()(const T& t) const {
    const T th = (t - t0_) / h_;
    const T th1 = T(1) - th;
    phase<T> y;
    y.position = position(t);
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

// Mitchell's binary logarithm and its inverse (J. N. Mitchell, "Computer multiplication
// and division using binary logarithms", IRE Trans. Electron. Comput. EC-11 (1962)
// 512-517), on the bit pattern of a double (IEEE 754 binary64 layout, common practice):
// for x = 2^e (1 + m), 0 <= m < 1, the pattern read as an integer is (e + 1023) 2^52 +
// m 2^52, so pattern / 2^52 - 1023 = e + m, which is log2(x) less at most 0.0861 (the
// largest log2(1 + m) - m); the inverse map 2^(e + m) ~ 2^e (1 + m) is 2^y more at most
// 6.2 %. Two integer-float conversions and no polynomial: the step-size factor needs
// only a few per cent, and it sits on the chain from one step to the next (the new step
// size needs the error norm, the next step needs the new step size), where std::log2 and
// std::exp2 would cost more than a stage. `pattern` takes x >= 0 and is increasing in x;
// `from_pattern` takes values in [0, 2047 * 2^52).
[[nodiscard]] inline double pattern(double x) {
  return static_cast<double>(std::bit_cast<std::int64_t>(x));
}
[[nodiscard]] inline double from_pattern(double p) {
  return std::bit_cast<double>(static_cast<std::int64_t>(p));
}
inline constexpr double pattern_unit = 4503599627370496.0;  // 2^52
[[nodiscard]] inline double log2(double x) { return pattern(x) / pattern_unit - 1023.0; }
[[nodiscard]] inline double exp2(double y) { return from_pattern((y + 1023.0) * pattern_unit); }

}  // namespace approx

/// Proportional–integral step-size control (Gustafsson's controller in the form of
/// Hairer, Norsett & Wanner, "Solving ODEs I", sec. IV.2 and the DOPRI5 code):
/// h_new = h * safety * err^-(1/5 - 0.75 beta) * err_old^beta, beta = 0.04, the factor
/// kept in [1/5, 10] (and <= 1 right after a rejection). A step-size factor needs only a
/// few digits, so it is computed in double for every T by Mitchell's logarithm and its
/// inverse (`approx`) composed into one affine map of the error norm's bit pattern:
/// pattern(factor) = pattern_unit (log2 safety + beta log2 err_old + 1023 (1 + alpha)) -
/// alpha pattern(err). The composition is 0.004 % to 7.3 % above the exact factor (7.5 %
/// after a rejection, where the exponent is 1/5), measured over err in [1e-9, 1e3] by
/// tests/integrate/reference_test.cpp against std::pow; a constant 2^-0.0505 centres that
/// to within 3.7 %.
template <Real T>
class pi_controller {
 public:
  /// The next step size after a step of size `h` with error norm `err` (>= 0; any value
  /// beyond the clamps, infinity included, gives the clamped factor).
  [[nodiscard]] T next(const T& h, const T& err, bool accepted) {
    constexpr double unit = approx::pattern_unit;
    constexpr double beta = 0.04;
    constexpr double alpha = 0.2 - 0.75 * beta;
    constexpr double log_safety = -0.15200309344504995 - 0.0505;  // log2(0.9), centred
    const double p_err = approx::pattern(static_cast<double>(err));
    double p_factor;
    if (accepted) {
      p_factor = std::min(rejected_ ? p_one : p_hi, std::max(p_lo, p_accept_ - alpha * p_err));
      // err_old >= 1e-4 (Hairer's bound), for the next step: off the chain.
      const double log_old = std::max(p_err / unit - 1023.0, -13.287712379549449);
      p_accept_ = unit * (log_safety + beta * log_old + 1023.0 * (1.0 + alpha));
      rejected_ = false;
    } else {
      p_factor = std::min(p_one, std::max(p_lo, unit * (log_safety + 1023.0 * 1.2) - 0.2 * p_err));
      rejected_ = true;
    }
    return T(h * T(approx::from_pattern(p_factor)));
  }

 private:
  // The patterns of the factor limits 1/5, 1 and 10.
  static constexpr double p_lo = 4596373779694328218.0;  // pattern(0.2)
  static constexpr double p_one = 4607182418800017408.0;  // pattern(1.0)
  static constexpr double p_hi = 4621819117588971520.0;   // pattern(10.0)
  // pattern_unit (log2 safety + beta log2 err_old + 1023 (1 + alpha)), err_old = 1e-4 to start (Hairer).
  double p_accept_ = approx::pattern_unit *
                     (-0.15200309344504995 - 0.0505 + 0.04 * -13.287712379549449 + 1023.0 * (1.0 + 0.17));
  bool rejected_ = false;
};

/// The Euclidean norm of the six ratios (a.position / sp, a.velocity / sv), without
/// overflow of their squares (a launch at 1e154 m/s against an absolute tolerance of
/// 1e-9 has ratios of 1e163); infinite only where a ratio is.
template <Real T>
[[nodiscard]] T ratio_norm(const phase<T>& a, const vec3<T>& sp, const vec3<T>& sv) {
  using std::abs;
  using std::max;
  using std::sqrt;
  T r[6];
  T largest(0);
  for (int i = 0; i < 3; ++i) {
    r[i] = a.position[i] / sp[i];
    r[i + 3] = a.velocity[i] / sv[i];
  }
  for (const T& x : r) largest = max(largest, T(abs(x)));
  if (!(largest > T(0)) || !is_finite(largest)) return largest;
  T sum(0);
  for (const T& x : r) sum += T(x / largest) * T(x / largest);
  return largest * T(sqrt(sum));
}

/// Hairer's starting step (Hairer, Norsett & Wanner, "Solving ODEs I", sec. II.4,
/// "Starting step size"): an explicit Euler probe estimates the second derivative, and
/// the step makes the local error of a 5th-order method about the tolerance. Costs one
/// evaluation of f. Never more than `h_max`; always positive (where the estimate is not,
/// 1e-6 s, which the step control then shrinks).
template <Real T, class Accel>
[[nodiscard]] T dp5_initial_step(const Accel& accel, const phase<T>& y0, const phase<T>& f0, const T& rtol,
                                 const T& atol, const T& h_max) {
  using std::abs;
  using std::max;
  using std::min;
  using std::pow;
  vec3<T> sp, sv;
  for (int i = 0; i < 3; ++i) {
    sp[i] = atol + rtol * T(abs(y0.position[i]));
    sv[i] = atol + rtol * T(abs(y0.velocity[i]));
  }
  const T ny = ratio_norm(y0, sp, sv);
  const T tiny = T(1) / T(100000);
  const T fallback = T(1) / T(1000000);
  // ny / nf / 100 as the norm of f0 over the scales times ny: under a drag rate of 1e300
  // /s nf alone overflows, and the step (1e-303 s) must stay positive and small.
  vec3<T> spy = sp, svy = sv;
  if (ny > tiny) {
    spy *= ny;
    svy *= ny;
  }
  const T nf = ratio_norm(f0, sp, sv);
  const T nf_over_ny = ratio_norm(f0, spy, svy);
  T h = (nf <= tiny || ny <= tiny) ? fallback : T(T(1) / T(100) / nf_over_ny);
  if (!(h > T(0)) || !is_finite(h)) h = fallback;
  h = min(h, h_max);
  phase<T> y1;
  y1.position = y0.position + h * f0.position;
  y1.velocity = y0.velocity + h * f0.velocity;
  const phase<T> f1 = derivative(accel, y1);
  phase<T> change;
  change.position = f1.position - f0.position;
  change.velocity = f1.velocity - f0.velocity;
  const T nd = ratio_norm(change, sp, sv);
  // (1/100 / max(nd / h, nf))^(1/5), each root taken apart so that nd / h may exceed T.
  const T fifth = T(1) / T(5);
  const T hundredth = T(1) / T(100);
  T h1;
  if (!(nd / h > T(1) / T(1000000000000000LL)) && !(nf > T(1) / T(1000000000000000LL)))
    h1 = max(fallback, T(h / T(1000)));
  else
    h1 = min(T(T(pow(h, fifth)) * T(pow(T(hundredth / nd), fifth))), T(pow(T(hundredth / nf), fifth)));
  T out = min(T(100 * h), h1);
  if (!(out > T(0)) || !is_finite(out)) out = h;
  return min(out, h_max);
}

}  // namespace lob::detail
