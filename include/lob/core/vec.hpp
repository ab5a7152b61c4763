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

}  // namespace lob
