#pragma once
/// \file lob/integrate/hodograph.hpp
/// The fast path for quadratic drag in still air, a = g - c |v| v: the speed is a closed
/// function of the path inclination (the hodograph of the flight), and time, distance and
/// height are single integrals over the inclination, summed by Gauss–Legendre quadrature.
/// Used by the integrated flight of `quadratic_drag` when there is no wind.

#include <Eigen/Core>
#include <array>
#include <boost/math/constants/constants.hpp>
#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/special_functions/asinh.hpp>
#include <boost/math/tools/precision.hpp>
#include <cstdint>
#include <limits>
#include <optional>
#include <type_traits>

#include "lob/core/flight_types.hpp"
#include "lob/core/options.hpp"
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
// the rate d ln(1 + D)/dtau. That rate is 2 kappa (kappa = c v0^2 / g) at launch (a real
// pole at tau ~ -1/(2 kappa)), falls roughly like 1/tau while the body sheds its excess
// speed, and tends to 2 in the descent (zeros at Im tau ~ +-pi/2). So the panels are graded
// geometrically from tau = 0 (first break at first/kappa, then ratio `ratio`) until they
// reach the constant width `width`. With the first break at 1/kappa the launch pole sits a
// panel width beyond the first panel (Bernstein ellipse rho = 2 + sqrt 3), and a width of
// 2 keeps the descent zeros at rho ~ 3.4, so that 20 points give rho^-40 < 1e-21 in
// double. The ratio is 2, not 3: measured against the same sums on very fine panels at
// 75 digits (N = 30, width 1/12, ratio 1.2; 495 launches, kappa 1e-6..1e3, elevations
// -80..89.9999 deg, landing heights -3 L..+0.4 apex), ratio 3 left landing errors up to
// 3.7e-13 in double at kappa >= 30 and shallow elevations, ratio 2 at most 1.0e-14.
// Points per precision: float 10, double 20, long double 25 (same panels); 50 digits and
// wider 30 points on panels of width 3/4, ratio 7/5, first break 1/(4 kappa) (rho >= 6.8,
// rho^-60 < 1e-50). The result is checked against the independent mpmath reference
// (tests/data/hodograph_reference.csv from scripts/hodograph_reference.py).
template <Real T>
struct hodograph_rule {
  static constexpr int digits = std::numeric_limits<T>::digits;
  // Only the tabulated rules of Boost.Math (7, 10, 15, 20, 25, 30 points) are used: the
  // others are computed on first use, on the heap.
  static constexpr unsigned points = digits <= 24 ? 10 : digits <= 53 ? 20 : digits <= 64 ? 25 : 30;
  // The rule for the last, short Newton corrections (at most 1/1000 of a panel).
  static constexpr unsigned short_points = digits <= 64 ? 7 : 15;
  /// Width of the constant panels [in tau].
  static T width() { return digits <= 64 ? T(2) : T(3) / T(4); }
  /// Growth ratio of the graded panels.
  static T ratio() { return digits <= 64 ? T(2) : T(7) / T(5); }
  /// First break times kappa.
  static T first() { return digits <= 64 ? T(1) : T(1) / T(4); }
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
  requires std::is_arithmetic_v<A> hodograph_sums(A z) : hodograph_sums(T(z)) {}  // NOLINT: and r = 0

  hodograph_sums& operator+=(const hodograph_sums& o) {
    time += o.time;
    distance += o.distance;
    rise += o.rise;
    return *this;
  }
  friend hodograph_sums operator+(hodograph_sums a, const hodograph_sums& b) { return a += b; }
  friend hodograph_sums operator-(const hodograph_sums& a, const hodograph_sums& b) {
    return {T(a.time - b.time), T(a.distance - b.distance), T(a.rise - b.rise)};
  }
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

/// 1/(2k+1)! for k = 10 down to 0, rounded to T: the Taylor coefficients of sinh(x)/x in x^2.
template <Real T>
[[nodiscard]] constexpr std::array<T, 11> sinh_small_coefficients() {
  return {T(1.0L / 51090942171709440000.0L),
          T(1.0L / 121645100408832000.0L),
          T(1.0L / 355687428096000.0L),
          T(1.0L / 1307674368000.0L),
          T(1.0L / 6227020800.0L),
          T(1.0L / 39916800.0L),
          T(1.0L / 362880.0L),
          T(1.0L / 5040.0L),
          T(1.0L / 120.0L),
          T(1.0L / 6.0L),
          T(1)};
}

/// Whether the node loops' series (sinh_small, expm1_unit) are fixed polynomials for T:
/// built-in types of at most 64 digits (float, double, x87 long double). Wider types (a
/// double-double long double, multiprecision) sum or call instead.
template <class T>
inline constexpr bool fixed_series = std::is_floating_point_v<T> && std::numeric_limits<T>::digits <= 64;

/// The first index into sinh_small_coefficients that a fixed_series type needs: its series
/// stops at x^(2K+1) with K = 10 - first, where the first omitted term x^(2K+2)/(2K+3)! is
/// below half an ulp at |x| = 1/2 (float K = 4: 2.4e-11; double K = 7: 4.3e-20; long
/// double K = 8: 3.1e-23).
template <Real T>
inline constexpr std::size_t sinh_small_first = std::numeric_limits<T>::digits <= 24   ? 6
                                                : std::numeric_limits<T>::digits <= 53 ? 3
                                                                                       : 2;

/// sinh(x) for |x| < 1/2 by its Taylor series (relative accuracy near 0 without a call):
/// for fixed_series types a fixed Horner polynomial (see sinh_small_first), for others
/// the series summed until its terms fall below epsilon.
template <Real T>
[[nodiscard]] T sinh_small(const T& x) {
  const T x2 = x * x;
  if constexpr (fixed_series<T>) {
    constexpr std::array<T, 11> inv = sinh_small_coefficients<T>();
    constexpr std::size_t first = sinh_small_first<T>;
    T p = inv[first];
    for (std::size_t k = first + 1; k < inv.size(); ++k) p = p * x2 + inv[k];
    return p * x;
  } else {
    using std::abs;
    const T eps = epsilon<T>();
    T term = x;
    T sum = x;
    for (int k = 1; k < 60; ++k) {  // |x| < 1/2: 60 terms pass any precision
      term *= x2 / T((2 * k) * (2 * k + 1));
      sum += term;
      if (abs(term) <= eps * abs(sum)) break;
    }
    return sum;
  }
}

/// sinh_small of each element of an Eigen array (fixed_series types: Horner's rule on
/// whole arrays, so that it vectorises).
template <Real T, int M>
[[nodiscard]] Eigen::Array<T, M, 1> sinh_small(const Eigen::Array<T, M, 1>& x) {
  if constexpr (fixed_series<T>) {
    constexpr std::array<T, 11> inv = sinh_small_coefficients<T>();
    const Eigen::Array<T, M, 1> x2 = x.square();
    constexpr std::size_t first = sinh_small_first<T>;
    Eigen::Array<T, M, 1> p = Eigen::Array<T, M, 1>::Constant(inv[first]);
    for (std::size_t k = first + 1; k < inv.size(); ++k) p = p * x2 + inv[k];
    return p * x;
  } else {
    return x.unaryExpr([](const T& z) { return sinh_small(z); });
  }
}

/// e^x - 1 for each x in [0, 1] of an Eigen array of a fixed_series type, by the Taylor series
/// x sum x^j/(j+1)! to the term x^m/m! after which the rest is below half an ulp at x = 1
/// (float m = 10, double 18, long double 20). Relative-accurate near 0 like expm1 and,
/// being Horner's rule on whole arrays, vectorised where calls to expm1 would not be.
template <Real T, int M>
requires fixed_series<T>
[[nodiscard]] Eigen::Array<T, M, 1> expm1_unit(const Eigen::Array<T, M, 1>& x) {
  constexpr int digits = std::numeric_limits<T>::digits;
  constexpr std::size_t m = digits <= 24 ? 10 : digits <= 53 ? 18 : 20;
  // 1/(j+1)! for j = 19 down to 0
  constexpr long double inv[] = {1.0L / 2432902008176640000.0L,
                                 1.0L / 121645100408832000.0L,
                                 1.0L / 6402373705728000.0L,
                                 1.0L / 355687428096000.0L,
                                 1.0L / 20922789888000.0L,
                                 1.0L / 1307674368000.0L,
                                 1.0L / 87178291200.0L,
                                 1.0L / 6227020800.0L,
                                 1.0L / 479001600.0L,
                                 1.0L / 39916800.0L,
                                 1.0L / 3628800.0L,
                                 1.0L / 362880.0L,
                                 1.0L / 40320.0L,
                                 1.0L / 5040.0L,
                                 1.0L / 720.0L,
                                 1.0L / 120.0L,
                                 1.0L / 24.0L,
                                 1.0L / 6.0L,
                                 1.0L / 2.0L,
                                 1.0L};
  constexpr std::size_t first = 20 - m;  // inv[first] = 1/m!
  constexpr std::array<T, m> c = [&] {
    std::array<T, m> r{};
    for (std::size_t k = 0; k < m; ++k) r[k] = T(inv[first + k]);
    return r;
  }();
  Eigen::Array<T, M, 1> p = Eigen::Array<T, M, 1>::Constant(c[0]);
  for (std::size_t k = 1; k < m; ++k) p = p * x + c[k];
  return p * x;
}

/// The discrete Legendre transform of an N-point Gauss rule: the coefficients of the
/// degree N-1 interpolant through values at the nodes +-x_i (x_i >= 0) are
/// c_k = sum_i w_i P_k(x_i) (2k+1)/2 (f(x_i) + (-1)^k f(-x_i)) (discrete orthogonality).
/// Rows of even and of odd k apart, applied to the even and the odd parts of the values.
template <Real T, unsigned N>
struct legendre_transform {
  static constexpr int half = int(N + 1) / 2;
  Eigen::Matrix<T, int(N + 1) / 2, half> even;
  Eigen::Matrix<T, int(N) / 2, half> odd;
};

template <Real T, unsigned N>
[[nodiscard]] legendre_transform<T, N> make_legendre_transform() {
  using gauss = boost::math::quadrature::gauss<T, N, no_throw_policy>;
  const auto& x = gauss::abscissa();
  const auto& w = gauss::weights();
  legendre_transform<T, N> t;
  for (int i = 0; i < legendre_transform<T, N>::half; ++i) {
    T p_prev(0);
    T p(1);
    for (unsigned k = 0; k < N; ++k) {
      const T m = T(w[i] * p * T(2 * k + 1) / 2);
      if (k & 1u)
        t.odd(int(k / 2), i) = m;
      else
        t.even(int(k / 2), i) = m;
      const T next = (T(2 * k + 1) * x[i] * p - T(k) * p_prev) / T(k + 1);
      p_prev = p;
      p = next;
    }
  }
  return t;
}

/// The interpolant through values at the nodes of an N-point Gauss rule in powers of z,
/// split by parity: p(z) = E(z^2) + z O(z^2), E's coefficients from the even parts
/// f(x_i) + f(-x_i) of the values, O's from the odd parts f(x_i) - f(-x_i). It is the
/// Legendre interpolant above with each P_k written in powers of z (P_k+1 = ((2k+1) z P_k
/// - k P_k-1)/(k+1)). Powers of z are ill-conditioned for high degree in general, but the
/// Legendre coefficients of a panel's smooth rates fall off like rho^-k, so the large
/// power coefficients of the high P_k carry little weight: the interpolant is used only
/// to start a Newton iteration on the true integral (see interpolated_root), where the
/// rounding of the power form is harmless: 3e-11 to 4e-10 of the largest node rate in
/// double against the Legendre form in long double, measured on four panels (launch and
/// descent, light to heavy drag); the true Newton step squares it.
/// The gain: E and O are two short Horner chains in z^2, about a quarter of the
/// dependent steps of the Legendre recurrence.
template <Real T, unsigned N>
struct power_interpolant {
  static constexpr int half = int(N + 1) / 2;
  static constexpr int even_terms = int(N + 1) / 2;
  static constexpr int odd_terms = int(N) / 2;
  Eigen::Matrix<T, even_terms, half> even;
  Eigen::Matrix<T, odd_terms, half> odd;
};

template <Real T, unsigned N>
[[nodiscard]] power_interpolant<T, N> make_power_interpolant() {
  const legendre_transform<T, N> lt = make_legendre_transform<T, N>();
  // Powers-of-z coefficients of P_k, k < N: row k, column j.
  Eigen::Matrix<T, int(N), int(N)> pk = Eigen::Matrix<T, int(N), int(N)>::Zero();
  pk(0, 0) = T(1);
  if (N > 1) pk(1, 1) = T(1);
  for (unsigned k = 1; k + 1 < N; ++k)
    for (unsigned j = 0; j < N; ++j) {
      const T up = j > 0 ? T(T(2 * k + 1) * pk(int(k), int(j - 1))) : T(0);
      pk(int(k + 1), int(j)) = (up - T(k) * pk(int(k - 1), int(j))) / T(k + 1);
    }
  power_interpolant<T, N> t;
  t.even.setZero();
  t.odd.setZero();
  for (int m = 0; m < power_interpolant<T, N>::even_terms; ++m)
    for (int k = 0; k < power_interpolant<T, N>::even_terms; ++k)
      t.even.row(m) += pk(2 * k, 2 * m) * lt.even.row(k);
  for (int m = 0; m < power_interpolant<T, N>::odd_terms; ++m)
    for (int k = 0; k < power_interpolant<T, N>::odd_terms; ++k)
      t.odd.row(m) += pk(2 * k + 1, 2 * m + 1) * lt.odd.row(k);
  return t;
}

// Built once per rule for built-in types (a constant table, set up on first use); wider
// types build it per call (returned by value), as their Gauss rules are.
template <Real T, unsigned N>
[[nodiscard]] decltype(auto) power_interpolant_table() {
  if constexpr (std::is_floating_point_v<T>) {
    static const power_interpolant<T, N> table = make_power_interpolant<T, N>();
    return static_cast<const power_interpolant<T, N>&>(table);
  } else {
    return make_power_interpolant<T, N>();
  }
}

/// A launch under quadratic drag in still air, not exactly vertical, with validated inputs;
/// the quadrature over tau = asinh(tan theta0) - asinh(tan phi) lives here.
template <Real T>
class hodograph_path {
 public:
  static constexpr unsigned points = hodograph_rule<T>::points;
  static constexpr unsigned half_points = (points + 1) / 2;
  using gauss = boost::math::quadrature::gauss<T, points, no_throw_policy>;

  hodograph_path(const T& c, const T& g, const T& v0, const T& theta0) : g_(g), v0_(v0), theta0_(theta0) {
    using std::cos;
    using std::log;
    using std::sin;
    const T cos0 = cos(theta0);
    const T sin0 = sin(theta0);
    // e^sigma0 = sec + tan, written without cancellation for a downward launch.
    e0_ = theta0 >= T(0) ? T((T(1) + sin0) / cos0) : T(cos0 / (T(1) - sin0));
    ie0_ = T(1) / e0_;
    // asinh keeps sigma0 relative-accurate for shallow launches (log(e0) near 1 would not).
    sigma0_ = boost::math::asinh(T(sin0 / cos0), no_throw_policy{});
    kappa_ = c * v0 * v0 / g;
    kc_ = kappa_ * cos0 * cos0;
    u0_ = v0 * cos0;
    // The descent gains about 1/c of depth per unit of tau; beyond this bound e^(2 tau)
    // would overflow T (float: tau < 40, about 40 / c metres below the apex).
    tau_max_ = T(log(boost::math::tools::max_value<T>()) * T(9) / T(20));
  }

  [[nodiscard]] const T& sigma0() const { return sigma0_; }
  [[nodiscard]] const T& tau_max() const { return tau_max_; }

  // sinh and cosh of sigma = sigma0 - tau, and the horizontal velocity u, at tau.
  struct local {
    T sinh_sigma;
    T cosh_sigma;
    T q;  // 1 + D = (u0 / u)^2
    T u;  // [m/s]
  };

  // One exponential per node: e^tau (expm1 near 0, where sinh(tau) must keep its digits).
  [[nodiscard]] local at(const T& tau) const {
    using std::exp;
    T et;
    T emt;
    if (tau < T(1) / T(2)) {
      emt = detail::expm1(tau);
      et = T(1) + emt;
    } else {
      et = exp(tau);
      emt = et - T(1);
    }
    return with_speed(shape(tau, et, emt, T(T(1) / et)));
  }

  // The same from e^tau, e^tau - 1 and e^-tau: e^sigma = e^sigma0 e^-tau keeps its
  // relative accuracy for any sigma; sinh(sigma) near the apex (|sigma| < 1/2) comes from
  // its series, where (e - 1/e)/2 would cancel.
  // Everything but u (see with_speed).
  [[nodiscard]] local shape(const T& tau, const T& et, const T& emt, const T& iet) const {
    using std::abs;
    const T es = e0_ * iet;   // e^sigma
    const T ies = et * ie0_;  // e^-sigma
    const T sinh_tau = (emt + emt * iet) / 2;
    const T sigma = sigma0_ - tau;
    local p;
    p.cosh_sigma = (es + ies) / 2;
    p.sinh_sigma = abs(sigma) < T(1) / T(2) ? sinh_small(sigma) : T((es - ies) / 2);
    const T cosh_sum = (e0_ * es + ies * ie0_) / 2;  // cosh(sigma0 + sigma)
    p.q = T(1) + kc_ * (cosh_sum * sinh_tau + tau);
    p.u = T(0);
    return p;
  }
  [[nodiscard]] local with_speed(local p) const {
    using std::sqrt;
    p.u = u0_ / sqrt(p.q);
    return p;
  }

  // Rates of (g t, g x, g y) with respect to tau.
  [[nodiscard]] static hodograph_sums<T> rates(const local& p) {
    const T v = p.u * p.cosh_sigma;
    const T uv = p.u * v;
    return {v, uv, T(uv * p.sinh_sigma)};
  }
  [[nodiscard]] hodograph_sums<T> rates(const T& tau) const { return rates(at(tau)); }

  // The rates g dy/dtau (or g dx/dtau) at the Gauss nodes of the last panel, for its interpolant:
  // plus[i] at z = +x_i, minus[i] at z = -x_i (x_i Boost's non-negative abscissae).
  struct node_rates {
    std::array<T, half_points> plus;
    std::array<T, half_points> minus;
  };

  // (t, x, y) gained from tau = a to tau = b, by the N-point Gauss–Legendre rule (Boost's
  // tabulated nodes and weights); the rates of quantity `q` (rise, distance or time) at
  // the nodes are kept in `keep`. All nodes are evaluated together in Eigen arrays, whose
  // arithmetic and square roots vectorise for built-in types. Away from the launch the
  // nodes come in pairs mid +- h, whose exponentials are e^mid e^+-h: one e^h - 1 per
  // pair. e^tau - 1 is then a sum of non-negative terms at mid + h and a difference at
  // mid - h, which loses digits as mid - h nears 0, so a panel that starts closer to 0
  // than its own width takes e^tau - 1 at every node.
  [[nodiscard]] hodograph_sums<T> integral(const T& a, const T& b, node_rates* keep = nullptr,
                                           T hodograph_sums<T>::*q = &hodograph_sums<T>::rise) const {
    const panel_nodes p = nodes_of(a, b);
    const nodes rt = p.u * p.cosh_sigma;  // g dt/dtau = v
    const nodes rx = p.u * rt;
    const nodes ry = rx * p.sinh_sigma;
    const hodograph_sums<T> s(p.sum(rt), p.sum(rx), p.sum(ry));
    if (keep) {
      const nodes& r = q == &hodograph_sums<T>::rise ? ry : q == &hodograph_sums<T>::distance ? rx : rt;
      for (unsigned i = 0; i < half_points; ++i) {
        keep->plus[i] = r(i);
        keep->minus[i] = r(half_points + i);
      }
    }
    return s * T(p.half / g_);
  }

  // Nodes 0..half_points-1 of a panel at mid + h_i, the rest at mid - h_i (h_i = half x_i;
  // the centre node of an odd rule appears twice, with half its weight each time).
  using nodes = Eigen::Array<T, int(2 * half_points), 1>;
  using halves = Eigen::Array<T, int(half_points), 1>;
  struct panel_nodes {
    T half;  // half the panel width
    nodes u, cosh_sigma, sinh_sigma;
    // The Gauss sum of values at the nodes (times half the width: the integral).
    [[nodiscard]] T sum(const nodes& f) const {
      halves wh = Eigen::Map<const halves>(gauss::weights().data());
      if (points & 1u) wh(0) /= 2;
      return T((wh * (f.head(half_points) + f.tail(half_points))).sum());
    }
  };

  // u, cosh(sigma) and sinh(sigma) at the Gauss nodes of [a, b].
  [[nodiscard]] panel_nodes nodes_of(const T& a, const T& b) const {
    const T mid = (a + b) / 2;
    const T half = (b - a) / 2;
    const halves h = half * Eigen::Map<const halves>(gauss::abscissa().data());
    nodes tau;
    tau << mid + h, mid - h;
    nodes et;   // e^tau
    nodes emt;  // e^tau - 1
    nodes iet;  // e^-tau
    if (a >= b - a) {
      // e^(mid +- h) = e^mid e^+-h: one e^h - 1 per pair.
      const T em = detail::expm1(mid);
      const T e_mid = T(1) + em;
      const T ie_mid = T(1) / e_mid;
      const halves eh = expm1_all(h);  // e^h - 1
      const halves ieh = T(1) / (T(1) + eh);
      et << e_mid * (T(1) + eh), e_mid * ieh;
      emt << em + eh + em * eh, (em - eh) * ieh;
      iet << ie_mid * ieh, ie_mid * (T(1) + eh);
    } else {
      emt = expm1_all(tau);
      et = T(1) + emt;
      iet = T(1) / et;
    }
    const nodes es = e0_ * iet;   // e^sigma
    const nodes ies = et * ie0_;  // e^-sigma
    const nodes sigma = sigma0_ - tau;
    const nodes sinh_tau = (emt + emt * iet) / 2;
    const nodes cosh_sum = (e0_ * es + ie0_ * ies) / 2;  // cosh(sigma0 + sigma)
    const nodes one_plus_d = T(1) + kc_ * (cosh_sum * sinh_tau + tau);
    panel_nodes p;
    p.half = half;
    p.u = u0_ / one_plus_d.sqrt();
    p.cosh_sigma = (es + ies) / 2;
    p.sinh_sigma = (es - ies) / 2;
    const auto near_apex = sigma.square() < T(1) / T(4);
    if (near_apex.any()) p.sinh_sigma = near_apex.select(sinh_small(sigma), p.sinh_sigma);
    return p;
  }

  // e^z - 1 for each node offset z >= 0: the series where every z <= 2 in a fixed_series
  // type, else one expm1 (or exp) each.
  template <int M>
  [[nodiscard]] static Eigen::Array<T, M, 1> expm1_all(const Eigen::Array<T, M, 1>& z) {
    if constexpr (fixed_series<T>) {
      const T largest = z.maxCoeff();
      if (largest <= T(1)) return expm1_unit(z);
      if (largest <= T(2)) {
        // e^z - 1 = e2 (2 + e2) with e2 = e^(z/2) - 1: relative-accurate, no cancellation.
        const Eigen::Array<T, M, 1> e2 = expm1_unit(Eigen::Array<T, M, 1>(z / 2));
        return e2 * (T(2) + e2);
      }
    }
    return z.unaryExpr([](const T& y) { return T(detail::expm1(y)); });
  }

  // Sums from the launch to tau_e for aiming: (t, x, y), and (with `derivatives`) the
  // integrals x4 and y4 of u^3 v / g and u^3 v sinh(sigma) / g, from which hodograph_aim
  // forms the derivatives of x and y with respect to the launch elevation (see there).
  struct aim_sums {
    hodograph_sums<T> s{T(0)};
    T x4{};
    T y4{};
  };
  [[nodiscard]] result<aim_sums> aim_sums_to(const T& tau_e, bool derivatives = true) const {
    aim_sums out;
    T a(0);
    for (int k = 0; k < hodograph_rule<T>::max_panels; ++k) {
      if (!(tau_e > a)) return out;
      T b = next_break(a);
      if (!(tau_e > b + T(b - a) / 2)) b = tau_e;  // the last panel stretched, as in ascent()
      const panel_nodes p = nodes_of(a, b);
      const nodes rt = p.u * p.cosh_sigma;
      const nodes rx = p.u * rt;
      const nodes ry = rx * p.sinh_sigma;
      const T w = p.half / g_;
      out.s += hodograph_sums<T>(p.sum(rt), p.sum(rx), p.sum(ry)) * w;
      if (derivatives) {
        const nodes u2 = p.u.square();
        out.x4 += T(p.sum(nodes(rx * u2)) * w);
        out.y4 += T(p.sum(nodes(ry * u2)) * w);
      }
      a = b;
    }
    return fail(errc::no_convergence, "aim sums need more quadrature panels than allowed, tau =", tau_e);
  }

  // The same with Boost's short rule, for Newton corrections of at most 1/1000 of a panel.
  [[nodiscard]] hodograph_sums<T> short_integral(const T& a, const T& b) const {
    using rule = boost::math::quadrature::gauss<T, hodograph_rule<T>::short_points, no_throw_policy>;
    const T mid = (a + b) / 2;
    const T half = (b - a) / 2;
    const hodograph_sums<T> s = rule::integrate([&](const T& z) { return rates(T(mid + half * z)); });
    return s * T(half / g_);
  }

  // The next panel break after tau: graded from the launch, then of constant width.
  [[nodiscard]] T next_break(const T& tau) const {
    using rule = hodograph_rule<T>;
    T first = rule::first() / kappa_;
    if (first > rule::width()) first = rule::width();
    if (tau < first) return first;
    const T graded = tau * rule::ratio();
    const T level = tau + rule::width();
    return graded < level ? graded : level;
  }

  // As next_break, but a first panel shorter than half the one after it is merged into
  // it (the panel after a cut at the apex), so that no node is spent on a sliver.
  [[nodiscard]] T next_break_merged(const T& tau) const {
    const T b = next_break(tau);
    const T after = next_break(b);
    return T(b - tau) < T(after - b) / 2 ? after : b;
  }

  [[nodiscard]] hodograph_point<T> point(const T& tau, const hodograph_sums<T>& s) const {
    using std::atan;
    const local p = at(tau);
    return {s.time, s.distance, s.rise, T(p.u * p.cosh_sigma), T(atan(p.sinh_sigma))};
  }

  [[nodiscard]] hodograph_point<T> launch_point() const { return {T(0), T(0), T(0), v0_, theta0_}; }

  // Sums from tau = 0 to the apex tau = sigma0 (> 0). The last panel is stretched to the
  // apex when the apex lies less than half a panel beyond a break.
  [[nodiscard]] result<hodograph_sums<T>> ascent() const {
    hodograph_sums<T> s(T(0));
    T a(0);
    for (int k = 0; k < hodograph_rule<T>::max_panels; ++k) {
      T b = next_break(a);
      if (!(sigma0_ > b + T(b - a) / 2)) b = sigma0_;
      s += integral(a, b);
      if (b == sigma0_) return s;
      a = b;
    }
    return fail(errc::no_convergence, "ascent needs more quadrature panels than allowed, sigma0 =", sigma0_);
  }

  // The point where quantity `q` (rise or distance) reaches `level`, searched panel by
  // panel from (a, s) in the direction `dir` (+1: q increases with tau, as the rise does
  // on the ascent and the distance always; -1: the rise on the descent), up to tau = end,
  // and (when given) up to the time `max_time` [s]: beyond it `time_limit`.
  [[nodiscard]] result<hodograph_point<T>> search(T a, hodograph_sums<T> s, const T& level, int dir,
                                                  const T& end,
                                                  T hodograph_sums<T>::*q = &hodograph_sums<T>::rise,
                                                  const std::optional<T>& max_time = std::nullopt) const {
    node_rates nodes;
    for (int k = 0; k < hodograph_rule<T>::max_panels; ++k) {
      T b = k == 0 ? next_break_merged(a) : next_break(a);
      if (b > end) b = end;
      const hodograph_sums<T> sb = s + integral(a, b, &nodes, q);
      if (T(dir) * T(sb.*q - level) >= T(0)) {
        const result<hodograph_point<T>> p = polish(a, s, b, sb, nodes, level, dir, q);
        if (p && max_time && p->time > *max_time)
          return fail(errc::time_limit, "the point is reached after max_time, at t =", p->time);
        return p;
      }
      if (max_time && sb.time > *max_time)
        return fail(errc::time_limit, "the point is not reached within max_time =", *max_time);
      if (b == end) break;
      a = b;
      s = sb;
    }
    // The horizontal distance gains e^-tau per unit of tau in the descent: at tau_max it has
    // reached its limit to the last digit, so a distance beyond is never reached.
    if (q == &hodograph_sums<T>::distance && T(level - s.distance) > T(0))
      return fail(errc::never_reaches, "drag stops the body short of that distance; limit", s.distance);
    return fail(errc::no_convergence, "the point lies beyond the quadrature's reach, at", level);
  }

  // The root of the panel's interpolant of q: q(z) = q_a + (half/g) int_-1^z p, with p
  // the polynomial through the N node rates (power_interpolant: E(z^2) + z O(z^2), whose
  // integral from -1 is E1 - O1 + z IE(z^2) + z^2 IO(z^2), IE and IO with the
  // coefficients of E and O over 2m+1 and 2m+2, E1 and O1 their values at 1), solved by a
  // safeguarded Newton iteration in z. Costs no evaluation of the integrand and is
  // accurate to about the interpolation error of the panel, so that one true Newton step
  // finishes the job.
  [[nodiscard]] T interpolated_root(const T& a, const T& b, const T& qa, const T& qb, const node_rates& nodes,
                                    const T& level, int dir) const {
    using std::abs;
    // Even and odd parts of the node pairs, then the coefficients of E and O.
    using halves = Eigen::Matrix<T, int(half_points), 1>;
    halves even;
    halves odd;
    for (unsigned i = 0; i < half_points; ++i) {
      const bool centre = i == 0 && (points & 1u);
      even(i) = centre ? nodes.plus[i] : T(nodes.plus[i] + nodes.minus[i]);
      odd(i) = centre ? T(0) : T(nodes.plus[i] - nodes.minus[i]);
    }
    using table = power_interpolant<T, points>;
    constexpr int ne = table::even_terms;
    constexpr int no = table::odd_terms;
    const auto& pm = power_interpolant_table<T, points>();
    const T scale = (b - a) / 2 / g_;
    // Coefficient-based products: for these small fixed sizes Eigen would otherwise call
    // its general matrix-vector kernel out of line (seen in perf, g++ 12 -O3).
    const Eigen::Matrix<T, ne, 1> ce = scale * pm.even.lazyProduct(even);
    const Eigen::Matrix<T, no, 1> co = scale * pm.odd.lazyProduct(odd);
    std::array<T, ne> ie;
    std::array<T, no> io;
    T offset = qa - level;  // q(-1) - level, plus E1 - O1 below
    for (int m = 0; m < ne; ++m) {
      ie[std::size_t(m)] = ce(m) / T(2 * m + 1);
      offset += ie[std::size_t(m)];
    }
    for (int m = 0; m < no; ++m) {
      io[std::size_t(m)] = co(m) / T(2 * m + 2);
      offset -= io[std::size_t(m)];
    }
    // F(z) = dir (q(z) - level) and F'(z), increasing from F(-1) < 0 to F(1) >= 0: four
    // independent Horner chains in w = z^2.
    const auto eval = [&](const T& z, T& slope) {
      const T w = z * z;
      T pe = ce(ne - 1);
      T qe = ie[ne - 1];
      for (int m = ne - 2; m >= 0; --m) {
        pe = pe * w + ce(m);
        qe = qe * w + ie[std::size_t(m)];
      }
      T po(0);
      T qo(0);
      if constexpr (no > 0) {
        po = co(no - 1);
        qo = io[no - 1];
        for (int m = no - 2; m >= 0; --m) {
          po = po * w + co(m);
          qo = qo * w + io[std::size_t(m)];
        }
      }
      slope = T(dir) * T(pe + z * po);
      return T(T(dir) * T(offset + (z * qe + w * qo)));
    };
    T lo(-1);
    T hi(1);
    T z = T(-1) + 2 * T((level - qa) / (qb - qa));
    if (!(z > lo && z < hi)) z = T(0);
    // A Newton step below 2^(-digits/3) leaves an error of order its square, which is
    // below the interpolation error of the panel: the true Newton step of polish()
    // finishes from there, so the iteration stops after it.
    using std::ldexp;
    const T eps = epsilon<T>();
    const T enough = ldexp(T(1), -std::numeric_limits<T>::digits / 3);
    for (int i = 0; i < 60; ++i) {
      T slope;
      const T f = eval(z, slope);
      if (f == T(0)) break;
      if (f < T(0))
        lo = z;
      else
        hi = z;
      T next = (lo + hi) / 2;
      bool newton_step = false;
      if (slope > T(0)) {
        const T newton = z - f / slope;
        if (newton > lo && newton < hi) {
          next = newton;
          newton_step = true;
        }
      }
      const T step = abs(T(next - z));
      z = next;
      if ((newton_step && step <= enough) || step <= 4 * eps || !(hi - lo > 4 * eps)) break;
    }
    return T((a + b) / 2 + (b - a) / 2 * z);
  }

  // The sums at tau inside the panel [a, b] whose end sums are sa and sb, integrated from
  // the nearer end; a piece at most 1/1000 of the panel long takes Boost's short rule.
  [[nodiscard]] hodograph_sums<T> inside(const T& a, const hodograph_sums<T>& sa, const T& b,
                                         const hodograph_sums<T>& sb, const T& tau) const {
    const T sliver = (b - a) / 1000;
    if (tau - a <= b - tau) return sa + (tau - a <= sliver ? short_integral(a, tau) : integral(a, tau));
    return sb - (b - tau <= sliver ? short_integral(tau, b) : integral(tau, b));
  }

  // Safeguarded Newton iteration on q(tau) = level inside the panel [a, b], where
  // dir * (q - level) is < 0 at a and >= 0 at b, from the interpolated root. dq/dtau is
  // known in closed form. A step so small that the trapezoid rule is exact to rounding
  // (below 1e-5 of the distance to either end of the panel, the scale on which the rates
  // change: its error is ~ step^3) costs one evaluation and gives the rate at the new
  // point for the next step; longer steps integrate from the nearer end of the panel, so
  // that rounding does not pile up along a long detour. (A landing just after a tiny apex
  // has a slope near zero, where a piled-up error in the rise would move the root.)
  [[nodiscard]] result<hodograph_point<T>> polish(const T& a, const hodograph_sums<T>& sa, const T& b,
                                                  const hodograph_sums<T>& sb, const node_rates& nodes,
                                                  const T& level, int dir, T hodograph_sums<T>::*q) const {
    using std::abs;
    using std::min;
    const T eps = epsilon<T>();
    if (sb.*q == level) return finish(sb, rates(b), level, q);
    T lo = a;
    T hi = b;
    T tau = interpolated_root(a, b, sa.*q, sb.*q, nodes, level, dir);
    if (!(tau > lo && tau < hi)) tau = (lo + hi) / 2;
    hodograph_sums<T> s = inside(a, sa, b, sb, tau);
    hodograph_sums<T> r = rates(tau);  // g d(t, x, y)/dtau at tau
    T last_delta = b - a;
    for (int i = 0; i < 100; ++i) {
      const T f = T(dir) * T(s.*q - level);  // increasing in tau on [lo, hi]
      if (f == T(0)) return finish(s, r, level, q);
      if (f < T(0))
        lo = tau;
      else
        hi = tau;
      const T slope = T(dir) * T(r.*q / g_);
      T next = (lo + hi) / 2;
      if (slope > T(0)) {
        const T delta = f / slope;
        // Converged when the step is below rounding, or stops shrinking once it is tiny
        // (rounding in q, not distance to the root, drives it).
        if (abs(delta) <= 2 * eps * abs(tau)) return finish(s, r, level, q);
        if (abs(delta) <= eps * T(1024) * (b - a) && abs(delta) > abs(last_delta) / 4)
          return finish(s, r, level, q);
        last_delta = delta;
        const T newton = tau - delta;
        if (newton > lo && newton < hi) next = newton;
      }
      if (!(hi - lo > 2 * eps * abs(tau))) return finish(s, r, level, q);
      const T step = next - tau;
      if (abs(step) <= T(min(T(tau - a), T(b - tau)) / T(100000))) {
        const hodograph_sums<T> r_next = rates(next);
        s += (r + r_next) * T(step / (2 * g_));
        r = r_next;
      } else {
        s = inside(a, sa, b, sb, next);
        r = rates(next);
      }
      tau = next;
    }
    return fail(errc::no_convergence, "the crossing did not converge, at tau =", tau);
  }

  // The point at tau from its sums and rates (speed v = g dt/dtau, tan of the inclination
  // sinh(sigma) = dy/dx), with quantity q set to the level it was solved for.
  [[nodiscard]] hodograph_point<T> finish(const hodograph_sums<T>& s, const hodograph_sums<T>& r,
                                          const T& level, T hodograph_sums<T>::*q) const {
    using std::atan;
    hodograph_point<T> p{s.time, s.distance, s.rise, r.time, T(atan(T(r.rise / r.distance)))};
    if (q == &hodograph_sums<T>::rise)
      p.rise = level;
    else if (q == &hodograph_sums<T>::distance)
      p.distance = level;
    else
      p.time = level;
    return p;
  }

 private:
  T g_, v0_, theta0_;
  T e0_{};      // e^sigma0 = sec(theta0) + tan(theta0)
  T ie0_{};     // e^-sigma0
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

// The forms below hold for every c > 0 down to the denormals, where g/c overflows and
// products such as 2 c d or c v0^2/g are denormal (a few significant bits): vt comes from
// square roots taken apart when needed, and each tiny product enters only as 1 + O(it)
// (through e^-x, (1 - e^-x)/x, log(1 + x)/x or atan(x)/x), never as a factor of the answer.
template <Real T>
[[nodiscard]] T vertical_terminal_speed(const T& c, const T& g) {
  using std::sqrt;
  const T q = g / c;
  if (is_finite(q) && q >= std::numeric_limits<T>::min()) return sqrt(q);
  return T(sqrt(g) / sqrt(c));
}
// (1 - e^-x) / x, continuous at 0 (value 1), 0 at infinity; x >= 0.
template <Real T>
[[nodiscard]] T one_minus_exp_over_x(const T& x) {
  return x == T(0) ? T(1) : T(-detail::expm1(T(-x)) / x);
}
// atan(x) / x, continuous at 0 (value 1).
template <Real T>
[[nodiscard]] T atan_over_x(const T& x) {
  using std::atan;
  return x == T(0) ? T(1) : T(atan(x) / x);
}

template <Real T>
[[nodiscard]] vertical_drop<T> vertical_fall(const T& c, const T& g, const T& w0, const T& d) {
  using std::sqrt;
  const T vt = vertical_terminal_speed(c, g);
  const T lambda = 2 * c * d;            // 2 g d / vt^2
  const T k0 = T(w0 / vt) * T(w0 / vt);  // (w0/vt)^2
  // w^2 - w0^2 = (vt^2 - w0^2) (1 - e^-lambda): as 2 g d (1 - k0) (1 - e^-lambda)/lambda
  // while lambda is small (no vt^2, which overflows for denormal c), else directly.
  const T gain = lambda <= T(1) ? T(T(2 * g * d) * (T(1) - k0) * one_minus_exp_over_x(lambda))
                                : T(T(vt - w0) * T(vt + w0) * T(-detail::expm1(T(-lambda))));
  const T w = sqrt(T(w0 * w0 + gain));
  const T dw = gain / T(w + w0);  // w - w0
  // (vt/g) (c d + log1p(dw/(vt + w0))), with (vt/g) c d = d/vt.
  const T time = T(d / vt) + T(vt / g) * T(detail::log1p(T(dw / (vt + w0))));
  return {time, w};
}

// The vertical closed forms' answer, or `invalid_argument` where it leaves T's range.
template <Real T>
[[nodiscard]] result<hodograph_point<T>> vertical_point(const hodograph_point<T>& p) {
  if (!is_finite(p.time) || !is_finite(p.speed) || !is_finite(p.rise))
    return fail(errc::invalid_argument, "the vertical flight leaves the range of T at height", p.rise);
  return p;
}

template <Real T>
[[nodiscard]] result<hodograph_point<T>> vertical_crossing(const T& c, const T& g, const T& v0, bool up,
                                                           const T& rise, side branch, bool apex_only) {
  using std::sqrt;
  const T half_pi = boost::math::constants::half_pi<T>();
  const T vt = vertical_terminal_speed(c, g);
  const T a = v0 / vt;
  const T kappa = a * a;  // c v0^2 / g
  if (!up) {
    if (apex_only || rise == T(0)) return hodograph_point<T>{T(0), T(0), T(0), v0, T(-half_pi)};
    if (rise > T(0)) return fail(errc::never_reaches, "a downward launch never climbs, height", rise);
    if (branch == side::rising)
      return fail(errc::never_reaches, "rising branch starts above that height, by", T(-rise));
    const vertical_drop<T> f = vertical_fall(c, g, v0, T(-rise));
    return vertical_point(hodograph_point<T>{f.time, T(0), rise, f.speed, T(-half_pi)});
  }
  // Apex: height log1p(kappa)/(2c) = v0^2/(2g) log1p(kappa)/kappa after (vt/g) atan(v0/vt)
  // = (v0/g) atan(a)/a.
  const T top = T(v0 * v0 / (2 * g)) * detail::log1p_over_x(kappa);
  const T t_top = T(v0 / g) * atan_over_x(a);
  if (apex_only || rise == top) return vertical_point(hodograph_point<T>{t_top, T(0), top, T(0), T(0)});
  if (rise > top) return fail(errc::never_reaches, "height is above the apex by", T(rise - top));
  if (branch == side::rising) {
    if (rise < T(0)) return fail(errc::never_reaches, "rising branch starts above that height, by", T(-rise));
    if (rise == T(0)) return hodograph_point<T>{T(0), T(0), T(0), v0, half_pi};
    // v0^2 - w^2 = (1 + kappa) vt^2 (1 - e^(-2 c y)) = (1 + kappa) 2 g y (1 - e^-l)/l, l = 2 c y;
    // t = (vt/g)(atan(a) - atan(b)), b = w/vt, summed as atan(x), x = (a - b) / (1 + a b).
    const T drop = T(2 * g * rise) * one_minus_exp_over_x(T(2 * c * rise)) * T(T(1) + kappa);
    const T w2 = v0 * v0 - drop;
    const T w = sqrt(w2 > T(0) ? w2 : T(0));
    const T vx = T(drop / T(v0 + w)) / T(T(1) + a * T(w / vt));  // vt x
    const T x = vx / vt;
    return vertical_point(hodograph_point<T>{T(T(vx / g) * atan_over_x(x)), T(0), rise, w, half_pi});
  }
  const vertical_drop<T> f = vertical_fall(c, g, T(0), T(top - rise));
  return vertical_point(hodograph_point<T>{T(t_top + f.time), T(0), rise, f.speed, T(-half_pi)});
}

/// The fastest launch the hodograph path takes: its rates u v sinh(sigma) reach about v0^2
/// and the Gauss sums add up to twice the largest rate, so v0^2 needs headroom in T
/// (a launch at 1e154 m/s, v0^2 = 0.55 of the largest double, gave a rise of -inf at
/// t = 1e-300 s). sqrt(largest) / 16 leaves a factor 256.
template <Real T>
[[nodiscard]] T hodograph_speed_cap() {
  using std::sqrt;
  return T(sqrt(boost::math::tools::max_value<T>()) / T(16));
}

template <Real T>
[[nodiscard]] status hodograph_check(const T& c, const T& g, const T& v0, const T& theta0) {
  if (!is_finite(c) || !(c > T(0)))
    return fail(errc::invalid_argument, "quadratic drag coefficient must be finite and > 0", c);
  if (!is_finite(g) || !(g > T(0))) return fail(errc::invalid_argument, "gravity must be finite and > 0", g);
  if (!is_finite(v0) || !(v0 > T(0)))
    return fail(errc::invalid_argument, "launch speed must be finite and > 0", v0);
  if (v0 > hodograph_speed_cap<T>())
    return fail(errc::invalid_argument, "launch speed is above the hodograph path's cap sqrt(max)/16; speed", v0);
  using std::abs;
  if (!is_finite(theta0) || abs(theta0) > boost::math::constants::half_pi<T>())
    return fail(errc::invalid_argument, "launch inclination must be in [-pi/2, pi/2]", theta0);
  return {};
}

/// What one query on the hodograph path costs, in integration steps of a solver's budget
/// (`step_pool`): the graded panels start at 1/kappa, kappa = c v0^2/g, so the cost grows
/// with d = log2(kappa). Fitted from above to one run on the development machine (double,
/// at_distance, in Dormand–Prince steps of 0.155 us): 7 at kappa 1, 26 at 1e3, 350 at
/// 1e10, 490 at 1e30, 860 at 1e100, 1850 at 1e300; charged 32 + min(10 d, 300 + 2 d).
template <Real T>
[[nodiscard]] std::int64_t hodograph_query_cost(const T& c, const T& g, const T& v0) {
  using std::log;
  const T kappa = T(c * v0) * T(v0 / g);
  std::int64_t doublings = 1100;  // above the range of double's exponent: the cap
  if (is_finite(kappa) && kappa > T(1)) {
    const T d = log(kappa) / log(T(2));
    if (d < T(1100)) doublings = static_cast<std::int64_t>(static_cast<double>(d)) + 1;
  } else if (is_finite(kappa)) {
    doublings = 0;
  }
  const std::int64_t steep = 10 * doublings;
  const std::int64_t flat = 300 + 2 * doublings;
  return step_pool::fast_query_cost + (steep < flat ? steep : flat);
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
/// [-pi/2, pi/2]. Accuracy, measured against an independent mpmath integration of the
/// equations of motion (tests/data/hodograph_reference.csv, 259 rows, kappa = c v0^2/g from
/// 1e-6 to 1e3, elevations -80..90 deg): at most 2e-15 relative in double, 3e-18 in long
/// double, 9e-7 in float, 5e-25 in 50 digits (the table's own limit).
/// Errors: `invalid_argument` for bad inputs; `no_convergence` if a loop hits its cap.
template <Real T>
[[nodiscard]] result<hodograph_point<T>> hodograph_apex(const T& c, const T& g, const T& v0,
                                                        const T& theta0) {
  if (const status ok = hodograph_check(c, g, v0, theta0); !ok) return unexpected<error>(ok.error());
  if (hodograph_vertical(theta0))
    return vertical_crossing(c, g, v0, theta0 > T(0), T(0), side::falling, true);
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
[[nodiscard]] result<hodograph_point<T>> hodograph_crossing(const T& c, const T& g, const T& v0,
                                                            const T& theta0, const T& rise, side branch) {
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

// The point where a quantity that grows along the whole flight (time or horizontal
// distance) reaches `level` > 0: a search from the launch over apex and descent alike,
// stopped by `max_time`. (The distance tends to a finite limit as the descent turns
// vertical; a distance beyond it is `never_reaches` when the search gets to the end of the
// quadrature's reach first, `time_limit` when max_time comes first.)
template <Real T>
[[nodiscard]] result<hodograph_point<T>> hodograph_search_growing(const T& c, const T& g, const T& v0,
                                                                  const T& theta0, const T& level,
                                                                  T hodograph_sums<T>::*q,
                                                                  const T& max_time) {
  const hodograph_path<T> path(c, g, v0, theta0);
  return path.search(T(0), hodograph_sums<T>(T(0)), level, +1, path.tau_max(), q, max_time);
}

/// Where a flight under a = g - c |v| v in still air first reaches the horizontal distance
/// `distance` [m] > 0 from its launch point. Inputs as for `hodograph_apex`; `max_time`
/// [s] bounds the search.
/// Errors: `invalid_argument` for bad inputs; `never_reaches` for a vertical launch or a
/// distance beyond the horizontal limit of the descent; `time_limit` when the distance is
/// not reached by `max_time`; `no_convergence` if an iteration hits its cap.
template <Real T>
[[nodiscard]] result<hodograph_point<T>> hodograph_at_distance(const T& c, const T& g, const T& v0,
                                                               const T& theta0, const T& distance,
                                                               const T& max_time) {
  if (const status ok = hodograph_check(c, g, v0, theta0); !ok) return unexpected<error>(ok.error());
  if (!is_finite(distance) || !(distance > T(0)))
    return fail(errc::invalid_argument, "distance must be finite and > 0", distance);
  if (hodograph_vertical(theta0))
    return fail(errc::never_reaches, "a vertical shot never moves sideways, distance", distance);
  return hodograph_search_growing(c, g, v0, theta0, distance, &hodograph_sums<T>::distance, max_time);
}

/// The point of a flight under a = g - c |v| v in still air at time `t` [s] > 0 after
/// launch, for a launch that is not vertical (the vertical closed forms are not written
/// for times). Inputs as for `hodograph_apex`.
/// Errors: `invalid_argument` for bad inputs or a vertical launch; `no_convergence` if an
/// iteration hits its cap (or the descent is too deep for T).
template <Real T>
[[nodiscard]] result<hodograph_point<T>> hodograph_at_time(const T& c, const T& g, const T& v0,
                                                           const T& theta0, const T& t) {
  if (const status ok = hodograph_check(c, g, v0, theta0); !ok) return unexpected<error>(ok.error());
  if (!is_finite(t) || !(t > T(0))) return fail(errc::invalid_argument, "time must be finite and > 0", t);
  if (hodograph_vertical(theta0))
    return fail(errc::invalid_argument, "times along a vertical shot are not on the hodograph path");
  return hodograph_search_growing(c, g, v0, theta0, t, &hodograph_sums<T>::time, t);
}

/// The launch elevation [rad] at speed v0 [m/s] whose flight under a = g - c |v| v in still
/// air passes the point `distance` [m] > 0 away and `rise` [m] up, by Newton's method from
/// `guess` on both the elevation theta and the inverse Gudermannian sigma_e of the path
/// inclination at that point: one quadrature from the launch to sigma_e per iteration, and
/// no search for the distance. The Jacobian is exact. With x, y = integrals of
/// (u v, u v sinh sigma)/g over sigma from sigma_e to sigma0 (tau = sigma0 - sigma) and
/// u^-2 = (v0 cos theta)^-2 + (c/g) (f(sigma0) - f(sigma)) (see hodograph_path), only
/// sigma0 = asinh(tan theta) and u depend on theta, and d(u^-2)/dtheta is the same K =
/// 2 (sin(theta)/v0^2 + c/g) / cos^3(theta) at every sigma, so that
///   dx/dtheta = v0^2/g - K x4,  dy/dtheta = v0^2 tan(theta)/g - K y4
/// (x4, y4: the integrals with an extra u^2), and d(x, y)/dsigma_e = -(u v, u v sinh)/g there.
/// `inclination_guess` [rad] is the path inclination at the point for the guessed
/// elevation, if known (a trial flight's); else the vacuum one is taken.
/// Converges to the root nearest the guess (flat or lofted); the caller checks which. Also
/// gives the slope there of the height at the point's distance with respect to the elevation,
/// dy/dtheta - tan(phi) dx/dtheta [m/rad] (from the last Jacobian), and the flight at the
/// point from one more quadrature at the final iterate.
/// Errors: `no_convergence` when the iteration leaves the launch directions, the Jacobian
/// is singular (the edge of reach) or the cap of `max_iterations` is hit.
template <Real T>
struct hodograph_aim_root {
  T elevation;                ///< [rad]
  T slope;                    ///< d(height at the distance)/d(elevation) [m/rad]
  hodograph_point<T> arrival;  ///< the flight at the point, from the final elevation
};

template <Real T>
[[nodiscard]] result<hodograph_aim_root<T>> hodograph_aim(
    const T& c, const T& g, const T& v0, const T& distance, const T& rise, const T& guess,
    const std::optional<T>& inclination_guess = std::nullopt, int max_iterations = 40) {
  using std::abs;
  using std::cos;
  using std::ldexp;
  using std::sin;
  using std::tan;
  if (const status ok = hodograph_check(c, g, v0, guess); !ok) return unexpected<error>(ok.error());
  if (!is_finite(distance) || !(distance > T(0)) || !is_finite(rise))
    return fail(errc::invalid_argument, "aim point must be finite and away from the vertical", distance);
  const T half_pi = boost::math::constants::half_pi<T>();
  const T small = ldexp(T(1), -std::numeric_limits<T>::digits / 2) / 16;
  T theta = guess;
  // Without a known inclination at the point, the vacuum one:
  // tan(phi) = tan(theta) - g x / (v0 cos theta)^2.
  const T slope = inclination_guess ? T(tan(*inclination_guess))
                                    : T(tan(theta) - g * distance / T(v0 * v0 * cos(theta) * cos(theta)));
  T sigma_e = boost::math::asinh(slope, no_throw_policy{});
  for (int i = 0; i < max_iterations; ++i) {
    if (hodograph_vertical(theta)) break;
    const hodograph_path<T> path(c, g, v0, theta);
    T tau_e = path.sigma0() - sigma_e;
    if (tau_e < T(0)) tau_e = T(0);
    if (tau_e > path.tau_max()) break;
    const result<typename hodograph_path<T>::aim_sums> s = path.aim_sums_to(tau_e);
    if (!s) return unexpected<error>(s.error());
    const hodograph_sums<T> r = hodograph_path<T>::rates(path.at(tau_e));
    const T rx = r.distance / g;
    const T ry = r.rise / g;
    const T cos0 = cos(theta);
    const T k = 2 * T(sin(theta) / (v0 * v0) + c / g) / T(cos0 * cos0 * cos0);
    const T x_theta = v0 * v0 / g - k * s->x4;
    const T y_theta = T(v0 * v0 / g) * tan(theta) - k * s->y4;
    const T f1 = s->s.distance - distance;
    const T f2 = s->s.rise - rise;
    const T det = y_theta * rx - x_theta * ry;
    if (!is_finite(det) || det == T(0)) break;
    const T d_theta = (rx * f2 - f1 * ry) / det;  // J (d_theta, d_sigma) = (f1, f2)
    const T d_sigma = (x_theta * f2 - y_theta * f1) / det;
    // Damped far from the root: at most 0.2 rad of elevation and 1 of sigma per step.
    T damp(1);
    if (abs(d_theta) > T(1) / T(5)) damp = T(1) / T(5) / abs(d_theta);
    if (abs(d_sigma) * damp > T(1)) damp = T(1) / abs(d_sigma);
    theta -= damp * d_theta;
    sigma_e -= damp * d_sigma;
    if (!(abs(theta) < half_pi)) break;
    // A full step this small leaves an error of order its square: converged.
    if (damp == T(1) && abs(d_theta) <= small * (T(1) + abs(theta)) &&
        abs(d_sigma) <= small * (T(1) + abs(sigma_e))) {
      if (hodograph_vertical(theta)) break;
      const hodograph_path<T> end(c, g, v0, theta);
      const T tau_end = end.sigma0() - sigma_e;
      if (!(tau_end >= T(0) && tau_end <= end.tau_max())) break;
      const result<typename hodograph_path<T>::aim_sums> e = end.aim_sums_to(tau_end, false);
      if (!e) return unexpected<error>(e.error());
      return hodograph_aim_root<T>{theta, T(det / rx), end.point(tau_end, e->s)};
    }
  }
  return fail(errc::no_convergence, "hodograph aim did not converge from elevation", guess);
}

}  // namespace lob::detail
