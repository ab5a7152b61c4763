#pragma once
/// \file lob/physics/terminal_speed.hpp
/// Terminal speed of a sphere in given air, solved consistently with a Reynolds-dependent
/// drag coefficient; and of a general body with a constant drag coefficient.

#include <boost/math/tools/toms748_solve.hpp>
#include <cstdint>
#include <limits>
#include <utility>

#include "lob/core/checks.hpp"
#include "lob/core/units.hpp"
#include "lob/detail/math.hpp"
#include "lob/physics/sphere_drag.hpp"

namespace lob {

/// A body falling steadily: its speed and the flow numbers there.
template <Real T>
struct terminal_state {
  T speed{};             ///< [m/s]
  T reynolds{};          ///< at that speed
  T drag_coefficient{};  ///< Cd at that Reynolds number
  T mach{};              ///< the correlations are for incompressible flow; check this is small
  int iterations = 0;    ///< root-finder iterations used
};

namespace detail {
template <Real T>
[[nodiscard]] result<T> net_weight(const T& mass, const T& volume, const T& density, const T& g) {
  if (const status ok = require_positive(g, "gravity must be finite and > 0 [m/s^2]"); !ok)
    return unexpected<error>(ok.error());
  const T w = (mass - density * volume) * g;
  if (!(w > T(0)))
    return fail(errc::never_reaches, "the body is not heavier than the air it displaces; net weight [N]", w);
  if (const status ok = require_representable(w, "the net weight (m - rho V) g overflows T [N]"); !ok)
    return unexpected<error>(ok.error());
  return w;
}

// The terminal state of speed v, Reynolds number re and drag coefficient cd in `air`, or
// `invalid_argument` naming the first of them (or the Mach number) that left the range of
// T: inputs near the ends of the range can give a speed that overflows or underflows to
// zero, a Reynolds number that underflows (so Cd = 24/Re overflows), or a speed of sound
// so small that the Mach number overflows.
template <Real T>
[[nodiscard]] result<terminal_state<T>> representable_terminal_state(const T& v, const T& re, const T& cd,
                                                                     const air_properties<T>& air,
                                                                     int iterations) {
  if (const status ok = first_failure(
          require_representable(v, "the terminal speed leaves the range of T [m/s]", true),
          require_representable(re, "the terminal Reynolds number leaves the range of T", true),
          require_representable(cd, "the terminal drag coefficient leaves the range of T", true));
      !ok)
    return unexpected<error>(ok.error());
  const result<T> ma = mach_of(v, air);
  if (!ma) return unexpected<error>(ma.error());
  return terminal_state<T>{v, re, cd, *ma, iterations};
}
}  // namespace detail

/// The terminal speed [m/s] of a smooth rigid sphere falling through still `air` under
/// gravity `g` [m/s^2], with buoyancy: (m - rho V) g = Cd(Re) rho v^2 A / 2.
///
/// Method: the balance is solved for Re. Cd Re^2 = N with N = 2 W rho d^2 / (A mu^2) (the
/// Best or Davies number) depends only on the data, so the root is bracketed on a
/// geometric grid in Re upward from a point below it and then found by TOMS 748
/// (Alefeld, Potra & Shi 1995; Boost.Math `toms748_solve`) to full precision of T. Where
/// the drag crisis makes Cd Re^2 fall with Re, several balances can exist; the lowest
/// speed, which a body falling from rest reaches first, is returned (two roots closer than
/// the grid ratio 1.2 could be missed).
///
/// Accuracy: a relative error e on Cd moves the speed by e / (2 + s), s = dlnCd/dlnRe
/// (from -1 in creeping flow to about 0 at Re 1e3..1e5): at most e, about e/2 for balls.
/// Errors: `invalid_argument` for a bad sphere, air or gravity; `never_reaches` for a
/// sphere no heavier than the air it displaces; `invalid_argument` when the terminal
/// Reynolds number lies beyond the correlation's range; `no_convergence` if the root
/// finder's budget runs out; `invalid_argument` when the speed, Reynolds number, Cd or
/// Mach number of the answer would leave the range of T (inputs at its ends).
template <Real T>
[[nodiscard]] result<terminal_state<T>> terminal_speed(
    const sphere<T>& ball, const air_properties<T>& air,
    sphere_correlation c = sphere_correlation::clift_gauvin_1970, const T& g = standard_gravity<T>()) {
  if (const status ok = ball.check(); !ok) return unexpected<error>(ok.error());
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  const result<T> w = detail::net_weight(ball.mass, ball.volume(), air.density, g);
  if (!w) return unexpected<error>(w.error());
  const T mu = air.dynamic_viscosity;
  // N = 2 W rho d^2 / (A mu^2) = 8 W rho / (pi mu^2) for a sphere (d^2 / A = 4 / pi),
  // grouped so that no intermediate leaves the range of T before the answer does.
  const T n_best = T(8) / boost::math::constants::pi<T>() * T(*w / mu) * T(air.density / mu);
  if (const status ok = require_representable(n_best, "the Best number 8 W rho / (pi mu^2) leaves the range of T",
                                              true);
      !ok)
    return unexpected<error>(ok.error());
  const auto balance = [&](const T& re) { return T(re * detail::cd_times_re(re, c) - n_best); };

  const T re_cap = T(info(c).max_reynolds);
  const T f_cap = balance(re_cap);
  if (f_cap < T(0))
    return fail(errc::invalid_argument, "terminal Reynolds number is beyond the correlation's range "
                "(morrison_2013 reaches 1e6), Re >", re_cap);
  // Cd Re >= 24 for every correlation, so the root lies below N/24 and Re = N/48 is below it
  // unless Cd Re is already large there; step down until the balance is negative.
  T lo = n_best / T(48) < re_cap ? T(n_best / T(48)) : T(re_cap / T(2));
  T f_lo = balance(lo);
  for (int i = 0; i < 400 && !(f_lo < T(0)); ++i) {
    lo /= T(4);
    f_lo = balance(lo);
  }
  if (!(f_lo < T(0)))
    return fail(errc::no_convergence, "could not bracket the terminal Reynolds number, N =", n_best);
  T hi = lo;
  T f_hi = f_lo;
  for (int i = 0; i < 4000 && f_hi < T(0); ++i) {
    lo = hi;
    f_lo = f_hi;
    hi = hi * T(12) / T(10);
    if (hi >= re_cap) hi = re_cap;
    f_hi = balance(hi);
  }
  if (f_hi < T(0))
    return fail(errc::no_convergence, "could not bracket the terminal Reynolds number, N =", n_best);

  // Cd falls with Re below the crisis, so Cd(hi) <= Cd(root) there: where Cd(hi) already
  // overflows (Re near the smallest denormals), the answer has no Cd in T, and the root
  // finder would spin on denormals.
  if (!is_finite(T(detail::cd_times_re(hi, c) / hi)))
    return fail(errc::invalid_argument, "the terminal drag coefficient leaves the range of T at Reynolds number",
                hi);
  T re = hi;
  int iterations = 0;
  if (f_hi != T(0)) {
    constexpr std::uintmax_t budget = 200;
    std::uintmax_t used = budget;
    const boost::math::tools::eps_tolerance<T> tol(std::numeric_limits<T>::digits - 2);
    const std::pair<T, T> root =
        boost::math::tools::toms748_solve(balance, lo, hi, f_lo, f_hi, tol, used, detail::no_throw_policy{});
    if (used >= budget)
      return fail(errc::no_convergence, "terminal speed root finder used its budget, Re ~", re);
    re = (root.first + root.second) / T(2);
    iterations = static_cast<int>(used);
  }
  const T v = re * mu / (air.density * ball.diameter);
  return detail::representable_terminal_state(v, re, T(detail::cd_times_re(re, c) / re), air, iterations);
}

/// The terminal speed [m/s] of a general body with constant drag coefficient in still
/// `air`: v = sqrt(2 (m - rho V) g / (rho A Cd)), exact for that model. Errors as above
/// (also when the net weight overflows T).
template <Real T>
[[nodiscard]] result<terminal_state<T>> terminal_speed(const body<T>& thing, const air_properties<T>& air,
                                                       const T& g = standard_gravity<T>()) {
  using std::sqrt;
  if (const status ok = thing.check(); !ok) return unexpected<error>(ok.error());
  if (const status ok = detail::check_air(air); !ok) return unexpected<error>(ok.error());
  const result<T> w = detail::net_weight(thing.mass, thing.volume, air.density, g);
  if (!w) return unexpected<error>(w.error());
  const T ratio = T(2) * *w / (air.density * thing.reference_area * thing.drag_coefficient);
  // Where the quotient under the root leaves the range of T, the square roots taken one
  // by one still give the answer when it is representable.
  const T v = is_finite(ratio) && ratio >= std::numeric_limits<T>::min()
                  ? T(sqrt(ratio))
                  : T(T(sqrt(T(2))) * T(sqrt(*w)) / T(sqrt(air.density)) / T(sqrt(thing.reference_area)) /
                      T(sqrt(thing.drag_coefficient)));
  return detail::representable_terminal_state(v, T(air.density * v * thing.length() / air.dynamic_viscosity),
                                              thing.drag_coefficient, air, 0);
}

}  // namespace lob
