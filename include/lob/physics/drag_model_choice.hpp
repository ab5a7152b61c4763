#pragma once
/// \file lob/physics/drag_model_choice.hpp
/// From a body and the air to a drag model: factories for each model lob has (linear,
/// quadratic, linear plus quadratic, speed-dependent), and `choose_drag_model`, which for a
/// speed range reports the Reynolds range and recommends the simplest model that is
/// accurate enough, with the reason.

#include <array>
#include <boost/math/tools/minima.hpp>
#include <cstdint>
#include <cstdio>

#include "lob/core/checks.hpp"
#include "lob/models/linear_drag.hpp"
#include "lob/models/linear_quadratic_drag.hpp"
#include "lob/models/quadratic_drag.hpp"
#include "lob/physics/correlated_drag.hpp"

namespace lob {

namespace detail {
// quadratic_drag{c} for c = rho Cd A / (2 m) computed from valid inputs (so c > 0 in exact
// arithmetic); `invalid_argument` when it overflowed T or underflowed to zero.
template <Real T>
[[nodiscard]] result<quadratic_drag<T>> representable_quadratic(const T& c) {
  if (const status ok = require_representable(
          c, "the quadratic drag coefficient rho Cd A / (2 m) leaves the range of T [1/m]", true);
      !ok)
    return unexpected<error>(ok.error());
  return quadratic_drag<T>{c};
}
}  // namespace detail

/// Stokes drag as a `linear_drag`: rate k = 3 pi mu d / m (see `stokes_rate`). Right while
/// Re stays below about 0.1; `choose_drag_model` says how far it holds beyond.
template <Real T>
[[nodiscard]] result<linear_drag<T>> make_linear_drag(const sphere<T>& ball, const air_properties<T>& air) {
  const result<T> k = stokes_rate(ball, air);
  if (!k) return unexpected<error>(k.error());
  return linear_drag<T>{*k};
}

/// Quadratic drag of a sphere with a constant drag coefficient `cd` (for instance
/// `model_advice::quadratic_cd`): c = rho Cd A / (2 m) [1/m]. Errors: `invalid_argument`
/// for a bad sphere, air or Cd, or a coefficient that overflows T or underflows to zero.
template <Real T>
[[nodiscard]] result<quadratic_drag<T>> make_quadratic_drag(const sphere<T>& ball,
                                                            const air_properties<T>& air, const T& cd) {
  if (const status ok = ball.check(); !ok) return unexpected<error>(ok.error());
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  if (const status ok = require_positive(cd, "drag coefficient must be finite and > 0"); !ok)
    return unexpected<error>(ok.error());
  return detail::representable_quadratic(T(air.density * cd * ball.area() / (T(2) * ball.mass)));
}

/// Quadratic drag of a general body with its own drag coefficient: c = rho Cd A / (2 m).
/// Errors as for the sphere.
template <Real T>
[[nodiscard]] result<quadratic_drag<T>> make_quadratic_drag(const body<T>& thing,
                                                            const air_properties<T>& air) {
  if (const status ok = thing.check(); !ok) return unexpected<error>(ok.error());
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  return detail::representable_quadratic(
      T(air.density * thing.drag_coefficient * thing.reference_area / (T(2) * thing.mass)));
}

/// Linear plus quadratic drag of a sphere: Stokes' rate 3 pi mu d / m for the linear part
/// and c = rho Cq A / (2 m) with the inertial coefficient `cq` (for instance
/// `model_advice::linear_quadratic_cd`) for the quadratic part, so Cd(Re) = 24/Re + Cq.
template <Real T>
[[nodiscard]] result<linear_quadratic_drag<T>> make_linear_quadratic_drag(const sphere<T>& ball,
                                                                          const air_properties<T>& air,
                                                                          const T& cq) {
  const result<T> k = stokes_rate(ball, air);
  if (!k) return unexpected<error>(k.error());
  if (const status ok = require_non_negative(cq, "inertial drag coefficient must be finite and >= 0"); !ok)
    return unexpected<error>(ok.error());
  const T c = air.density * cq * ball.area() / (T(2) * ball.mass);
  if (const status ok = require_representable(
          c, "the quadratic drag coefficient rho Cq A / (2 m) leaves the range of T [1/m]", cq > T(0));
      !ok)
    return unexpected<error>(ok.error());
  return linear_quadratic_drag<T>{*k, c};
}

/// The kinds of drag model, simplest first.
enum class drag_kind {
  linear,            ///< `linear_drag` (Stokes): closed-form flight
  quadratic,         ///< `quadratic_drag` with a constant Cd
  linear_quadratic,  ///< `linear_quadratic_drag`, Cd = 24/Re + Cq
  speed_dependent,   ///< `correlated_drag`, Cd(Re) from the correlation
};

/// A short name of a drag kind ("linear", ...).
[[nodiscard]] constexpr std::string_view to_string(drag_kind k) noexcept {
  switch (k) {
    case drag_kind::linear: return "linear";
    case drag_kind::quadratic: return "quadratic";
    case drag_kind::linear_quadratic: return "linear_quadratic";
    case drag_kind::speed_dependent: return "speed_dependent";
  }
  return "unknown";
}

/// What `choose_drag_model` found. Errors of a model are the largest, over the speed range,
/// of |a_model - a_correlation| / max(a_correlation, g): the drag error as a share of the
/// larger of the drag and gravity, since a drag error matters only against the forces
/// present. The speed-dependent model's error is the correlation's own accuracy.
template <Real T>
struct model_advice {
  drag_kind kind = drag_kind::speed_dependent;
  sphere_correlation correlation = sphere_correlation::clift_gauvin_1970;
  T reynolds_min{}, reynolds_max{};  ///< over the speed range
  T mach_max{};                      ///< at the top speed; the correlations assume < 0.3
  T linear_error{};                  ///< of Stokes drag
  T quadratic_error{};               ///< of quadratic drag with `quadratic_cd`
  T linear_quadratic_error{};        ///< of Stokes plus quadratic with `linear_quadratic_cd`
  T speed_dependent_error{};         ///< the correlation's accuracy
  T quadratic_cd{};                  ///< best constant Cd over the range (minimax)
  T linear_quadratic_cd{};           ///< best Cq in Cd = 24/Re + Cq over the range (minimax)
  std::array<char, 240> reason{};    ///< why this kind, in one line

  [[nodiscard]] const char* why() const noexcept { return reason.data(); }
};

/// Options of `choose_drag_model`.
template <Real T>
struct choice_options {
  T tolerance = T(5) / T(100);  ///< largest acceptable model error (see `model_advice`)
  sphere_correlation correlation = sphere_correlation::clift_gauvin_1970;
  T gravity = standard_gravity<T>();  ///< [m/s^2]
};

/// Recommends a drag model for `ball` flying through `air` at speeds from `speed_min` to
/// `speed_max` [m/s] relative to the air (0 <= min < max): the simplest kind among linear,
/// quadratic, linear plus quadratic and speed-dependent whose error (see `model_advice`)
/// stays within `options.tolerance`, judged against the correlation on 241 speeds spaced
/// geometrically from max(speed_min, speed_max / 1e6) to speed_max. The constant
/// coefficients are fitted by minimising the largest error (Brent's method, Boost.Math
/// `brent_find_minima`; the largest error is convex in the coefficient).
///
/// Errors: `invalid_argument` for a bad sphere, air, speeds or tolerance, when the top
/// Reynolds number exceeds the correlation's range (choose `morrison_2013` to reach 1e6),
/// or when a number of the advice (Mach number, drag error, fitted coefficient) would
/// leave the range of T.
template <Real T>
[[nodiscard]] result<model_advice<T>> choose_drag_model(const sphere<T>& ball, const air_properties<T>& air,
                                                        const T& speed_min, const T& speed_max,
                                                        const choice_options<T>& options = {}) {
  using std::abs;
  const result<correlated_drag<T>> exact = make_correlated_drag(ball, air, options.correlation);
  if (!exact) return unexpected<error>(exact.error());
  if (const status ok = require_non_negative(speed_min, "lowest speed must be finite and >= 0 [m/s]"); !ok)
    return unexpected<error>(ok.error());
  if (!is_finite(speed_max) || !(speed_max > speed_min))
    return fail(errc::invalid_argument, "top speed must be finite and above the lowest [m/s]", speed_max);
  if (const status ok = require_positive(options.tolerance, "tolerance must be finite and > 0"); !ok)
    return unexpected<error>(ok.error());
  if (const status ok = require_positive(options.gravity, "gravity must be finite and > 0 [m/s^2]"); !ok)
    return unexpected<error>(ok.error());
  const correlation_info about = info(options.correlation);
  const T rps = exact->reynolds_per_speed;
  const T vr = exact->viscous_rate;
  if (rps * speed_max > T(about.max_reynolds))
    return fail(errc::invalid_argument, "top Reynolds number exceeds the correlation's range (morrison_2013 "
                "reaches 1e6), Re =", T(rps * speed_max));
  const result<T> mach_max = detail::mach_of(speed_max, air);
  if (!mach_max) return unexpected<error>(mach_max.error());

  constexpr int points = 241;
  const T lowest = speed_min > speed_max / T(1000000) ? speed_min : T(speed_max / T(1000000));
  const T g = options.gravity;
  // a_true / v and the error scale at grid point i; speeds spaced geometrically.
  const auto speed_at = [&](int i) {
    using std::pow;
    return T(lowest * pow(T(speed_max / lowest), T(i) / T(points - 1)));
  };
  const auto worst_error = [&](const T& k, const T& c) {
    T worst = T(0);
    for (int i = 0; i < points; ++i) {
      const T v = speed_at(i);
      const T a_true = vr * detail::cd_times_re(T(rps * v), options.correlation) * v;
      const T a_model = (k + c * v) * v;
      const T scale = a_true > g ? a_true : g;
      const T e = abs(T(a_model - a_true)) / scale;
      // A non-finite error (a drag that overflows T) sticks, for the check at the end.
      worst = e > worst || !is_finite(e) ? e : worst;
    }
    return worst;
  };
  T cd_top = T(0);
  for (int i = 0; i < points; ++i) {
    const T re = rps * speed_at(i);
    const T cd = detail::cd_times_re(re, options.correlation) / re;
    cd_top = cd > cd_top ? cd : cd_top;
  }
  const T stokes = T(24) * vr;
  const int bits = std::numeric_limits<T>::digits / 2 < 40 ? std::numeric_limits<T>::digits / 2 : 40;
  const auto fit = [&](const T& k, T& coefficient) -> status {
    std::uintmax_t budget = 200;
    const std::pair<T, T> best = boost::math::tools::brent_find_minima(
        [&](const T& cd) { return worst_error(k, T(vr * rps * cd)); }, T(0), cd_top, bits, budget);
    if (budget >= 200)
      return fail(errc::no_convergence, "drag coefficient fit did not converge, Cd ~", best.first);
    coefficient = best.first;
    return {};
  };

  model_advice<T> advice;
  advice.correlation = options.correlation;
  advice.reynolds_min = rps * speed_min;
  advice.reynolds_max = rps * speed_max;
  advice.mach_max = *mach_max;
  advice.linear_error = worst_error(stokes, T(0));
  if (const status ok = fit(T(0), advice.quadratic_cd); !ok) return unexpected<error>(ok.error());
  advice.quadratic_error = worst_error(T(0), T(vr * rps * advice.quadratic_cd));
  if (const status ok = fit(stokes, advice.linear_quadratic_cd); !ok) return unexpected<error>(ok.error());
  advice.linear_quadratic_error = worst_error(stokes, T(vr * rps * advice.linear_quadratic_cd));
  advice.speed_dependent_error = T(about.accuracy);
  // At the ends of the range of T (a drag rate near the largest T, a Reynolds number per
  // speed near the smallest) a drag or a fitted Cd leaves the range: an error, not advice.
  if (const status ok = first_failure(
          require_representable(advice.reynolds_min, "the lowest Reynolds number leaves the range of T"),
          require_representable(advice.reynolds_max, "the top Reynolds number leaves the range of T"),
          require_representable(advice.linear_error, "the error of Stokes drag leaves the range of T"),
          require_representable(advice.quadratic_cd, "the fitted drag coefficient leaves the range of T"),
          require_representable(advice.quadratic_error, "the error of quadratic drag leaves the range of T"),
          require_representable(advice.linear_quadratic_cd,
                                "the fitted inertial drag coefficient leaves the range of T"),
          require_representable(advice.linear_quadratic_error,
                                "the error of linear plus quadratic drag leaves the range of T"));
      !ok)
    return unexpected<error>(ok.error());

  const T tol = options.tolerance;
  T chosen_error = advice.speed_dependent_error;
  if (advice.linear_error <= tol) {
    advice.kind = drag_kind::linear;
    chosen_error = advice.linear_error;
  } else if (advice.quadratic_error <= tol) {
    advice.kind = drag_kind::quadratic;
    chosen_error = advice.quadratic_error;
  } else if (advice.linear_quadratic_error <= tol) {
    advice.kind = drag_kind::linear_quadratic;
    chosen_error = advice.linear_quadratic_error;
  }
  const char* regime = advice.reynolds_max < T(1) / T(10) ? "Stokes regime"
                       : advice.reynolds_min > T(1000)    ? "Newton regime"
                       : advice.reynolds_max < T(1000)    ? "intermediate regime"
                                                          : "spans regimes";
  const char* why = advice.kind == drag_kind::linear ? "Stokes drag holds"
                    : advice.kind == drag_kind::quadratic ? "a constant Cd holds"
                    : advice.kind == drag_kind::linear_quadratic ? "24/Re + Cq holds"
                                                                 : "no constant-coefficient model holds";
  std::snprintf(advice.reason.data(), advice.reason.size(),
                "Re %.3g..%.3g (%s, Mach <= %.2f%s): %s, %s within %.1f%% of %s (tolerance %.1f%%); "
                "linear %.1f%%, quadratic %.1f%%, linear+quadratic %.1f%%",
                static_cast<double>(advice.reynolds_min), static_cast<double>(advice.reynolds_max), regime,
                static_cast<double>(advice.mach_max), advice.mach_max > T(3) / T(10) ? ", compressible!" : "",
                to_string(advice.kind).data(), why, 100 * static_cast<double>(chosen_error),
                about.name.data(), 100 * static_cast<double>(tol),
                100 * static_cast<double>(advice.linear_error),
                100 * static_cast<double>(advice.quadratic_error),
                100 * static_cast<double>(advice.linear_quadratic_error));
  return advice;
}

}  // namespace lob
