#pragma once
/// \file lob/models/linear_drag.hpp
/// `linear_drag`: drag proportional to the air velocity, a = -rate * v_air (closed form).
/// Stokes drag on small or slow bodies; see physics/ for the rate from viscosity.

#include "lob/core/checks.hpp"
#include "lob/core/units.hpp"
#include "lob/models/traits.hpp"

namespace lob {

/// Linear drag with `rate` k [1/s], k >= 0: a_drag = -k * v_air.
template <Real T>
struct linear_drag {
  T rate{};

  [[nodiscard]] vec3<T> acceleration(const vec3<T>& v_air) const { return vec3<T>(-rate * v_air); }

  [[nodiscard]] status check() const {
    if (!is_finite(rate)) return fail(errc::invalid_argument, "linear drag rate must be finite", rate);
    if (rate < T(0)) return fail(errc::invalid_argument, "linear drag rate must be >= 0", rate);
    return {};
  }

  /// The model whose terminal speed in still air is `terminal_speed` [m/s] under gravity
  /// `g` [m/s^2]: k = g / v_t.
  [[nodiscard]] static result<linear_drag> from_terminal_speed(const T& terminal_speed,
                                                               const T& g = standard_gravity<T>()) {
    if (const status ok =
            first_failure(require_positive(terminal_speed, "terminal speed must be finite and > 0"),
                          require_positive(g, "gravity must be finite and > 0"));
        !ok)
      return unexpected<error>(ok.error());
    const T rate = g / terminal_speed;
    if (const status ok =
            require_representable(rate, "the drag rate g / terminal speed leaves T's range", true);
        !ok)
      return unexpected<error>(ok.error());
    return linear_drag{rate};
  }
};

template <Real T>
struct model_traits<linear_drag<T>> {
  using scalar = T;
  static constexpr bool closed_form = true;
  static constexpr bool quadratic_fast_path = false;
  static T linear_rate(const linear_drag<T>& m) { return m.rate; }
};

}  // namespace lob
