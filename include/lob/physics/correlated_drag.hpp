#pragma once
/// \file lob/physics/correlated_drag.hpp
/// `correlated_drag`: the speed-dependent drag model of a sphere, with the drag coefficient
/// taken from a sphere correlation at the Reynolds number of the moment. It satisfies
/// `lob::DragModel`, so `lob::fly()` integrates it and every solver accepts it.

#include "lob/core/checks.hpp"
#include "lob/core/vec.hpp"
#include "lob/models/traits.hpp"
#include "lob/physics/sphere_drag.hpp"

namespace lob {

/// Drag of a sphere of diameter d and mass m in air of density rho and viscosity mu, with
/// Cd = Cd(Re) from `correlation`: a = -(Cd rho A / (2 m)) |v| v, written as
/// a = -viscous_rate * (Cd Re) * v with viscous_rate = mu A / (2 m d) = pi mu d / (8 m) [1/s]
/// and Re = reynolds_per_speed * |v|, reynolds_per_speed = rho d / mu [s/m]. The Cd Re form
/// is finite at rest (Stokes' law, Cd Re -> 24), so the model has no singularity.
///
/// Above the correlation's largest Reynolds number the drag coefficient is held at its
/// value there (a clamp, since a flight step cannot return an error); `choose_drag_model`
/// reports when a speed range needs it. Build it with `make_correlated_drag`.
template <Real T>
struct correlated_drag {
  using scalar_type = T;

  T viscous_rate{};        ///< pi mu d / (8 m) [1/s]
  T reynolds_per_speed{};  ///< rho d / mu [s/m]
  sphere_correlation correlation = sphere_correlation::clift_gauvin_1970;

  /// Drag acceleration [m/s^2] for the velocity relative to the air `v_air` [m/s].
  [[nodiscard]] vec3<T> acceleration(const vec3<T>& v_air) const {
    using std::sqrt;
    const T re = reynolds_per_speed * T(sqrt(T(v_air.squaredNorm())));
    const T cap = T(info(correlation).max_reynolds);
    const T cd_re = re > cap ? T(detail::cd_times_re(cap, correlation) / cap * re)
                             : T(detail::cd_times_re(re, correlation));
    return vec3<T>(-(viscous_rate * cd_re) * v_air);
  }

  /// `invalid_argument` unless both parameters are finite and > 0.
  [[nodiscard]] status check() const {
    if (!is_finite(viscous_rate) || !(viscous_rate > T(0)))
      return fail(errc::invalid_argument, "correlated drag viscous rate must be finite and > 0",
                  viscous_rate);
    if (!is_finite(reynolds_per_speed) || !(reynolds_per_speed > T(0)))
      return fail(errc::invalid_argument, "correlated drag Reynolds per speed must be finite and > 0",
                  reynolds_per_speed);
    return {};
  }
};

/// The speed-dependent model of `ball` in `air` with drag coefficients from `c`. Errors:
/// `invalid_argument` for a bad sphere or air, or a parameter that overflows T or
/// underflows to zero.
template <Real T>
[[nodiscard]] result<correlated_drag<T>> make_correlated_drag(
    const sphere<T>& ball, const air_properties<T>& air,
    sphere_correlation c = sphere_correlation::clift_gauvin_1970) {
  if (const status ok = ball.check(); !ok) return unexpected<error>(ok.error());
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  const correlated_drag<T> model{
      T(boost::math::constants::pi<T>() * air.dynamic_viscosity * ball.diameter / (T(8) * ball.mass)),
      T(air.density * ball.diameter / air.dynamic_viscosity), c};
  if (const status ok = first_failure(
          require_representable(model.viscous_rate,
                                "the viscous rate pi mu d / (8 m) leaves the range of T [1/s]", true),
          require_representable(model.reynolds_per_speed,
                                "the Reynolds number per speed rho d / mu leaves the range of T [s/m]", true));
      !ok)
    return unexpected<error>(ok.error());
  return model;
}

}  // namespace lob
