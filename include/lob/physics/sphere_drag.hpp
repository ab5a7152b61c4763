#pragma once
/// \file lob/physics/sphere_drag.hpp
/// The drag coefficient of a smooth rigid sphere versus Reynolds number, from published
/// correlations, each with its range and accuracy; and the Stokes drag rate of a small
/// sphere from the viscosity of the air.
///
/// Which correlation: `clift_gauvin_1970` (the default) is the most accurate here up to
/// Re = 3e5, within 7% of the standard drag curve; `morrison_2013` is the only one that
/// spans the whole range from creeping flow to Re = 1e6, drag crisis included, at 17%
/// below the crisis; `schiller_naumann_1933` is the classic for Re below 800.
/// In the crisis itself (Re about 2e5..5e5) the real drag depends on surface roughness and
/// free-stream turbulence, and no correlation of Re alone is better than a factor of about
/// 1.5 there (common practice).
///
/// Accuracy figures (`info(c).accuracy`) are the largest relative deviation from the
/// standard drag curve of Clift, Grace & Weber ("Bubbles, Drops, and Particles", Academic
/// Press 1978, Table 5.2, a piecewise fit to the measurements; from memory) over each
/// correlation's range, up to Re = 2e5 for Morrison, as measured in
/// tests/physics/sphere_drag_test.cpp: they are what each formula achieves, not a claim
/// copied from its source. Morrison's coefficients were checked against the author's
/// "Data Correlation for Drag Coefficient for Sphere" (2016 note); those of
/// Schiller–Naumann, Clift–Gauvin and Brown–Lawler are as recalled (from memory).

#include <string_view>

#include "lob/core/checks.hpp"
#include "lob/core/real.hpp"
#include "lob/core/result.hpp"
#include "lob/physics/air.hpp"
#include "lob/physics/body.hpp"

namespace lob {

/// A drag correlation for a smooth sphere, Cd(Re), Re = rho v d / mu.
enum class sphere_correlation {
  /// Stokes (1851), Cd = 24 / Re: creeping flow, Re <= 0.1; within 2% there (Oseen's first
  /// correction is 3 Re / 16).
  stokes,
  /// Schiller & Naumann (1933), Z. Ver. Dtsch. Ing. 77, 318: Cd = 24/Re (1 + 0.15 Re^0.687),
  /// Re <= 800; within 6%.
  schiller_naumann_1933,
  /// Clift & Gauvin (1970), Proc. Chemeca '70, 1, 14: Schiller–Naumann plus
  /// 0.42 / (1 + 42500 Re^-1.16), Re <= 3e5 (below the crisis); within 7%.
  clift_gauvin_1970,
  /// Brown & Lawler (2003), J. Environ. Eng. 129(3), 222: Cd = 24/Re (1 + 0.150 Re^0.681)
  /// + 0.407 / (1 + 8710 / Re), Re <= 2e5 (fitted to corrected settling measurements);
  /// within 8%.
  brown_lawler_2003,
  /// Morrison (2013), "An Introduction to Fluid Mechanics", Cambridge University Press:
  /// Cd = 24/Re + 2.6 (Re/5) / (1 + (Re/5)^1.52) + 0.411 (Re/2.63e5)^-7.94 /
  /// (1 + (Re/2.63e5)^-8) + 0.25 (Re/1e6) / (1 + Re/1e6), Re <= 1e6 (the author advises
  /// against larger Re), drag crisis included; within 17% up to Re = 2e5 (no figure is
  /// stated by the author). It puts the crisis near Re = 2.6e5, earlier than the standard
  /// curve (3.4e5..4e5), so there it can be off by a factor of 3.
  morrison_2013,
};

/// What a correlation offers: its name, largest valid Reynolds number and its accuracy (the
/// largest relative deviation of Cd from the standard drag curve, see above).
struct correlation_info {
  std::string_view name;
  double max_reynolds;
  double accuracy;
};

/// The range and accuracy of a correlation.
[[nodiscard]] constexpr correlation_info info(sphere_correlation c) noexcept {
  switch (c) {
    case sphere_correlation::stokes: return {"stokes", 0.1, 0.02};
    case sphere_correlation::schiller_naumann_1933: return {"schiller_naumann_1933", 800.0, 0.06};
    case sphere_correlation::clift_gauvin_1970: return {"clift_gauvin_1970", 3.0e5, 0.07};
    case sphere_correlation::brown_lawler_2003: return {"brown_lawler_2003", 2.0e5, 0.08};
    case sphere_correlation::morrison_2013: return {"morrison_2013", 1.0e6, 0.17};
  }
  return {"unknown", 0.0, 1.0};
}

namespace detail {
/// Cd(Re) * Re, finite down to Re = 0 (value 24): the form drag models need, since the drag
/// acceleration is -(mu A / (2 m d)) Cd Re v. No range check; Re >= 0.
template <Real T>
[[nodiscard]] T cd_times_re(const T& re, sphere_correlation c) {
  using std::pow;
  const T stokes = T(24);
  switch (c) {
    case sphere_correlation::stokes: return stokes;
    case sphere_correlation::schiller_naumann_1933:
      return T(stokes * (T(1) + T(15) / T(100) * T(pow(re, T(687) / T(1000)))));
    case sphere_correlation::clift_gauvin_1970: {
      // 0.42 Re / (1 + 42500 Re^-1.16) written as 0.42 Re^2.16 / (Re^1.16 + 42500): no
      // overflow as Re -> 0.
      const T r116 = pow(re, T(116) / T(100));
      return T(stokes * (T(1) + T(15) / T(100) * T(pow(re, T(687) / T(1000)))) +
               T(42) / T(100) * re * r116 / (r116 + T(42500)));
    }
    case sphere_correlation::brown_lawler_2003:
      return T(stokes * (T(1) + T(150) / T(1000) * T(pow(re, T(681) / T(1000)))) +
               T(407) / T(1000) * re * re / (re + T(8710)));
    case sphere_correlation::morrison_2013: {
      const T a = re / T(5);
      const T x = re / T(263000);
      const T y = re / T(1000000);
      // x^-7.94 / (1 + x^-8) written as x^0.06 / (1 + x^8): no overflow as Re -> 0.
      return T(stokes + T(26) / T(10) * re * a / (T(1) + T(pow(a, T(152) / T(100)))) +
               T(411) / T(1000) * re * T(pow(x, T(6) / T(100))) / (T(1) + T(pow(x, T(8)))) +
               T(25) / T(100) * re * y / (T(1) + y));
    }
  }
  return stokes;
}
}  // namespace detail

/// The drag coefficient of a smooth sphere at Reynolds number `reynolds` (> 0, at most the
/// correlation's `info(c).max_reynolds`). Errors: `invalid_argument` for a non-finite or
/// non-positive Re, or one above the correlation's range.
template <Real T>
[[nodiscard]] result<T> sphere_drag_coefficient(
    const T& reynolds, sphere_correlation c = sphere_correlation::clift_gauvin_1970) {
  if (const status ok = require_positive(reynolds, "Reynolds number must be finite and > 0"); !ok)
    return unexpected<error>(ok.error());
  if (reynolds > T(info(c).max_reynolds))
    return fail(errc::invalid_argument, "Reynolds number is above the correlation's range", reynolds);
  const T cd = detail::cd_times_re(reynolds, c) / reynolds;
  // Cd ~ 24/Re overflows T for Re near the smallest denormals.
  if (!is_finite(cd))
    return fail(errc::invalid_argument, "the drag coefficient overflows T at Reynolds number", reynolds);
  return cd;
}

/// The Stokes drag rate k = 3 pi mu d / m [1/s] of a small sphere in `air`: the linear-drag
/// rate of a body whose drag is Stokes' law F = 3 pi mu d v (Stokes 1851), valid while
/// Re = rho v d / mu stays below about 0.1 (see `sphere_correlation::stokes`).
/// Errors: `invalid_argument` for a bad sphere or air, or a rate that overflows T or
/// underflows to zero (mass, diameter and viscosity at the ends of the range of T).
template <Real T>
[[nodiscard]] result<T> stokes_rate(const sphere<T>& ball, const air_properties<T>& air) {
  if (const status ok = ball.check(); !ok) return unexpected<error>(ok.error());
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  const T k = T(3) * boost::math::constants::pi<T>() * air.dynamic_viscosity * ball.diameter / ball.mass;
  if (const status ok =
          require_representable(k, "the Stokes rate 3 pi mu d / m leaves the range of T [1/s]", true);
      !ok)
    return unexpected<error>(ok.error());
  return k;
}

}  // namespace lob
