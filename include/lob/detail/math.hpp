#pragma once
/// \file lob/detail/math.hpp
/// Internal maths helpers: a Boost.Math policy that never throws, and the phi functions
/// of linear-drag flight evaluated without cancellation.

#include <cmath>
#include <limits>
#include <type_traits>

#include <boost/math/policies/policy.hpp>
#include <boost/math/special_functions/expm1.hpp>
#include <boost/math/special_functions/log1p.hpp>
#include <boost/math/tools/precision.hpp>

#include "lob/core/real.hpp"

namespace lob::detail {

/// Boost.Math reports through errno instead of throwing; callers check results.
using no_throw_policy = boost::math::policies::policy<
    boost::math::policies::domain_error<boost::math::policies::errno_on_error>,
    boost::math::policies::pole_error<boost::math::policies::errno_on_error>,
    boost::math::policies::overflow_error<boost::math::policies::errno_on_error>,
    boost::math::policies::underflow_error<boost::math::policies::ignore_error>,
    boost::math::policies::denorm_error<boost::math::policies::ignore_error>,
    boost::math::policies::evaluation_error<boost::math::policies::errno_on_error>,
    boost::math::policies::rounding_error<boost::math::policies::errno_on_error>,
    boost::math::policies::indeterminate_result_error<boost::math::policies::errno_on_error>,
    boost::math::policies::promote_float<false>, boost::math::policies::promote_double<false>>;

template <Real T>
[[nodiscard]] T epsilon() {
  return boost::math::tools::epsilon<T>();
}

/// exp(x) - 1 without cancellation near 0 (std for built-ins, Boost for the rest).
template <Real T>
[[nodiscard]] T expm1(const T& x) {
  if constexpr (std::is_floating_point_v<T>) {
    return std::expm1(x);
  } else {
    return boost::math::expm1(x, no_throw_policy{});
  }
}

/// log(1 + x) without cancellation near 0.
template <Real T>
[[nodiscard]] T log1p(const T& x) {
  if constexpr (std::is_floating_point_v<T>) {
    return std::log1p(x);
  } else {
    return boost::math::log1p(x, no_throw_policy{});
  }
}

/// log(1 + x) - x without cancellation near 0 (Boost.Math log1pmx).
template <Real T>
[[nodiscard]] T log1pmx(const T& x) {
  return boost::math::log1pmx(x, no_throw_policy{});
}

/// log(1 + x) / x, continuous at x = 0 (value 1); x > -1.
template <Real T>
[[nodiscard]] T log1p_over_x(const T& x) {
  return x == T(0) ? T(1) : T(detail::log1p(x) / x);
}

/// How many terms of a series a precision needs: for |x| <= limits[i], terms[i] (rows for
/// 24, 53 and 64 significand bits; beyond the last limit, or for wider types, 0 = "sum to
/// convergence"). The counts come from the coefficients' sizes, with the tail below
/// eps/16 of the value.
template <Real T, int L>
[[nodiscard]] int series_terms(const T& magnitude, const double (&limits)[L], const int (&t24)[L],
                               const int (&t53)[L], const int (&t64)[L]) {
  constexpr int digits = std::numeric_limits<T>::digits;
  if constexpr (digits > 64) {
    return 0;
  } else {
    const int* terms = digits <= 24 ? t24 : digits <= 53 ? t53 : t64;
    for (int i = 0; i < L; ++i)
      if (magnitude <= T(limits[i])) return terms[i];
    return 0;
  }
}

/// 1/(2j + 3), j = 0 .. 19: the coefficients of log1pmx_series.
template <class T>
inline constexpr T log1pmx_coefficients[20] = {
    T(1) / T(3),
    T(1) / T(5),
    T(1) / T(7),
    T(1) / T(9),
    T(1) / T(11),
    T(1) / T(13),
    T(1) / T(15),
    T(1) / T(17),
    T(1) / T(19),
    T(1) / T(21),
    T(1) / T(23),
    T(1) / T(25),
    T(1) / T(27),
    T(1) / T(29),
    T(1) / T(31),
    T(1) / T(33),
    T(1) / T(35),
    T(1) / T(37),
    T(1) / T(39),
    T(1) / T(41)};

/// S(w) = sum_j w^j / (2j + 3) for 0 <= w <= 1/9: the series behind log1p(x) = 2y (1 + y^2 S)
/// and -log1pmx(x)/x^2 = (1 - y)/2 (1 - y (1 - y) S) with y = x/(2 + x) and w = y^2
/// (from log(1 + x) = 2 atanh(y)). Terms fall at least like 9^-j. Built-in types sum a
/// fixed number of terms by Horner's rule (no loop-carried division); wider types sum to
/// convergence.
template <Real T>
[[nodiscard]] T log1pmx_series(const T& w) {
  static constexpr double limits[7] = {1e-8, 1e-6, 1e-4, 1e-3, 1e-2, 3e-2, 1.0 / 9};
  static constexpr int t24[7] = {1, 2, 2, 3, 4, 5, 8};
  static constexpr int t53[7] = {3, 3, 5, 6, 9, 11, 17};
  static constexpr int t64[7] = {3, 4, 5, 7, 10, 13, 20};
  if constexpr (std::is_floating_point_v<T>) {
    const int n = series_terms(w, limits, t24, t53, t64);
    if (n > 0) {
      T sum = log1pmx_coefficients<T>[n - 1];
      for (int i = n - 2; i >= 0; --i) sum = sum * w + log1pmx_coefficients<T>[i];
      return sum;
    }
  }
  const T eps = epsilon<T>();
  T power = T(1);
  T sum = T(1) / T(3);
  for (int j = 1; j < 400; ++j) {  // 9^-j: 400 terms exceed any precision
    power *= w;
    const T term = power / T(2 * j + 3);
    sum += term;
    if (term <= eps * sum) break;
  }
  return sum;
}

/// m(x) = -log1pmx(x) / x^2 = (x - log(1 + x)) / x^2, continuous at 0 (value 1/2), x > -1,
/// without cancellation: from log1pmx_series for |y| <= 1/3 (x in [-1/2, 1]), where all
/// terms have one sign or are small; outside, (x - log1p(x))/x^2 loses at most about 6 ulps.
template <Real T>
[[nodiscard]] T log1pmx_ratio(const T& x) {
  const T y = x / (T(2) + x);
  if (T(3) * y > T(1) || T(3) * y < T(-1)) return T((x - detail::log1p(x)) / (x * x));
  const T sum = log1pmx_series(T(y * y));
  return T((T(1) - y) / T(2) * (T(1) - y * (T(1) - y) * sum));
}

/// Coefficients c_n of u(p)/p = sum_n c_n p^n, where u(p) is the root of
/// -log1pmx(-u) = p^2/2 with the sign of p (p > 0: u in [0, 1), the W0 branch; p < 0:
/// u < 0, the W-1 branch). Then u = 1 + W(-exp(-p^2/2 - 1)): this is the branch-point
/// series of the Lambert W function (Corless, Gonnet, Hare, Jeffrey & Knuth, "On the
/// Lambert W function", Adv. Comput. Math. 5 (1996), sec. 4) in the variable p =
/// sqrt(-2 E) instead of sqrt(2 (1 + e z)), so that it needs no z near -1/e at all. The
/// rational coefficients were obtained by Lagrange inversion in exact arithmetic and are
/// checked against mpmath in scripts/exact_reference.py (--check-series); the series
/// converges for |p| < 2 sqrt(pi) (the next branch point, -p^2/2 = 2 pi i).
template <class T>
inline constexpr T branch_coefficients[34] = {
    T(1.0L),
    T(-0.3333333333333333333333333L),
    T(0.02777777777777777777777778L),
    T(0.003703703703703703703703704L),
    T(0.0002314814814814814814814815L),
    T(-0.00005878894767783656672545561L),
    T(-0.00002553644914756025867136978L),
    T(-0.000004899078973153047227121301L),
    T(-0.0000002428276122977769068304048L),
    T(0.0000001854062210715159960701799L),
    T(7.542464855411896368196584e-8L),
    T(1.472162728068839942030005e-8L),
    T(5.159887341078075831053382e-10L),
    T(-7.32986413160022003040997e-10L),
    T(-2.921357345635568791035316e-10L),
    T(-5.717312238897993896364055e-11L),
    T(-1.500834940879191162757527e-12L),
    T(3.239317851416902815257827e-12L),
    T(1.282207790561442960194425e-12L),
    T(2.513834640057087794545275e-13L),
    T(5.24018668188387370039877e-15L),
    T(-1.532619664727720626739863e-14L),
    T(-6.053864010513748112692896e-15L),
    T(-1.188953908626976800165288e-15L),
    T(-2.055644733697029047596258e-17L),
    T(7.597033959365170321306246e-17L),
    T(2.999822650631319012618947e-17L),
    T(5.900904005856486363982672e-18L),
    T(8.726010378440994563002107e-20L),
    T(-3.895646579519858862941029e-19L),
    T(-1.538721628974349922006993e-19L),
    T(-3.030976893455074101314718e-20L),
    T(-3.918959253950962124376744e-22L),
    T(2.049773603878145111920749e-21L),
};

/// u(p)/p for |p| <= 1/2 (see branch_coefficients), by Horner's rule with as many terms
/// as the precision of T needs at that |p| (the tail below eps/8; counts from the
/// coefficients' sizes). Types wider than 64 bits get 34 terms, about 1e-22 at |p| = 1/2,
/// and their callers polish the result.
template <Real T>
[[nodiscard]] T branch_ratio(const T& p) {
  using std::abs;
  const T a = abs(p);
  static constexpr double limits[8] = {1e-4, 1e-3, 1e-2, 3e-2, 0.1, 0.2, 0.3, 0.5};
  static constexpr int terms_24[8] = {2, 3, 3, 4, 5, 6, 7, 8};
  static constexpr int terms_53[8] = {4, 5, 7, 8, 10, 12, 15, 18};
  static constexpr int terms_64[8] = {5, 6, 8, 9, 12, 15, 17, 22};
  constexpr int digits = std::numeric_limits<T>::digits;
  const int* terms = digits <= 24 ? terms_24 : digits <= 53 ? terms_53 : terms_64;
  int n = 34;
  if (digits <= 64) {
    n = terms[7];
    for (int i = 0; i < 8; ++i) {
      if (a <= T(limits[i])) {
        n = terms[i];
        break;
      }
    }
  }
  if constexpr (std::is_floating_point_v<T>) {
    T sum = branch_coefficients<T>[n - 1];
    for (int i = n - 2; i >= 0; --i) sum = sum * p + branch_coefficients<T>[i];
    return sum;
  } else {
    T sum = T(branch_coefficients<long double>[n - 1]);
    for (int i = n - 2; i >= 0; --i) sum = T(sum * p + T(branch_coefficients<long double>[i]));
    return sum;
  }
}

/// e^-z and phi1(z) = (1 - e^-z)/z together, z >= 0, from one exponential: expm1 below
/// z = 1/2 (where 1 - e^-z would cancel), exp above (where 1 + expm1 would lose e^-z's
/// relative accuracy once e^-z is small).
template <Real T>
struct decay_pair {
  T factor;  ///< e^-z
  T phi1;    ///< (1 - e^-z)/z
};
template <Real T>
[[nodiscard]] decay_pair<T> decay(const T& z) {
  using std::exp;
  if (z == T(0)) return {T(1), T(1)};
  if (z < T(1) / T(2)) {
    const T em = detail::expm1(T(-z));
    return {T(T(1) + em), T(-em / z)};
  }
  const T e = exp(-z);
  return {e, T((T(1) - e) / z)};
}

/// phi1(z) = (1 - e^-z) / z, continuous at 0 (value 1); z >= 0.
/// The velocity memory of linear drag: x(t) contains v0 * t * phi1(k t).
template <Real T>
[[nodiscard]] T phi1(const T& z) {
  return z == T(0) ? T(1) : T(-detail::expm1(T(-z)) / z);
}

/// (-1)^n / (n + 2)!, n = 0 .. 15: the Taylor coefficients of phi2 (all exact integers
/// in double).
template <class T>
inline constexpr T phi2_coefficients[16] = {
    T(1) / T(2),
    T(-1) / T(6),
    T(1) / T(24),
    T(-1) / T(120),
    T(1) / T(720),
    T(-1) / T(5040),
    T(1) / T(40320),
    T(-1) / T(362880),
    T(1) / T(3628800),
    T(-1) / T(39916800),
    T(1) / T(479001600),
    T(-1) / T(6227020800),
    T(1) / T(87178291200),
    T(-1) / T(1307674368000),
    T(1) / T(20922789888000),
    T(-1) / T(355687428096000)};

/// phi2(z) = (z - 1 + e^-z) / z^2, continuous at 0 (value 1/2); z >= 0.
/// Gravity's share of linear-drag flight: x(t) contains g * t^2 * phi2(k t).
/// The closed form cancels for small z (z + expm1(-z) ~ z^2/2), so below z = 1/2 it is
/// summed as its Taylor series sum_n (-z)^n / (n+2)! (built-in types: a fixed number of
/// terms by Horner's rule; wider types: to convergence); above, the closed form loses at
/// most 2/z ulps, 4 at z = 1/2.
template <Real T>
[[nodiscard]] T phi2(const T& z) {
  if (z < T(1) / T(2)) {
    static constexpr double limits[9] = {1e-8, 1e-6, 1e-4, 1e-3, 1e-2, 3e-2, 0.1, 0.25, 0.5};
    static constexpr int t24[9] = {1, 2, 2, 3, 4, 4, 5, 7, 8};
    static constexpr int t53[9] = {2, 3, 4, 5, 7, 8, 10, 12, 14};
    static constexpr int t64[9] = {3, 4, 5, 6, 8, 9, 11, 14, 16};
    if constexpr (std::is_floating_point_v<T>) {
      const int n = series_terms(z, limits, t24, t53, t64);
      T sum = phi2_coefficients<T>[n - 1];
      for (int i = n - 2; i >= 0; --i) sum = sum * z + phi2_coefficients<T>[i];
      return sum;
    }
    const T eps = epsilon<T>();
    T term = T(1) / T(2);
    T sum = term;
    for (int n = 1; n < 200; ++n) {  // 200 terms reach far beyond any precision at z < 1/2
      term *= -z / T(n + 2);
      sum += term;
      using std::abs;
      if (abs(term) <= eps * sum) break;
    }
    return sum;
  }
  return T((z + detail::expm1(T(-z))) / (z * z));
}

/// phi2 from a decay_pair already at hand (saves the exponential above z = 1/2):
/// (1 - phi1)/z there, the series below.
template <Real T>
[[nodiscard]] T phi2(const T& z, const decay_pair<T>& d) {
  if (z < T(1) / T(2)) return phi2(z);
  return T((T(1) - d.phi1) / z);
}

/// A type with more precision than T for residuals that cancel: long double for double
/// (where long double is wider), double for float, T itself otherwise.
template <class T>
using wider_t = std::conditional_t<
    std::is_same_v<T, float>, double,
    std::conditional_t<std::is_same_v<T, double> &&
                           (std::numeric_limits<long double>::digits > std::numeric_limits<double>::digits),
                       long double, T>>;

/// The vertical motion of linear-drag flight relative to the launch: rate k [1/s],
/// vertical launch velocity v [m/s], net pull G = g - k w [m/s^2].
template <Real T>
struct vertical_motion {
  T k, v, G;

  /// Height above the launch at time t: v t phi1(kt) - G t^2 phi2(kt).
  [[nodiscard]] T rise(const T& t) const {
    const T z = k * t;
    const decay_pair<T> d = decay(z);
    return T(v * t * d.phi1 - G * t * t * phi2(z, d));
  }

  /// Safeguarded Newton (bisection whenever a step leaves the bracket) for rise(t) = dh
  /// on [lo, hi], where (rise - dh) * direction goes from < 0 to > 0. One exponential per
  /// step gives height, vertical velocity and acceleration; the iteration stops when the
  /// step is below 2 ulps, or when a step s below sqrt(eps) t has the Newton error
  /// estimate |f''| s^2 / (2 |f'|) below eps t / 4 (quadratic convergence: the next step
  /// would change nothing). At most 200 steps; false when they run out.
  [[nodiscard]] bool newton(const T& dh, T lo, T hi, const T& guess, int direction, T& t) const {
    using std::abs;
    const T eps = epsilon<T>();
    t = guess > lo && guess < hi ? guess : T((lo + hi) / 2);
    for (int i = 0; i < 200; ++i) {
      const T z = k * t;
      const decay_pair<T> d = decay(z);
      const T f = T(T(v * t * d.phi1 - G * t * t * phi2(z, d)) - dh) * T(direction);
      if (f == T(0)) return true;
      if (f < T(0)) lo = t;
      else hi = t;
      const T slope = T(v * d.factor - G * t * d.phi1) * T(direction);
      bool newton_step = slope > T(0);
      T next = newton_step ? T(t - f / slope) : T((lo + hi) / 2);
      if (!(next > lo && next < hi)) {
        next = (lo + hi) / 2;
        newton_step = false;
      }
      const T step = abs(T(next - t));
      t = next;
      if (step <= 2 * eps * abs(t) || !(hi - lo > 2 * eps * abs(t))) return true;
      // The estimate holds only once the iterate is close (f'' may change by orders of
      // magnitude over a long step where e^-kt decays): within sqrt(eps) relative.
      if (newton_step && step * step <= eps * t * t) {
        const T curvature = abs(T(d.factor * (k * v + G)));  // |d^2 rise/dt^2|
        if (curvature * step * step <= eps * abs(t) * slope / 2) return true;
      }
    }
    return false;
  }
};

}  // namespace lob::detail
