#pragma once
/// \file lob/integrate/hodograph.hpp
/// The fast path for quadratic drag in still air, a = g - c |v| v: the speed is a closed
/// function of the path inclination (the hodograph of the flight), and time, distance and
/// height are single integrals over the inclination, summed by Gauss–Legendre quadrature.
/// Used by the integrated flight of `quadratic_drag` when there is no wind.

#include <cstdint>
#include <limits>
#include <type_traits>

#include <boost/math/constants/constants.hpp>
#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/special_functions/asinh.hpp>
#include <boost/math/tools/precision.hpp>

#include "lob/core/flight_types.hpp"
#include "lob/core/result.hpp"
#include "lob/detail/math.hpp"

namespace lob::detail {

/// A point of a still-air quadratic-drag flight, relative to its launch point.
template <Real T>
struct hodograph_point {
  T time;         ///< time since launch [s]
  T distance;     ///< horizontal distance from the launch point [m]
  T rise;         ///< height above the launch point [m]
  T speed;        ///< [m/s]
  T inclination;  ///< path angle above the horizon [rad], in [-pi/2, pi/2]
};

// The method.
//
// With u = v cos(phi) the horizontal velocity, the equations of motion along the path,
// dv/dt = -g sin(phi) - c v^2 and v dphi/dt = -g cos(phi), give du/dphi = c u^3 /
// (g cos^3 phi), so d(u^-2)/dphi = -2c / (g cos^3 phi) and
//   u^-2(phi) = u0^-2 + (c/g) (f(theta0) - f(phi)),  f(phi) = 2 int sec^3 = sin/cos^2 + ln tan(pi/4 + phi/2),
// the classical hodograph of quadratic drag. Integrating over phi directly is poor: the
// integrands grow like sec^2 towards a vertical descent and the ascent of a steep shot is
// squeezed against phi = pi/2. We change variables to the inverse Gudermannian of the
// inclination, sigma = asinh(tan phi) (so tan phi = sinh sigma, sec phi = cosh sigma and
// f = sinh(2 sigma)/2 + sigma), and measure it from the launch, tau = sigma0 - sigma >= 0.
// Then, with D(tau) = (c u0^2/g) (f(sigma0) - f(sigma)),
//   u = u0 / sqrt(1 + D),  v = u cosh(sigma),
//   dt/dtau = v / g,  dx/dtau = u v / g,  dy/dtau = u v sinh(sigma) / g,
// all smooth and bounded for every tau (towards the vertical asymptote of the descent
// dx/dtau decays like e^-tau, dt/dtau and dy/dtau tend to constants). The difference of f
// is summed without cancellation as f(sigma0) - f(sigma) = cosh(sigma0 + sigma) sinh(tau) + tau.
//
// Quadrature panels. The integrands are analytic; what limits Gauss–Legendre is the
// distance from a panel to the nearest complex zero of 1 + D, which is about pi divided by
// the rate d ln(1 + D)/dtau. That rate is 2 kappa (kappa = c v0^2 / g) at launch, falls
// like 1/tau while the body sheds its excess speed, and tends to 2 in the descent. So the
// panels are graded geometrically from tau = 0 (first break at about 1/kappa, ratio
// `ratio`) and then have a constant width `width`: every panel then sits at a relative
// distance from its nearest singularity that is bounded below, and an N-point rule with
// N chosen per precision reaches that precision on each panel. The choice (N, width,
// ratio) per precision was tuned against the 50-digit evaluation of the same sums with
// many more panels, and is checked against the independent mpmath reference
// (tests/data/hodograph_reference.csv, scripts/hodograph_reference.py).
template <Real T>
struct hodograph_rule {
  static constexpr int digits = std::numeric_limits<T>::digits;
  // Only the tabulated rules of Boost.Math (7, 10, 15, 20, 25, 30 points) are used: the
  // others are computed on first use, on the heap.
  static constexpr unsigned points = digits <= 24 ? 10 : digits <= 53 ? 20 : digits <= 64 ? 25 : 30;
  /// Width of the constant panels [in tau].
  static T width() { return digits <= 64 ? T(1) : T(1) / T(3); }
  /// Growth ratio of the graded panels.
  static T ratio() { return digits <= 64 ? T(3) : T(3) / T(2); }
  /// First break times kappa.
  static T first() { return digits <= 64 ? T(1) / T(2) : T(1) / T(4); }
  /// Cap on the number of panels of one query.
  static constexpr int max_panels = 2000;
};

/// Time, distance and height integrals summed together (one evaluation of the common
/// factors per node). Arithmetic as Boost.Math's Gauss quadrature needs it.
template <Real T>
struct hodograph_sums {
  T time{};
  T distance{};
  T rise{};

  hodograph_sums() = default;
  hodograph_sums(const T& t, const T& x, const T& y) : time(t), distance(x), rise(y) {}
  hodograph_sums(const T& z) : time(z), distance(z), rise(z) {}  // NOLINT: Boost writes K r = Real(0)
  template <class A>
    requires std::is_arithmetic_v<A>
  hodograph_sums(A z) : hodograph_sums(T(z)) {}  // NOLINT: and r = 0

  hodograph_sums& operator+=(const hodograph_sums& o) {
    time += o.time;
    distance += o.distance;
    rise += o.rise;
    return *this;
  }
  friend hodograph_sums operator+(hodograph_sums a, const hodograph_sums& b) { return a += b; }
  friend hodograph_sums operator*(const hodograph_sums& a, const T& w) {
    return {T(a.time * w), T(a.distance * w), T(a.rise * w)};
  }
  friend hodograph_sums operator*(const T& w, const hodograph_sums& a) { return a * w; }
  // The L1 norm Boost.Math accumulates beside the sum (unused here).
  friend T abs(const hodograph_sums& a) {
    using std::abs;
    return T(abs(a.time) + abs(a.distance) + abs(a.rise));
  }
};

/// A launch under quadratic drag in still air, not exactly vertical, with validated inputs;
/// the quadrature over tau = asinh(tan theta0) - asinh(tan phi) lives here.
template <Real T>
class hodograph_path {
 public:
  hodograph_path(const T& c, const T& g, const T& v0, const T& theta0) : c_(c), g_(g), v0_(v0), theta0_(theta0) {
    using std::cos;
    using std::exp;
    using std::log;
    using std::sin;
    const T cos0 = cos(theta0);
    const T sin0 = sin(theta0);
    // e^sigma0 = sec + tan, written without cancellation for a downward launch.
    e0_ = theta0 >= T(0) ? T((T(1) + sin0) / cos0) : T(cos0 / (T(1) - sin0));
    sigma0_ = log(e0_);
    kappa_ = c * v0 * v0 / g;
    kc_ = kappa_ * cos0 * cos0;
    u0_ = v0 * cos0;
    // The descent gains about 1/c of depth per unit of tau; beyond this bound e^(2 tau)
    // would overflow T (float: tau < 40, about 40 / c metres below the apex).
    tau_max_ = T(log(boost::math::tools::max_value<T>()) * T(9) / T(20));
  }

  [[nodiscard]] const T& sigma0() const { return sigma0_; }
  [[nodiscard]] const T& tau_max() const { return tau_max_; }

  // Rates of (g t, g x, g y) with respect to tau, and the speed, at tau.
  struct local {
    T sinh_sigma;
    T cosh_sigma;
    T u;  // horizontal velocity [m/s]
  };

  [[nodiscard]] local at(const T& tau) const {
    using std::sqrt;
    const T emt = detail::expm1(tau);
    const T et = T(1) + emt;
    const T sinh_tau = (emt + emt / et) / 2;
    const T es = e0_ / et;  // e^sigma, relative-accurate for any sigma
    const T ies = et / e0_;
    local p;
    p.cosh_sigma = (es + ies) / 2;
    const T sigma = sigma0_ - tau;
    using std::abs;
    if (abs(sigma) < T(1) / T(2)) {
      // near the apex sinh(sigma) = (e - 1/e)/2 would cancel
      const T ems = detail::expm1(sigma);
      p.sinh_sigma = (ems + ems / (T(1) + ems)) / 2;
    } else {
      p.sinh_sigma = (es - ies) / 2;
    }
    const T ep = e0_ * es;  // e^(sigma0 + sigma)
    const T cosh_sum = (ep + T(1) / ep) / 2;
    const T q = T(1) + kc_ * (cosh_sum * sinh_tau + tau);
    p.u = u0_ / sqrt(q);
    return p;
  }

  [[nodiscard]] hodograph_sums<T> rates(const T& tau) const {
    const local p = at(tau);
    const T v = p.u * p.cosh_sigma;
    const T uv = p.u * v;
    return {v, uv, T(uv * p.sinh_sigma)};
  }

  // dy/dtau [m].
  [[nodiscard]] T rise_rate(const T& tau) const {
    const local p = at(tau);
    return T(p.u * p.u * p.cosh_sigma * p.sinh_sigma / g_);
  }

  // (t, x, y) gained from tau = a to tau = b, by the N-point Gauss–Legendre rule.
  [[nodiscard]] hodograph_sums<T> integral(const T& a, const T& b) const {
    using rule = boost::math::quadrature::gauss<T, hodograph_rule<T>::points, no_throw_policy>;
    const T mid = (a + b) / 2;
    const T half = (b - a) / 2;
    const hodograph_sums<T> s = rule::integrate([&](const T& z) { return rates(T(mid + half * z)); });
    return s * T(half / g_);
  }

  // The next panel break after tau (graded, then constant width).
  [[nodiscard]] T next_break(const T& tau) const {
    using rule = hodograph_rule<T>;
    T first = rule::first() / kappa_;
    if (first > rule::width()) first = rule::width();
    if (tau < first) return first;
    const T graded = tau * rule::ratio();
    const T level = tau + rule::width();
    return graded < level ? graded : level;
  }

  [[nodiscard]] hodograph_point<T> point(const T& tau, const hodograph_sums<T>& s) const {
    using std::atan;
    const local p = at(tau);
    hodograph_point<T> r{s.time, s.distance, s.rise, T(p.u * p.cosh_sigma), T(atan(p.sinh_sigma))};
    return r;
  }

  [[nodiscard]] hodograph_point<T> launch_point() const {
    return {T(0), T(0), T(0), v0_, theta0_};
  }

  // Sums from tau = 0 to the apex tau = sigma0 (> 0).
  [[nodiscard]] result<hodograph_sums<T>> ascent() const {
    hodograph_sums<T> s(T(0));
    T a(0);
    for (int k = 0; k < hodograph_rule<T>::max_panels; ++k) {
      T b = next_break(a);
      if (b > sigma0_) b = sigma0_;
      s += integral(a, b);
      if (b == sigma0_) return s;
      a = b;
    }
    return fail(errc::no_convergence, "ascent needs more quadrature panels than allowed, sigma0 =", sigma0_);
  }

  // The point where the height `rise` is crossed, searched panel by panel from (a, s) in
  // the direction `dir` (+1: ascent, heights increase; -1: descent), up to tau = end.
  [[nodiscard]] result<hodograph_point<T>> search(T a, hodograph_sums<T> s, const T& rise, int dir,
                                                  const T& end) const {
    for (int k = 0; k < hodograph_rule<T>::max_panels; ++k) {
      T b = next_break(a);
      if (b > end) b = end;
      const hodograph_sums<T> sb = s + integral(a, b);
      if (T(dir) * T(sb.rise - rise) >= T(0)) return polish(a, s, b, sb, rise, dir);
      if (b == end) break;
      a = b;
      s = sb;
    }
    return fail(errc::no_convergence, "height crossing lies beyond the quadrature's reach, height", rise);
  }

  // Safeguarded Newton iteration on y(tau) = rise inside the panel [a, b], where
  // dir * (y - rise) is < 0 at a and >= 0 at b. dy/dtau is known in closed form; each step
  // integrates only from the previous iterate, so late steps cost little error.
  [[nodiscard]] result<hodograph_point<T>> polish(const T& a, const hodograph_sums<T>& sa, const T& b,
                                                  const hodograph_sums<T>& sb, const T& rise,
                                                  int dir) const {
    using std::abs;
    const T eps = epsilon<T>();
    if (sb.rise == rise) return finish(b, sb, rise);
    T lo = a;
    T hi = b;
    // First guess: linear interpolation between the panel ends.
    T tau = a + (b - a) * T((rise - sa.rise) / (sb.rise - sa.rise));
    if (!(tau > lo && tau < hi)) tau = (lo + hi) / 2;
    hodograph_sums<T> s = sa + integral(a, tau);
    for (int i = 0; i < 100; ++i) {
      const T f = T(dir) * T(s.rise - rise);  // increasing in tau on [lo, hi]
      if (f == T(0)) return finish(tau, s, rise);
      if (f < T(0)) lo = tau;
      else hi = tau;
      const T slope = T(dir) * rise_rate(tau);
      T next = (lo + hi) / 2;
      if (slope > T(0)) {
        const T delta = f / slope;
        // Newton's next step would change tau by no more than rounding: converged.
        if (abs(delta) <= 2 * eps * tau) return finish(tau, s, rise);
        const T newton = tau - delta;
        if (newton > lo && newton < hi) next = newton;
      }
      if (!(hi - lo > 2 * eps * tau)) return finish(tau, s, rise);
      s += integral(tau, next);
      tau = next;
    }
    return fail(errc::no_convergence, "height crossing did not converge, at tau =", tau);
  }

  [[nodiscard]] hodograph_point<T> finish(const T& tau, const hodograph_sums<T>& s, const T& rise) const {
    hodograph_point<T> p = point(tau, s);
    p.rise = rise;
    return p;
  }

 private:
  T c_, g_, v0_, theta0_;
  T e0_{};      // e^sigma0 = sec(theta0) + tan(theta0)
  T sigma0_{};  // asinh(tan(theta0))
  T kappa_{};   // c v0^2 / g
  T kc_{};      // kappa cos^2(theta0) = c u0^2 / g
  T u0_{};      // v0 cos(theta0)
  T tau_max_{};
};

// Exactly vertical flight under quadratic drag, in closed form (Timmerman & van der Weele,
// "On the rise and fall of a ball with linear or quadratic drag", Am. J. Phys. 67 (1999)).
// With vt = sqrt(g/c): the ascent from w0 takes (vt/g) atan(w0/vt) to the height
// (vt^2/2g) ln(1 + w0^2/vt^2); a fall through d from speed w0 >= 0 ends at speed w with
// vt^2 - w^2 = (vt^2 - w0^2) e^(-2 g d / vt^2), after (vt/g) (g d/vt^2 + ln((vt + w)/(vt + w0)))
// (the difference of the two atanh (or acoth) forms, written so that no case split is
// needed and nothing cancels).
template <Real T>
struct vertical_drop {
  T time;
  T speed;
};

template <Real T>
[[nodiscard]] vertical_drop<T> vertical_fall(const T& c, const T& g, const T& w0, const T& d) {
  using std::sqrt;
  const T vt = sqrt(T(g / c));
  const T lambda = 2 * c * d;                // 2 g d / vt^2
  const T k0 = T(w0 / vt) * T(w0 / vt);      // (w0/vt)^2
  const T gain = -(T(1) - k0) * detail::expm1(T(-lambda));  // (w^2 - w0^2) / vt^2
  const T w = vt * sqrt(T(k0 + gain));
  const T dw = T(gain * vt * vt) / T(w + w0);  // w - w0
  const T time = T(vt / g) * T(c * d + detail::log1p(T(dw / (vt + w0))));
  return {time, w};
}

template <Real T>
[[nodiscard]] result<hodograph_point<T>> vertical_crossing(const T& c, const T& g, const T& v0, bool up,
                                                           const T& rise, side branch, bool apex_only) {
  using std::atan;
  using std::sqrt;
  const T half_pi = boost::math::constants::half_pi<T>();
  const T vt = sqrt(T(g / c));
  const T kappa = c * v0 * v0 / g;  // (v0/vt)^2
  const T scale = vt / g;           // 1 / sqrt(g c)
  if (!up) {
    if (apex_only || rise == T(0)) return hodograph_point<T>{T(0), T(0), T(0), v0, T(-half_pi)};
    if (rise > T(0)) return fail(errc::never_reaches, "a downward launch never climbs, height", rise);
    if (branch == side::rising)
      return fail(errc::never_reaches, "rising branch starts above that height, by", T(-rise));
    const vertical_drop<T> f = vertical_fall(c, g, v0, T(-rise));
    return hodograph_point<T>{f.time, T(0), rise, f.speed, T(-half_pi)};
  }
  const T top = detail::log1p(kappa) / (2 * c);
  const T t_top = scale * atan(T(v0 / vt));
  if (apex_only || rise == top) return hodograph_point<T>{t_top, T(0), top, T(0), T(0)};
  if (rise > top) return fail(errc::never_reaches, "height is above the apex by", T(rise - top));
  if (branch == side::rising) {
    if (rise < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-rise));
    if (rise == T(0)) return hodograph_point<T>{T(0), T(0), T(0), v0, half_pi};
    // (w/vt)^2 = (1 + kappa) e^(-2 c y) - 1; t = (vt/g)(atan(a) - atan(b)) with a = v0/vt,
    // b = w/vt, summed as atan((a - b) / (1 + a b)), a^2 - b^2 = -(1 + kappa) expm1(-2 c y).
    const T b2 = detail::expm1(T(detail::log1p(kappa) - 2 * c * rise));
    const T b = sqrt(b2 > T(0) ? b2 : T(0));
    const T a = v0 / vt;
    const T diff = T(-(T(1) + kappa) * detail::expm1(T(-2 * c * rise))) / T(a + b);
    return hodograph_point<T>{T(scale * atan(T(diff / (T(1) + a * b)))), T(0), rise, T(b * vt), half_pi};
  }
  const vertical_drop<T> f = vertical_fall(c, g, T(0), T(top - rise));
  return hodograph_point<T>{T(t_top + f.time), T(0), rise, f.speed, T(-half_pi)};
}

template <Real T>
[[nodiscard]] status hodograph_check(const T& c, const T& g, const T& v0, const T& theta0) {
  if (!is_finite(c) || !(c > T(0)))
    return fail(errc::invalid_argument, "quadratic drag coefficient must be finite and > 0", c);
  if (!is_finite(g) || !(g > T(0))) return fail(errc::invalid_argument, "gravity must be finite and > 0", g);
  if (!is_finite(v0) || !(v0 > T(0)))
    return fail(errc::invalid_argument, "launch speed must be finite and > 0", v0);
  using std::abs;
  if (!is_finite(theta0) || abs(theta0) > boost::math::constants::half_pi<T>())
    return fail(errc::invalid_argument, "launch inclination must be in [-pi/2, pi/2]", theta0);
  return {};
}

template <Real T>
[[nodiscard]] bool hodograph_vertical(const T& theta0) {
  using std::abs;
  using std::cos;
  return abs(theta0) >= boost::math::constants::half_pi<T>() || !(cos(theta0) > T(0));
}

/// The apex of a flight under a = g - c |v| v in still air: the highest point at or after
/// launch (the launch point itself for a level or downward launch; speed 0 and inclination 0
/// for an exactly vertical one). c [1/m] > 0, g [m/s^2] > 0, v0 [m/s] > 0, theta0 [rad] in
/// [-pi/2, pi/2]. Accuracy: a few units in 1e-15 relative in double (tested to 1e-13 against
/// an independent mpmath integration of the equations of motion).
/// Errors: `invalid_argument` for bad inputs; `no_convergence` if a loop hits its cap.
template <Real T>
[[nodiscard]] result<hodograph_point<T>> hodograph_apex(const T& c, const T& g, const T& v0, const T& theta0) {
  if (const status ok = hodograph_check(c, g, v0, theta0); !ok) return unexpected<error>(ok.error());
  if (hodograph_vertical(theta0)) return vertical_crossing(c, g, v0, theta0 > T(0), T(0), side::falling, true);
  const hodograph_path<T> path(c, g, v0, theta0);
  if (!(path.sigma0() > T(0))) return path.launch_point();
  const result<hodograph_sums<T>> s = path.ascent();
  if (!s) return unexpected<error>(s.error());
  hodograph_point<T> p = path.point(path.sigma0(), *s);
  p.inclination = T(0);
  return p;
}

/// Where a flight under a = g - c |v| v in still air crosses the height `rise` [m] above
/// its launch point on the given branch. Inputs as for `hodograph_apex`.
/// Errors: `invalid_argument` for bad inputs; `never_reaches` for a height above the apex,
/// or below the launch on the rising branch; `no_convergence` if an iteration hits its cap
/// (or the descent is so long that e^(2 tau) would overflow T).
template <Real T>
[[nodiscard]] result<hodograph_point<T>> hodograph_crossing(const T& c, const T& g, const T& v0, const T& theta0,
                                                            const T& rise, side branch) {
  if (const status ok = hodograph_check(c, g, v0, theta0); !ok) return unexpected<error>(ok.error());
  if (!is_finite(rise)) return fail(errc::invalid_argument, "height must be finite", rise);
  if (hodograph_vertical(theta0)) return vertical_crossing(c, g, v0, theta0 > T(0), rise, branch, false);
  const hodograph_path<T> path(c, g, v0, theta0);
  const bool climbs = path.sigma0() > T(0);
  hodograph_sums<T> top(T(0));
  if (climbs) {
    const result<hodograph_sums<T>> s = path.ascent();
    if (!s) return unexpected<error>(s.error());
    top = *s;
  }
  if (rise > top.rise) return fail(errc::never_reaches, "height is above the apex by", T(rise - top.rise));
  if (rise == top.rise) {
    if (!climbs) return path.launch_point();
    hodograph_point<T> p = path.point(path.sigma0(), top);
    p.inclination = T(0);
    return p;
  }
  if (branch == side::rising) {
    if (rise < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-rise));
    if (rise == T(0)) return path.launch_point();
    return path.search(T(0), hodograph_sums<T>(T(0)), rise, +1, path.sigma0());
  }
  return path.search(climbs ? path.sigma0() : T(0), top, rise, -1, path.tau_max());
}

}  // namespace lob::detail
