#pragma once
/// \file lob/models/quadratic_drag.hpp
/// `quadratic_drag`: drag proportional to the square of the air speed,
/// a = -c |v_air| v_air (Newton drag; no closed form in 2-D, integrated by lob::fly()).

#include <limits>

#include "lob/core/checks.hpp"
#include "lob/core/result.hpp"
#include "lob/core/units.hpp"
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
    const T ratio = g / coefficient;
    // Where g / c underflows (or overflows) T, the square roots taken apart still give
    // the representable answer.
    if (ratio < std::numeric_limits<T>::min() || !is_finite(ratio)) return T(sqrt(g) / sqrt(coefficient));
    return sqrt(ratio);
  }

  /// The model whose terminal speed in still air is `terminal_speed` [m/s] under gravity
  /// `g` [m/s^2]: c = g / v_t^2.
  [[nodiscard]] static result<quadratic_drag> from_terminal_speed(const T& terminal_speed,
                                                                  const T& g = standard_gravity<T>()) {
    if (const status ok =
            first_failure(require_positive(terminal_speed, "terminal speed must be finite and > 0"),
                          require_positive(g, "gravity must be finite and > 0"));
        !ok)
      return unexpected<error>(ok.error());
    // g / v_t / v_t: no overflow of v_t^2 on the way.
    const T c = T(g / terminal_speed) / terminal_speed;
    if (const status ok =
            require_representable(c, "the coefficient g / terminal speed^2 leaves T's range", true);
        !ok)
      return unexpected<error>(ok.error());
    return quadratic_drag{c};
  }

  /// The model of a body of `mass` [kg] with `reference_area` [m^2] (the frontal area for
  /// a sphere, pi d^2 / 4) and `drag_coefficient` C_d [1] in air of `air_density`
  /// [kg/m^3]: c = rho C_d A / (2 m) (the drag equation, F = rho C_d A v^2 / 2).
  [[nodiscard]] static result<quadratic_drag> from_body(const T& mass, const T& reference_area,
                                                        const T& drag_coefficient,
                                                        const T& air_density) {
    if (const status ok =
            first_failure(require_positive(mass, "mass must be finite and > 0"),
                          require_non_negative(reference_area, "reference area must be finite and >= 0"),
                          require_non_negative(drag_coefficient, "drag coefficient must be finite and >= 0"),
                          require_non_negative(air_density, "air density must be finite and >= 0"));
        !ok)
      return unexpected<error>(ok.error());
    // Divided before the last product, so that large inputs overflow only when the answer does.
    const T c = T(T(air_density * drag_coefficient) / (2 * mass)) * reference_area;
    const bool positive = reference_area > T(0) && drag_coefficient > T(0) && air_density > T(0);
    if (const status ok =
            require_representable(c, "the coefficient rho C_d A / (2 m) leaves T's range", positive);
        !ok)
      return unexpected<error>(ok.error());
    return quadratic_drag{c};
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
