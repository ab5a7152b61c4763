#pragma once
/// \file lob/physics/body.hpp
/// What a user knows about the thing that flies: a `sphere` (mass, diameter) or a general
/// `body` (mass, reference area, drag coefficient); and the dimensionless numbers of a
/// flight state, Reynolds and Mach.

#include <boost/math/constants/constants.hpp>

#include "lob/core/checks.hpp"
#include "lob/core/flight_types.hpp"
#include "lob/core/result.hpp"
#include "lob/physics/air.hpp"

namespace lob {

/// A rigid sphere: mass [kg] and diameter [m], both > 0.
template <Real T>
struct sphere {
  T mass{};
  T diameter{};

  [[nodiscard]] status check() const {
    if (const status ok = require_positive(mass, "sphere mass must be finite and > 0 [kg]"); !ok)
      return unexpected<error>(ok.error());
    if (const status ok = require_positive(diameter, "sphere diameter must be finite and > 0 [m]"); !ok)
      return unexpected<error>(ok.error());
    return {};
  }
  /// Frontal (cross-section) area pi d^2 / 4 [m^2].
  [[nodiscard]] T area() const { return boost::math::constants::pi<T>() * diameter * diameter / T(4); }
  /// Volume pi d^3 / 6 [m^3].
  [[nodiscard]] T volume() const {
    return boost::math::constants::pi<T>() * diameter * diameter * diameter / T(6);
  }
};

/// A general body with a known, constant drag coefficient: mass [kg], reference area A
/// [m^2] (the area the drag coefficient is referred to, usually the frontal area), drag
/// coefficient Cd (drag force = Cd rho v^2 A / 2), and optionally a reference length [m]
/// for its Reynolds number (0 means the diameter of the circle of area A) and volume [m^3]
/// for buoyancy (0 means none).
template <Real T>
struct body {
  T mass{};
  T reference_area{};
  T drag_coefficient{};
  T reference_length{};
  T volume{};

  [[nodiscard]] status check() const {
    if (const status ok = require_positive(mass, "body mass must be finite and > 0 [kg]"); !ok)
      return unexpected<error>(ok.error());
    if (const status ok =
            require_positive(reference_area, "body reference area must be finite and > 0 [m^2]");
        !ok)
      return unexpected<error>(ok.error());
    if (const status ok = require_positive(drag_coefficient, "body drag coefficient must be finite and > 0");
        !ok)
      return unexpected<error>(ok.error());
    if (!is_finite(reference_length) || reference_length < T(0))
      return fail(errc::invalid_argument, "body reference length must be finite and >= 0 [m]",
                  reference_length);
    if (const status ok = require_non_negative(volume, "body volume must be finite and >= 0 [m^3]"); !ok)
      return unexpected<error>(ok.error());
    return {};
  }
  /// The length its Reynolds number uses [m].
  [[nodiscard]] T length() const {
    using std::sqrt;
    if (reference_length > T(0)) return reference_length;
    return T(sqrt(T(T(4) * reference_area / boost::math::constants::pi<T>())));
  }
};

namespace detail {
template <Real T>
[[nodiscard]] status check_air(const air_properties<T>& air) {
  if (const status ok = require_positive(air.density, "air density must be finite and > 0 [kg/m^3]"); !ok)
    return unexpected<error>(ok.error());
  if (const status ok =
          require_positive(air.dynamic_viscosity, "air viscosity must be finite and > 0 [Pa s]");
      !ok)
    return unexpected<error>(ok.error());
  if (const status ok = require_positive(air.speed_of_sound, "speed of sound must be finite and > 0 [m/s]");
      !ok)
    return unexpected<error>(ok.error());
  return {};
}
}  // namespace detail

/// Reynolds number rho v L / mu of a body of length `length` [m] moving at `speed` [m/s]
/// relative to `air`. Errors for a negative or non-finite speed or length, or bad air.
template <Real T>
[[nodiscard]] result<T> reynolds_number(const T& speed, const T& length, const air_properties<T>& air) {
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  if (const status ok = require_non_negative(speed, "speed must be finite and >= 0 [m/s]"); !ok)
    return unexpected<error>(ok.error());
  if (const status ok = require_positive(length, "length must be finite and > 0 [m]"); !ok)
    return unexpected<error>(ok.error());
  const T re = T(air.density * speed / air.dynamic_viscosity) * length;
  if (const status ok = require_representable(re, "the Reynolds number overflows T; speed [m/s]"); !ok)
    return fail(errc::invalid_argument, "the Reynolds number overflows T; speed [m/s]", speed);
  return re;
}

namespace detail {
// v / a for a checked speed and air; `invalid_argument` naming the speed when the quotient
// overflows T (a speed of sound near the smallest denormals).
template <Real T>
[[nodiscard]] result<T> mach_of(const T& speed, const air_properties<T>& air) {
  const T ma = speed / air.speed_of_sound;
  if (!is_finite(ma))
    return fail(errc::invalid_argument, "the Mach number overflows T; speed [m/s]", speed);
  return ma;
}
}  // namespace detail

/// Mach number v / a of `speed` [m/s] in `air`. Errors for a negative or non-finite speed,
/// bad air, or a quotient beyond the range of T.
template <Real T>
[[nodiscard]] result<T> mach_number(const T& speed, const air_properties<T>& air) {
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  if (const status ok = require_non_negative(speed, "speed must be finite and >= 0 [m/s]"); !ok)
    return unexpected<error>(ok.error());
  return detail::mach_of(speed, air);
}

/// The flow numbers of one flight state.
template <Real T>
struct flow_numbers {
  T air_speed{};  ///< |v - wind| [m/s]
  T reynolds{};
  T mach{};
};

/// Reynolds and Mach numbers of a sphere in flight state `s`, flying through `air` with the
/// wind of `where` (the speed relative to the air counts).
template <Real T>
[[nodiscard]] result<flow_numbers<T>> flow_at(const sphere<T>& ball, const state<T>& s,
                                              const medium<T>& where, const air_properties<T>& air) {
  using std::sqrt;
  if (const status ok = ball.check(); !ok) return unexpected<error>(ok.error());
  if (!is_finite(s.velocity) || !is_finite(where.wind))
    return fail(errc::invalid_argument, "velocity and wind must be finite");
  const T v = sqrt(T(vec3<T>(s.velocity - where.wind).squaredNorm()));
  const result<T> re = reynolds_number(v, ball.diameter, air);
  if (!re) return unexpected<error>(re.error());
  const result<T> ma = detail::mach_of(v, air);
  if (!ma) return unexpected<error>(ma.error());
  return flow_numbers<T>{v, *re, *ma};
}

/// As above for a general body, using its `length()`.
template <Real T>
[[nodiscard]] result<flow_numbers<T>> flow_at(const body<T>& thing, const state<T>& s,
                                              const medium<T>& where, const air_properties<T>& air) {
  using std::sqrt;
  if (const status ok = thing.check(); !ok) return unexpected<error>(ok.error());
  if (!is_finite(s.velocity) || !is_finite(where.wind))
    return fail(errc::invalid_argument, "velocity and wind must be finite");
  const T v = sqrt(T(vec3<T>(s.velocity - where.wind).squaredNorm()));
  const result<T> re = reynolds_number(v, thing.length(), air);
  if (!re) return unexpected<error>(re.error());
  const result<T> ma = detail::mach_of(v, air);
  if (!ma) return unexpected<error>(ma.error());
  return flow_numbers<T>{v, *re, *ma};
}

}  // namespace lob
