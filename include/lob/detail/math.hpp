#pragma once
/// \file lob/detail/math.hpp
/// Internal maths helpers: a Boost.Math policy that never throws, and the phi functions
/// of linear-drag flight evaluated without cancellation.

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

/// m(x) = -log1pmx(x) / x^2 = (x - log(1 + x)) / x^2, continuous at 0 (value 1/2), x > -1.
/// The apex height of linear-drag flight is v^2/G * m(k v/G). With y = x/(2 + x),
/// log(1 + x) = 2 atanh(y) gives m = (1 - y)/2 * (1 - y (1 - y) S(y^2)), S(w) =
/// sum_j w^j/(2j + 3), whose terms all have one sign for y > 0 and are small for y < 0, so
/// nothing cancels and x^2 never under- or overflows; used for |y| <= 1/3 (x in
/// [-1/2, 1]), where S converges at least like 9^-j. Outside, (x - log1p(x))/x^2 loses
/// at most a few ulps.
template <Real T>
[[nodiscard]] T log1pmx_ratio(const T& x) {
  const T y = x / (T(2) + x);
  if (T(3) * y > T(1) || T(3) * y < T(-1)) return T((x - detail::log1p(x)) / (x * x));
  const T eps = epsilon<T>();
  const T w = y * y;
  T power = T(1);
  T sum = T(1) / T(3);
  for (int j = 1; j < 200; ++j) {  // 9^-j: 200 terms exceed any precision
    power *= w;
    const T term = power / T(2 * j + 3);
    sum += term;
    if (term <= eps * sum) break;
  }
  return T((T(1) - y) / T(2) * (T(1) - y * (T(1) - y) * sum));
}

/// phi1(z) = (1 - e^-z) / z, continuous at 0 (value 1); z >= 0.
/// The velocity memory of linear drag: x(t) contains v0 * t * phi1(k t).
template <Real T>
[[nodiscard]] T phi1(const T& z) {
  return z == T(0) ? T(1) : T(-detail::expm1(T(-z)) / z);
}

/// phi2(z) = (z - 1 + e^-z) / z^2, continuous at 0 (value 1/2); z >= 0.
/// Gravity's share of linear-drag flight: x(t) contains g * t^2 * phi2(k t).
/// The closed form cancels for small z (z + expm1(-z) ~ z^2/2), so below z = 1 it is
/// summed as its Taylor series sum_n (-z)^n / (n+2)!, whose terms fall at least like
/// 1/(n+2)!; above, the closed form loses at most a factor e (about 2 bits).
template <Real T>
[[nodiscard]] T phi2(const T& z) {
  if (z < T(1)) {
    const T eps = epsilon<T>();
    T term = T(1) / T(2);
    T sum = term;
    for (int n = 1; n < 200; ++n) {  // 200 terms reach far beyond any precision at z < 1
      term *= -z / T(n + 2);
      sum += term;
      using std::abs;
      if (abs(term) <= eps * sum) break;
    }
    return sum;
  }
  return T((z + detail::expm1(T(-z))) / (z * z));
}

}  // namespace lob::detail
