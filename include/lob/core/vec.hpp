#pragma once
/// \file lob/core/vec.hpp
/// Fixed-size 3-vectors (Eigen) for positions, velocities and accelerations.

#include <Eigen/Core>

#include "lob/core/real.hpp"

namespace lob {

/// A 3-vector of scalar `T` (Eigen, fixed size, no heap).
template <class T>
using vec3 = Eigen::Matrix<T, 3, 1>;

/// True when every component of `v` is finite.
template <Real T>
[[nodiscard]] bool is_finite(const vec3<T>& v) {
  return is_finite(v.x()) && is_finite(v.y()) && is_finite(v.z());
}

/// The length of `v` without overflow or underflow of the squares: the largest component
/// times the length of `v` scaled by it (finite for every finite `v`).
template <Real T>
[[nodiscard]] T scaled_norm(const vec3<T>& v) {
  using std::abs;
  using std::sqrt;
  T m = abs(v.x());
  if (abs(v.y()) > m) m = abs(v.y());
  if (abs(v.z()) > m) m = abs(v.z());
  if (!(m > T(0)) || !is_finite(m)) return m;
  const vec3<T> s = v / m;
  return T(m * sqrt(T(s.squaredNorm())));
}

/// True when the squared length of `v` is finite (about |v| < 1.3e154 in double): the
/// condition for formulas in |v|^2, checked once where a flight is built.
template <Real T>
[[nodiscard]] bool square_is_finite(const vec3<T>& v) {
  return is_finite(T(v.squaredNorm()));
}

}  // namespace lob
