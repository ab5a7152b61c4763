#pragma once
/// \file lob/core/real.hpp
/// The `Real` concept: any scalar lob can compute with (float, double, long double,
/// Boost.Multiprecision floating types).

#include <cmath>
#include <concepts>
#include <limits>

namespace lob {

namespace detail {
// Found by ADL for multiprecision types, by the using-declarations for built-ins.
using std::abs;
using std::exp;
using std::isfinite;
using std::log;
using std::sqrt;

template <class T>
concept real_math = requires(const T& x) {
  { sqrt(x) } -> std::convertible_to<T>;
  { exp(x) } -> std::convertible_to<T>;
  { log(x) } -> std::convertible_to<T>;
  { abs(x) } -> std::convertible_to<T>;
};
}  // namespace detail

/// A real scalar: `numeric_limits` specialised and not an integer, closed under the four
/// operations, with `sqrt`, `exp`, `log` and `abs` found by ADL or in `std`.
template <class T>
concept Real = std::numeric_limits<T>::is_specialized && !std::numeric_limits<T>::is_integer &&
               requires(T a, T b) {
                 { a + b } -> std::convertible_to<T>;
                 { a - b } -> std::convertible_to<T>;
                 { a * b } -> std::convertible_to<T>;
                 { a / b } -> std::convertible_to<T>;
                 { -a } -> std::convertible_to<T>;
                 { a < b } -> std::convertible_to<bool>;
               } && detail::real_math<T>;

/// True when `x` is neither infinite nor NaN (works for multiprecision types too).
template <Real T>
[[nodiscard]] constexpr bool is_finite(const T& x) {
  using std::isfinite;
  return static_cast<bool>(isfinite(x));
}

}  // namespace lob
