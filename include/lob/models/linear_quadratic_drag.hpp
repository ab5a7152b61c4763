#pragma once
/// \file lob/models/linear_quadratic_drag.hpp
/// `linear_quadratic_drag`: the sum of a linear and a quadratic drag,
/// a = -(k + c |v_air|) v_air, the usual way to span the Stokes (slow, small) and Newton
/// (fast, large) regimes with one model. Integrated by lob::fly().

#include <boost/math/constants/constants.hpp>
#include <limits>

#include "lob/core/checks.hpp"
#include "lob/core/result.hpp"
#include "lob/core/units.hpp"
#include "lob/models/linear_drag.hpp"
#include "lob/models/quadratic_drag.hpp"
#include "lob/models/traits.hpp"

namespace lob {

/// Linear plus quadratic drag: `rate` k [1/s] >= 0 and `coefficient` c [1/m] >= 0,
/// a_drag = -(k + c |v_air|) v_air. With c = 0 it is `linear_drag`, with k = 0
/// `quadratic_drag`. Example: `lob::linear_quadratic_drag<double>{.rate = 0.05, .coefficient = 0.004}`.
template <Real T>
struct linear_quadratic_drag {
  T rate{};
  T coefficient{};

  /// Drag acceleration [m/s^2] for the velocity relative to the air `v_air` [m/s].
  [[nodiscard]] vec3<T> acceleration(const vec3<T>& v_air) const {
    using std::sqrt;
    const T speed = sqrt(T(v_air.squaredNorm()));
    return vec3<T>(-(rate + coefficient * speed) * v_air);
  }

  /// `invalid_argument` unless both parts are finite and >= 0.
  [[nodiscard]] status check() const {
    // Each part is checked by its own model, so the messages read the same everywhere.
    if (const status linear = linear_drag<T>{rate}.check(); !linear) return linear;
    return quadratic_drag<T>{coefficient}.check();
  }

  /// Terminal speed in still air [m/s] under gravity `g`: the positive root of
  /// c v^2 + k v = g, written 2 g / (k + sqrt(k^2 + 4 c g)) so that c -> 0 gives g / k
  /// without cancellation; infinite without drag.
  [[nodiscard]] T terminal_speed(const T& g = standard_gravity<T>()) const {
    using std::hypot;
    using std::sqrt;
    // 2 g / (b + sqrt(b^2 + 4 k g)) with everything over 4: b^2 overflowed above 1.3e154 /s
    // and the speed came out 0 (g / b = 1e-154 m/s at b = 1e155 /s).
    const T quarter = rate / 4;
    const T den = quarter + hypot(quarter, T(sqrt(coefficient) * sqrt(g) / 2));
    if (!(den > T(0))) return std::numeric_limits<T>::infinity();
    return T(T(g / 2) / den);
  }

  /// The model of a sphere of `mass` [kg] and `diameter` [m] in air of `dynamic_viscosity`
  /// [Pa s] and `air_density` [kg/m^3]: the linear part is Stokes' law, F = 3 pi mu d v
  /// (exact for Reynolds numbers well below 1), the quadratic part the drag equation with
  /// `newton_drag_coefficient` C_d (about 0.4 to 0.5 for a smooth sphere at Reynolds
  /// numbers 1e3 .. 2e5, common practice) on the frontal area pi d^2 / 4.
  [[nodiscard]] static result<linear_quadratic_drag> from_sphere(const T& mass, const T& diameter,
                                                                 const T& dynamic_viscosity,
                                                                 const T& air_density,
                                                                 const T& newton_drag_coefficient) {
    const T pi = boost::math::constants::pi<T>();
    if (const status ok = first_failure(
            require_positive(mass, "mass must be finite and > 0"),
            require_non_negative(diameter, "diameter must be finite and >= 0"),
            require_non_negative(dynamic_viscosity, "dynamic viscosity must be finite and >= 0"),
            require_non_negative(air_density, "air density must be finite and >= 0"),
            require_non_negative(newton_drag_coefficient, "drag coefficient must be finite and >= 0"));
        !ok)
      return unexpected<error>(ok.error());
    const T rate = T(T(3 * pi * dynamic_viscosity) / mass) * diameter;
    const T coefficient =
        T(T(T(air_density * newton_drag_coefficient) * (pi / 4)) / (2 * mass)) * diameter * diameter;
    const bool has_diameter = diameter > T(0);
    if (const status ok = first_failure(
            require_representable(rate, "the Stokes rate 3 pi mu d / m leaves T's range",
                                  has_diameter && dynamic_viscosity > T(0)),
            require_representable(coefficient, "the coefficient rho C_d A / (2 m) leaves T's range",
                                  has_diameter && air_density > T(0) && newton_drag_coefficient > T(0)));
        !ok)
      return unexpected<error>(ok.error());
    return linear_quadratic_drag{rate, coefficient};
  }

  /// The model from the two force coefficients of F = b v + q v^2 on a body of `mass` [kg]:
  /// `linear_force` b [N s/m] and `quadratic_force` q [N s^2/m^2]; k = b / m, c = q / m.
  [[nodiscard]] static result<linear_quadratic_drag> from_forces(const T& mass, const T& linear_force,
                                                                 const T& quadratic_force) {
    if (const status ok = first_failure(
            require_positive(mass, "mass must be finite and > 0"),
            require_non_negative(linear_force, "linear force coefficient must be finite and >= 0"),
            require_non_negative(quadratic_force, "quadratic force coefficient must be finite and >= 0"));
        !ok)
      return unexpected<error>(ok.error());
    const T rate = linear_force / mass;
    const T coefficient = quadratic_force / mass;
    if (const status ok =
            first_failure(require_representable(rate, "the rate b / m leaves T's range", linear_force > T(0)),
                          require_representable(coefficient, "the coefficient q / m leaves T's range",
                                                quadratic_force > T(0)));
        !ok)
      return unexpected<error>(ok.error());
    return linear_quadratic_drag{rate, coefficient};
  }
};

template <Real T>
struct model_traits<linear_quadratic_drag<T>> {
  using scalar = T;
  static constexpr bool closed_form = false;
  static constexpr bool quadratic_fast_path = false;
  /// A lower bound on the drag per air speed [1/s]: k + c |v_air| >= k.
  static T least_rate(const linear_quadratic_drag<T>& m) { return m.rate; }
};

}  // namespace lob
