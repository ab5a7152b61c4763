#pragma once
/// \file lob/core/units.hpp
/// Unit helpers: SI throughout, angles in radians.

#include <boost/math/constants/constants.hpp>

#include "lob/core/real.hpp"

namespace lob {

/// Degrees to radians: `lob::deg(35.0)`; keeps every digit of `T`.
template <Real T>
[[nodiscard]] T deg(const T& degrees) {
  return degrees * boost::math::constants::degree<T>();
}

/// Radians to degrees.
template <Real T>
[[nodiscard]] T to_degrees(const T& radians) {
  return radians * boost::math::constants::radian<T>();
}

/// Standard gravity, 9.80665 m/s^2 exactly (CGPM 1901; ISO 80000-3), built from integers
/// so that multiprecision types get every digit.
template <Real T>
[[nodiscard]] T standard_gravity() {
  return T(980665) / T(100000);
}

}  // namespace lob
