#pragma once
/// \file lob/batch/columns.hpp
/// Structure-of-arrays views of many bodies for the batch queries: one span per coordinate,
/// caller-owned memory, no allocation. Sizes must agree (checked by `check_columns`).

#include <cstddef>
#include <span>

#include "lob/core/checks.hpp"
#include "lob/core/result.hpp"

namespace lob {

/// N launches: positions [m] and velocities [m/s], one span per coordinate.
template <Real T>
struct shot_columns {
  std::span<const T> x, y, z, vx, vy, vz;
  [[nodiscard]] std::size_t size() const noexcept { return x.size(); }
};

/// N states written by a batch query: positions [m] and velocities [m/s].
template <Real T>
struct state_columns {
  std::span<T> x, y, z, vx, vy, vz;
  [[nodiscard]] std::size_t size() const noexcept { return x.size(); }
};

namespace detail {

template <Real T>
[[nodiscard]] status check_columns(const shot_columns<T>& in, const state_columns<T>& out) {
  const std::size_t n = in.size();
  const std::size_t sizes[] = {in.y.size(),  in.z.size(),  in.vx.size(), in.vy.size(), in.vz.size(), out.x.size(),
                               out.y.size(), out.z.size(), out.vx.size(), out.vy.size(), out.vz.size()};
  for (const std::size_t s : sizes)
    if (s != n) return fail(errc::invalid_argument, "batch columns differ in size", static_cast<long double>(s));
  return {};
}

}  // namespace detail
}  // namespace lob
