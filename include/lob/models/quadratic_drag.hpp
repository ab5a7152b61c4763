#pragma once
/// \file lob/models/quadratic_drag.hpp
/// `quadratic_drag`: drag proportional to the square of the air speed,
/// a = -c |v_air| v_air (Newton drag; no closed form in 2-D, integrated by lob::fly()).

#include "lob/core/result.hpp"
#include "lob/core/units.hpp"
#include <limits>

#include "lob/models/traits.hpp"

namespace lob {

/// Quadratic drag with `coefficient` c [1/m], c >= 0: a_drag = -c |v_air| v_air.
/// For a body of mass m, reference area A and drag coefficient C_d in air of density rho,
/// c = rho C_d A / (2 m); the terminal speed under gravity g is sqrt(g / c).
/// Example: `lob::quadratic_drag<double>{.coefficient = 0.009}`.
template <Real T>
struct quadratic_drag {
  T coefficient{};

  /// Drag acceleration [m/s^2] for the velocity relative to the air `v_air` [m/s].
  [[nodiscard]] vec3<T> acceleration(const vec3<T>& v_air) const {
    using std::sqrt;
    const T speed = sqrt(T(v_air.squaredNorm()));
    return vec3<T>(-(coefficient * speed) * v_air);
  }

  /// `invalid_argument` unless the coefficient is finite and >= 0.
  [[nodiscard]] status check() const {
    if (!is_finite(coefficient))
      return fail(errc::invalid_argument, "quadratic drag coefficient must be finite", coefficient);
    if (coefficient < T(0))
      return fail(errc::invalid_argument, "quadratic drag coefficient must be >= 0", coefficient);
    return {};
  }

  /// Terminal speed in still air [m/s] under gravity `g`: sqrt(g / c); infinite for c = 0.
  [[nodiscard]] T terminal_speed(const T& g = standard_gravity<T>()) const {
    using std::sqrt;
    if (!(coefficient > T(0))) return std::numeric_limits<T>::infinity();
    return sqrt(T(g / coefficient));
  }

  /// The model whose terminal speed in still air is `terminal_speed` [m/s] under gravity
  /// `g` [m/s^2]: c = g / v_t^2.
  [[nodiscard]] static result<quadratic_drag> from_terminal_speed(const T& terminal_speed,
                                                                  const T& g = standard_gravity<T>()) {
    if (!is_finite(terminal_speed) || !(terminal_speed > T(0)))
      return fail(errc::invalid_argument, "terminal speed must be finite and > 0", terminal_speed);
    if (!is_finite(g) || !(g > T(0)))
      return fail(errc::invalid_argument, "gravity must be finite and > 0", g);
    return quadratic_drag{T(g / (terminal_speed * terminal_speed))};
  }

  /// The model of a body of `mass` [kg] with `reference_area` [m^2] (the frontal area for
  /// a sphere, pi d^2 / 4) and `drag_coefficient` C_d [1] in air of `air_density`
  /// [kg/m^3]: c = rho C_d A / (2 m) (the drag equation, F = rho C_d A v^2 / 2).
  [[nodiscard]] static result<quadratic_drag> from_body(const T& mass, const T& reference_area,
                                                        const T& drag_coefficient,
                                                        const T& air_density) {
    if (!is_finite(mass) || !(mass > T(0)))
      return fail(errc::invalid_argument, "mass must be finite and > 0", mass);
    if (!is_finite(reference_area) || reference_area < T(0))
      return fail(errc::invalid_argument, "reference area must be finite and >= 0", reference_area);
    if (!is_finite(drag_coefficient) || drag_coefficient < T(0))
      return fail(errc::invalid_argument, "drag coefficient must be finite and >= 0", drag_coefficient);
    if (!is_finite(air_density) || air_density < T(0))
      return fail(errc::invalid_argument, "air density must be finite and >= 0", air_density);
    return quadratic_drag{T(air_density * drag_coefficient * reference_area / (2 * mass))};
  }
};

template <Real T>
struct model_traits<quadratic_drag<T>> {
  using scalar = T;
  static constexpr bool closed_form = false;
  static constexpr bool quadratic_fast_path = true;  ///< hodograph path in still air
  /// The c of a = -c |v| v, for the fast path.
  static T quadratic_coefficient(const quadratic_drag<T>& m) { return m.coefficient; }
};

}  // namespace lob
