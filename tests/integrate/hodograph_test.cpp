// The hodograph fast path for quadratic drag in still air (lob/integrate/hodograph.hpp):
// against the independent mpmath reference, the closed forms of vertical flight, facts of
// the trade, and its error values.
#include "lob/integrate/hodograph.hpp"

#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/math/constants/constants.hpp>
#include <boost/multiprecision/cpp_bin_float.hpp>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <optional>
#include <random>
#include <sstream>
#include <string>
#include <type_traits>
#include <vector>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;
using lob::side;
using lob::detail::hodograph_apex;
using lob::detail::hodograph_crossing;
using lob::detail::hodograph_point;

namespace {

// A decimal string at the full precision of T (strtod and friends round correctly).
template <class T>
T parse(const std::string& text) {
  if constexpr (std::is_same_v<T, float>)
    return std::strtof(text.c_str(), nullptr);
  else if constexpr (std::is_same_v<T, double>)
    return std::strtod(text.c_str(), nullptr);
  else if constexpr (std::is_same_v<T, long double>)
    return std::strtold(text.c_str(), nullptr);
  else
    return T(text);
}

// One row of tests/data/hodograph_reference.csv (written by scripts/hodograph_reference.py:
// Taylor-series integration of the Cartesian equations of motion in mpmath, 30 and 36
// digits agreeing to 1e-26).
struct reference_row {
  std::vector<std::string> f;
  [[nodiscard]] const std::string& operator[](std::size_t i) const { return f[i]; }
  [[nodiscard]] bool has_rise() const { return f[9] != "nan"; }
};

enum col : std::size_t {
  v0,
  theta,
  c,
  g,
  h,
  t_apex,
  x_apex,
  y_apex,
  v_apex,
  t_rise,
  x_rise,
  v_rise,
  t_land,
  x_land,
  v_land,
  phi_land
};

std::vector<reference_row> reference() {
  std::ifstream in(LOB_TEST_DATA_DIR "/hodograph_reference.csv");
  std::vector<reference_row> rows;
  std::string line;
  bool header = true;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    if (header) {
      header = false;
      continue;
    }
    reference_row r;
    std::stringstream ss(line);
    std::string cell;
    while (std::getline(ss, cell, ',')) r.f.push_back(cell);
    if (r.f.size() == 16) rows.push_back(r);
  }
  return rows;
}

// Relative error of `value` against the decimal reference, judged in T's own arithmetic
// (the reference parsed at T's precision is exact to T's rounding). `floor` keeps values
// that are near 0 in the reference (the distance of an exactly vertical shot) from being
// judged relative to nothing.
template <class T>
double rel_err(const T& value, const std::string& ref, const T& floor = T(0)) {
  using std::abs;
  const T r = parse<T>(ref);
  T scale = abs(r);
  if (scale < floor) scale = floor;
  if (scale == T(0)) return static_cast<double>(abs(value));
  return static_cast<double>(T(abs(T(value - r)) / scale));
}

template <class T>
struct tolerance;
// Measured maxima over the table (reported by the MESSAGE of each case): float 1.2e-6,
// double 1.2e-14 (landing speed; 4e-15 otherwise), long double 3e-18, 50 digits 5e-25 (the table carries 25
// digits). The bounds: the required 1e-13 for double, a few times the measured maxima for the others.
template <>
struct tolerance<float> {
  static constexpr double value = 4e-6;
};
template <>
struct tolerance<double> {
  static constexpr double value = 1e-13;
};
template <>
struct tolerance<long double> {
  static constexpr double value = 2e-17;
};
#if LOB_TEST_WIDE
template <>
struct tolerance<mp50> {
  static constexpr double value = 1e-23;
};
#endif

template <class T>
T pi_half() {
  return boost::math::constants::half_pi<T>();
}

}  // namespace

// The node loops' series, against the standard library's expm1 and sinh (std, correctly
// rounded to within an ulp or so: from memory of glibc's documented accuracy).
TEST_CASE_TEMPLATE("the vectorised series for e^x - 1 and sinh agree with std", T, float, double,
                   long double) {
  using arr = Eigen::Array<T, 64, 1>;
  arr x;
  for (int i = 0; i < 64; ++i) x(i) = T(i) / T(63) * (i % 2 ? T(1) : T(1) / T(1000));  // [0, 1] and near 0
  const arr e = lob::detail::expm1_unit(x);
  arr y = x - T(1) / T(2);  // sinh_small's domain, |y| < 1/2
  const arr sh = lob::detail::sinh_small(y);
  double worst_e = 0, worst_s = 0;
  for (int i = 0; i < 64; ++i) {
    if (x(i) > T(0)) worst_e = std::max(worst_e, double(std::abs(e(i) / std::expm1(x(i)) - 1)));
    if (y(i) != T(0)) worst_s = std::max(worst_s, double(std::abs(sh(i) / std::sinh(y(i)) - 1)));
  }
  const double eps = std::numeric_limits<T>::epsilon();
  CHECK(worst_e <= 4 * eps);
  CHECK(worst_s <= 4 * eps);
  MESSAGE("worst relative difference in ulps: e^x - 1 ", worst_e / eps, ", sinh ", worst_s / eps);
}

TEST_CASE("the reference table is there and covers the intended ranges") {
  const std::vector<reference_row> rows = reference();
  REQUIRE(rows.size() >= 150);
  double kmin = 1e300, kmax = 0, emin = 1e300, emax = -1e300;
  bool above = false, below = false;
  for (const reference_row& r : rows) {
    const double c = std::strtod(r[col::c].c_str(), nullptr), v = std::strtod(r[col::v0].c_str(), nullptr);
    const double k = c * v * v / 9.80665;
    const double e = std::strtod(r[col::theta].c_str(), nullptr) * 180 / 3.14159265358979323846;
    kmin = std::min(kmin, k);
    kmax = std::max(kmax, k);
    emin = std::min(emin, e);
    emax = std::max(emax, e);
    const double hh = std::strtod(r[col::h].c_str(), nullptr);
    above = above || hh > 0;
    below = below || hh < 0;
  }
  CHECK(kmin <= 2e-6);
  CHECK(kmax >= 5e2);
  CHECK(emin <= -79.9);
  CHECK(emax >= 89.99);
  CHECK(above);
  CHECK(below);
}

TEST_CASE_TEMPLATE("apex, crossings and landing match the mpmath reference", T, float, double, long double
                   LOB_AND_WIDE(mp50)) {
  const std::vector<reference_row> rows = reference();
  REQUIRE(!rows.empty());
  double worst[6] = {0, 0, 0,
                     0, 0, 0};  // apex height, apex time, landing time, range, landing speed, rising time
  int checked = 0;
  for (const reference_row& r : rows) {
    const T c = parse<T>(r[col::c]), g = parse<T>(r[col::g]), v = parse<T>(r[col::v0]);
    const T th = parse<T>(r[col::theta]), hh = parse<T>(r[col::h]);
    const double elevation = std::strtod(r[col::theta].c_str(), nullptr) * 180 / 3.14159265358979323846;
    // A float launch inclination is the reference's rounded to 24 bits: near the vertical
    // the horizontal distance is too sensitive to it (relative 1e-7 times tan theta) for a
    // comparison to judge the method, so float is judged up to 80 degrees.
    if (std::is_same_v<T, float> && elevation > 80.5) continue;
    using std::abs;
    using std::fmin;
    const T length = fmin(static_cast<double>(v * v / g), static_cast<double>(T(1) / c));
    // The launch at the double nearest to pi/2 is, in double, taken as exactly vertical
    // (distance 0); the reference's distance there is below 1e-13 of the flight's length.
    const bool vertical = th == pi_half<T>();
    const T floor = vertical ? T(length * T(1e-13) / T(tolerance<T>::value)) : T(0);
    const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, th);
    const lob::result<hodograph_point<T>> l = hodograph_crossing(c, g, v, th, hh, side::falling);
    REQUIRE_MESSAGE(a.has_value(), r[col::theta], " ", r[col::c]);
    REQUIRE_MESSAGE(l.has_value(), r[col::theta], " ", r[col::c], " ", r[col::h], " ", l.error().message());
    const double e[5] = {rel_err(a->rise, r[col::y_apex]), rel_err(a->time, r[col::t_apex]),
                         rel_err(l->time, r[col::t_land]), rel_err(l->distance, r[col::x_land], floor),
                         rel_err(l->speed, r[col::v_land])};
    for (int i = 0; i < 5; ++i) {
      worst[i] = std::max(worst[i], e[i]);
      CHECK_MESSAGE(e[i] <= tolerance<T>::value, "quantity ", i, " theta ", r[col::theta], " c ", r[col::c],
                    " h ", r[col::h], " err ", e[i]);
    }
    CHECK(rel_err(l->inclination, r[col::phi_land]) <= tolerance<T>::value * 10);
    CHECK(rel_err(a->distance, r[col::x_apex], floor) <= tolerance<T>::value * 10);
    if (r.has_rise()) {
      const lob::result<hodograph_point<T>> up = hodograph_crossing(c, g, v, th, hh, side::rising);
      REQUIRE(up.has_value());
      const double er =
          std::max({rel_err(up->time, r[col::t_rise]), rel_err(up->distance, r[col::x_rise], floor),
                    rel_err(up->speed, r[col::v_rise])});
      worst[5] = std::max(worst[5], er);
      CHECK_MESSAGE(er <= tolerance<T>::value, "rising crossing, theta ", r[col::theta], " err ", er);
    }
    ++checked;
  }
  CHECK(checked > 100);
  MESSAGE("max rel err: apex height ", worst[0], ", apex time ", worst[1], ", landing time ", worst[2],
          ", range ", worst[3], ", landing speed ", worst[4], ", rising crossing ", worst[5]);
}

// The closed forms below cancel in places (log(1 + x) for small x, atanh near 1), so they
// are evaluated in a wider type: 50 digits for the built-in types, 100 for the 50-digit one.
template <class T>
using wider = std::conditional_t<std::is_same_v<T, mp50>, boost::multiprecision::cpp_bin_float_100, mp50>;

template <class T>
double rel(const T& value, const wider<T>& ref) {
  using std::abs;
  return static_cast<double>(abs(wider<T>(wider<T>(value) / ref - 1)));
}

// Vertical motion under quadratic drag in closed form, with vt = sqrt(g/c): time to the top
// (vt/g) atan(v0/vt), maximum height (vt^2/2g) ln(1 + v0^2/vt^2), speed after falling for t
// from rest vt tanh(g t/vt) (Timmerman & van der Weele, Am. J. Phys. 67 (1999)); on the way
// up w^2 = (vt^2 + v0^2) exp(-2 g y/vt^2) - vt^2 and on the way down from rest
// v^2 = vt^2 (1 - exp(-2 g d/vt^2)) (both from v dv/dy = -(g +- c v^2), same source).
TEST_CASE_TEMPLATE("an exactly vertical shot follows the closed forms of vertical flight", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  using R = wider<T>;
  using std::atan;
  using std::exp;
  using std::log;
  using std::sqrt;
  using std::tanh;
  const double tol = 64 * static_cast<double>(std::numeric_limits<T>::epsilon());
  const T g = lob::standard_gravity<T>();
  for (const T& c : {T(1) / T(1000), T(9) / T(1000), T(1) / T(4)}) {
    for (const T& v : {T(5), T(40), T(300)}) {
      const R C(c), G(g), V(v);
      const R vt = sqrt(R(G / C));
      const R t_top = vt / G * atan(R(V / vt));
      const R top = vt * vt / (2 * G) * log(R(1 + V * V / (vt * vt)));
      const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, pi_half<T>());
      REQUIRE(a.has_value());
      CHECK(rel(a->time, t_top) <= tol);
      CHECK(rel(a->rise, top) <= tol);
      CHECK(a->speed == T(0));
      CHECK(a->distance == T(0));
      const lob::result<hodograph_point<T>> l =
          hodograph_crossing(c, g, v, pi_half<T>(), T(0), side::falling);
      REQUIRE(l.has_value());
      CHECK(rel(l->speed, R(vt * tanh(R(G * R(R(l->time) - R(a->time)) / vt)))) <= tol);
      CHECK(l->inclination == -pi_half<T>());
      const T half = T(a->rise / 2);
      const lob::result<hodograph_point<T>> m =
          hodograph_crossing(c, g, v, pi_half<T>(), half, side::falling);
      REQUIRE(m.has_value());
      const R d = R(a->rise) - R(half);
      const R vm = vt * sqrt(R(1 - exp(R(-2 * G * d / (vt * vt)))));
      CHECK(rel(m->speed, vm) <= tol);
      CHECK(rel(m->speed, R(vt * tanh(R(G * R(R(m->time) - R(a->time)) / vt)))) <= tol);
      const lob::result<hodograph_point<T>> u = hodograph_crossing(c, g, v, pi_half<T>(), half, side::rising);
      REQUIRE(u.has_value());
      const R wu = sqrt(R((vt * vt + V * V) * exp(R(-2 * G * R(half) / (vt * vt))) - vt * vt));
      CHECK(rel(u->speed, wu) <= tol);
      CHECK(rel(u->time, R(vt / G * (atan(R(V / vt)) - atan(R(wu / vt))))) <= tol);
    }
  }
}

TEST_CASE_TEMPLATE("a vertical downward throw follows the closed form of the fall", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  using R = wider<T>;
  using std::atanh;
  using std::exp;
  using std::sqrt;
  const double tol = 64 * static_cast<double>(std::numeric_limits<T>::epsilon());
  const T g = lob::standard_gravity<T>();
  const T c = T(1) / T(100);
  const R C(c), G(g);
  const R vt = sqrt(R(G / C));
  // Slower and faster than the terminal speed: vt^2 - v^2 = (vt^2 - v0^2) exp(-2 g d / vt^2)
  // (from v dv/dd = g - c v^2), time from the atanh (v0 < vt) or acoth (v0 > vt) of the
  // speeds (Timmerman & van der Weele, Am. J. Phys. 67 (1999)).
  for (const T& v : {T(3), T(60)}) {
    const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, T(-pi_half<T>()));
    REQUIRE(a.has_value());
    CHECK(a->time == T(0));
    CHECK(a->speed == v);
    const lob::result<hodograph_point<T>> l =
        hodograph_crossing(c, g, v, T(-pi_half<T>()), T(-50), side::falling);
    REQUIRE(l.has_value());
    const R V(v);
    const R w = sqrt(R(vt * vt - (vt * vt - V * V) * exp(R(-2 * G * 50 / (vt * vt)))));
    CHECK(rel(l->speed, w) <= tol);
    const R t = V < vt ? R(vt / G * (atanh(R(w / vt)) - atanh(R(V / vt))))
                       : R(vt / G * (atanh(R(vt / w)) - atanh(R(vt / V))));
    CHECK(rel(l->time, t) <= tol);
  }
}

TEST_CASE_TEMPLATE("a near-vertical shot approaches the vertical closed forms", T, double, long double
                   LOB_AND_WIDE(mp50)) {
  using std::abs;
  using std::sqrt;
  const T g = lob::standard_gravity<T>();
  const T c = T(9) / T(1000);
  const T v = T(40);
  const lob::result<hodograph_point<T>> av = hodograph_apex(c, g, v, pi_half<T>());
  const lob::result<hodograph_point<T>> lv = hodograph_crossing(c, g, v, pi_half<T>(), T(0), side::falling);
  REQUIRE(av.has_value());
  REQUIRE(lv.has_value());
  T previous_distance(0);
  T previous_delta(0);
  wider<T> previous_gap(0);
  for (int k = 3; k <= 12; k += 3) {
    // theta = pi/2 - 10^-k: time, height and speed differ from vertical by O(10^-2k); the
    // distance is O(10^-k) and proportional to the actual gap pi/2 - theta (measured in a
    // wider type, since theta itself is rounded to T).
    T delta(1);
    for (int i = 0; i < k; ++i) delta /= T(10);
    const T th = pi_half<T>() - delta;
    const wider<T> gap = boost::math::constants::half_pi<wider<T>>() - wider<T>(th);
    const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, th);
    const lob::result<hodograph_point<T>> l = hodograph_crossing(c, g, v, th, T(0), side::falling);
    REQUIRE(a.has_value());
    REQUIRE(l.has_value());
    const T close = 10 * delta * delta + 64 * std::numeric_limits<T>::epsilon();
    CHECK(abs(T(a->rise / av->rise - 1)) <= close);
    CHECK(abs(T(a->time / av->time - 1)) <= close);
    CHECK(abs(T(l->time / lv->time - 1)) <= close);
    CHECK(abs(T(l->speed / lv->speed - 1)) <= close);
    CHECK(l->distance > T(0));
    if (k > 3) {
      const wider<T> scaling = wider<T>(previous_distance) / wider<T>(l->distance) / (previous_gap / gap);
      CHECK(rel(T(1), scaling) <= static_cast<double>(100 * previous_delta) +
                                      64 * static_cast<double>(std::numeric_limits<T>::epsilon()));
    }
    previous_distance = l->distance;
    previous_delta = delta;
    previous_gap = gap;
  }
}

TEST_CASE_TEMPLATE("a vanishing drag gives the vacuum flight", T, float, double, long double LOB_AND_WIDE(mp50)) {
  using std::abs;
  using std::cos;
  using std::sin;
  const T g = lob::standard_gravity<T>();
  const T v = T(30);
  const T th = lob::deg(T(40));
  const T c = T(1) / T(1000000000);  // kappa ~ 1e-7: drag effects of relative order 1e-7
  const lob::result<hodograph_point<T>> l = hodograph_crossing(c, g, v, th, T(0), side::falling);
  REQUIRE(l.has_value());
  // Vacuum: range v^2 sin(2 theta) / g, time 2 v sin(theta) / g (common practice).
  const T tol = T(1) / T(1000000) + 64 * std::numeric_limits<T>::epsilon();
  CHECK(abs(T(l->distance / (v * v * sin(T(2 * th)) / g) - 1)) <= tol);
  CHECK(abs(T(l->time / (2 * v * sin(th) / g) - 1)) <= tol);
  // Drag never lengthens the range. Here it shortens it by about 1e-7 relative, which
  // float (epsilon 1.2e-7) cannot resolve: there the range may round to the vacuum value.
  const T vacuum_range = v * v * sin(T(2 * th)) / g;
  if (std::numeric_limits<T>::digits > 24)
    CHECK(l->distance < vacuum_range);
  else
    CHECK(l->distance <= vacuum_range * (1 + 4 * std::numeric_limits<T>::epsilon()));
}

TEST_CASE("the descent takes longer than the ascent (common practice)") {
  std::mt19937 gen(20261201);
  std::uniform_real_distribution<double> kappa_log(-4, 3), elevation(5, 89), speed(5, 120);
  const double g = 9.80665;
  for (int i = 0; i < 200; ++i) {
    const double v = speed(gen), k = std::pow(10.0, kappa_log(gen)), c = k * g / (v * v);
    const double th = lob::deg(elevation(gen));
    const lob::result<hodograph_point<double>> a = hodograph_apex(c, g, v, th);
    const lob::result<hodograph_point<double>> l = hodograph_crossing(c, g, v, th, 0.0, side::falling);
    REQUIRE(a.has_value());
    REQUIRE(l.has_value());
    CHECK(l->time - a->time > a->time);
    CHECK(l->distance - a->distance < a->distance);  // the descent is the steeper half
    CHECK(l->speed < v);                             // and lands slower than launched
    CHECK(l->inclination < -th);                     // at a steeper angle
  }
}

TEST_CASE("the farthest elevation on level ground is below 45 degrees under drag (common practice)") {
  const double g = 9.80665;
  for (const double k : {0.05, 1.5, 20.0}) {
    const double v = 40, c = k * g / (v * v);
    double best = 0, best_range = -1;
    for (int e = 300; e <= 500; ++e) {  // tenths of a degree, 30 to 50 degrees
      const lob::result<hodograph_point<double>> l =
          hodograph_crossing(c, g, v, lob::deg(e / 10.0), 0.0, side::falling);
      REQUIRE(l.has_value());
      if (l->distance > best_range) {
        best_range = l->distance;
        best = e / 10.0;
      }
    }
    CHECK(best < 45.0);
    CHECK(best > 30.0);
  }
}

TEST_CASE_TEMPLATE("the rising crossing comes before the apex and the falling one after", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  const T g = lob::standard_gravity<T>();
  const T c = T(1) / T(100), v = T(35), th = lob::deg(T(50));
  const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, th);
  REQUIRE(a.has_value());
  const T hh = a->rise / 3;
  const lob::result<hodograph_point<T>> up = hodograph_crossing(c, g, v, th, hh, side::rising);
  const lob::result<hodograph_point<T>> down = hodograph_crossing(c, g, v, th, hh, side::falling);
  REQUIRE(up.has_value());
  REQUIRE(down.has_value());
  CHECK(up->time < a->time);
  CHECK(a->time < down->time);
  CHECK(up->distance < a->distance);
  CHECK(up->inclination > T(0));
  CHECK(down->inclination < T(0));
  CHECK(up->rise == hh);
  CHECK(down->rise == hh);
  // Exactly at the apex height both branches meet at the apex.
  const lob::result<hodograph_point<T>> top = hodograph_crossing(c, g, v, th, a->rise, side::rising);
  REQUIRE(top.has_value());
  CHECK(top->time == a->time);
  CHECK(top->inclination == T(0));
  // At the launch height the rising crossing is the launch itself.
  const lob::result<hodograph_point<T>> start = hodograph_crossing(c, g, v, th, T(0), side::rising);
  REQUIRE(start.has_value());
  CHECK(start->time == T(0));
  CHECK(start->speed == v);
}

TEST_CASE_TEMPLATE("a level or downward launch has its apex at the launch point", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  const T g = lob::standard_gravity<T>();
  const T c = T(1) / T(50), v = T(20);
  for (const T& th : {T(0), lob::deg(T(-30)), lob::deg(T(-80))}) {
    const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, th);
    REQUIRE(a.has_value());
    CHECK(a->time == T(0));
    CHECK(a->distance == T(0));
    CHECK(a->rise == T(0));
    CHECK(a->speed == v);
    CHECK(a->inclination == th);
    const lob::result<hodograph_point<T>> l = hodograph_crossing(c, g, v, th, T(-10), side::falling);
    REQUIRE(l.has_value());
    CHECK(l->time > T(0));
    CHECK(l->inclination < th);
    const lob::result<hodograph_point<T>> up = hodograph_crossing(c, g, v, th, T(1), side::falling);
    REQUIRE_FALSE(up.has_value());
    CHECK(up.error() == lob::errc::never_reaches);
  }
}

TEST_CASE_TEMPLATE("bad inputs and unreachable heights are error values", T, float, double, long double
                   LOB_AND_WIDE(mp50)) {
  const T g = lob::standard_gravity<T>();
  const T c = T(1) / T(100), v = T(30), th = lob::deg(T(45));
  const T nan = std::numeric_limits<T>::quiet_NaN();
  const T inf = std::numeric_limits<T>::infinity();
  const auto code = [](const lob::result<hodograph_point<T>>& r) {
    return r ? lob::errc{} : r.error().code();
  };
  for (const T& bad : {T(0), T(-1), nan, inf}) {
    CHECK(code(hodograph_apex(bad, g, v, th)) == lob::errc::invalid_argument);
    CHECK(code(hodograph_apex(c, bad, v, th)) == lob::errc::invalid_argument);
    CHECK(code(hodograph_apex(c, g, bad, th)) == lob::errc::invalid_argument);
    CHECK(code(hodograph_crossing(bad, g, v, th, T(0), side::falling)) == lob::errc::invalid_argument);
  }
  CHECK(code(hodograph_apex(c, g, v, nan)) == lob::errc::invalid_argument);
  CHECK(code(hodograph_apex(c, g, v, T(2))) == lob::errc::invalid_argument);
  CHECK(code(hodograph_apex(c, g, v, T(-2))) == lob::errc::invalid_argument);
  CHECK(code(hodograph_crossing(c, g, v, th, nan, side::falling)) == lob::errc::invalid_argument);
  CHECK(code(hodograph_crossing(c, g, v, th, inf, side::falling)) == lob::errc::invalid_argument);
  const lob::result<hodograph_point<T>> a = hodograph_apex(c, g, v, th);
  REQUIRE(a.has_value());
  CHECK(code(hodograph_crossing(c, g, v, th, T(a->rise * 2), side::falling)) == lob::errc::never_reaches);
  CHECK(code(hodograph_crossing(c, g, v, th, T(a->rise * 2), side::rising)) == lob::errc::never_reaches);
  CHECK(code(hodograph_crossing(c, g, v, th, T(-1), side::rising)) == lob::errc::never_reaches);
  CHECK(code(hodograph_crossing(c, g, v, pi_half<T>(), T(1000), side::falling)) == lob::errc::never_reaches);
  CHECK(code(hodograph_crossing(c, g, v, pi_half<T>(), T(-1), side::rising)) == lob::errc::never_reaches);
  const lob::result<hodograph_point<T>> e = hodograph_apex(T(0), g, v, th);
  REQUIRE_FALSE(e.has_value());
  CHECK(std::string(e.error().message()).find("coefficient") != std::string::npos);
}

TEST_CASE("a descent too deep for float is an error, not an overflow") {
  // float: e^(2 tau) would overflow beyond tau ~ 40, about 40/c below the apex.
  const float c = 0.5f, g = 9.80665f, v = 10.0f;
  const lob::result<hodograph_point<float>> l = hodograph_crossing(c, g, v, 0.5f, -200.0f, side::falling);
  REQUIRE_FALSE(l.has_value());
  CHECK(l.error() == lob::errc::no_convergence);
  // while double goes on (to about 320/c): the fall ends at the terminal speed sqrt(g/c)
  const lob::result<hodograph_point<double>> d =
      hodograph_crossing(0.5, 9.80665, 10.0, 0.5, -200.0, side::falling);
  REQUIRE(d.has_value());
  CHECK(d->speed == doctest::Approx(std::sqrt(9.80665 / 0.5)).epsilon(1e-12));
}

// A reference row's landing point in T, for the tests that reach it by its distance:
// rows whose launch or landing is (near-)vertical are left out (there the distance hardly
// moves), as are rows that land at the launch point.
template <class T>
struct landing_row {
  T c, g, v, theta, height, distance;
  double length;  // the flight's size: max(landing distance, |apex height|) [m]
};
template <class T>
std::optional<landing_row<T>> landing_of(const reference_row& r) {
  const double th_d = std::strtod(r[col::theta].c_str(), nullptr);
  const double phi = std::strtod(r[col::phi_land].c_str(), nullptr);
  if (std::abs(th_d) > 1.5 || phi < -1.5) return std::nullopt;
  landing_row<T> l{parse<T>(r[col::c]),     parse<T>(r[col::g]), parse<T>(r[col::v0]),
                   parse<T>(r[col::theta]), parse<T>(r[col::h]), parse<T>(r[col::x_land]), 0.0};
  if (!(l.distance > T(0))) return std::nullopt;
  l.length = std::fmax(std::strtod(r[col::x_land].c_str(), nullptr),
                       std::abs(std::strtod(r[col::y_apex].c_str(), nullptr)));
  return l;
}

// The distance search (hodograph_at_distance) against the same mpmath reference: at the
// reference's landing distance the flight must be at the landing height at the landing
// time. The distance given is rounded to T, and near a steep descent time and height are
// sensitive to it (dt = dx / u, dy = tan(phi) dx), so each bound carries that condition
// factor on top of the method's tolerance.
TEST_CASE_TEMPLATE("the points at a distance and at a time match the mpmath reference", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  using lob::detail::hodograph_at_distance;
  const std::vector<reference_row> rows = reference();
  REQUIRE(!rows.empty());
  const T never = T(1000000);
  using lob::detail::hodograph_at_time;
  double worst_time = 0, worst_rise = 0, worst_at_time = 0;
  int checked = 0;
  for (const reference_row& r : rows) {
    const std::optional<landing_row<T>> l = landing_of<T>(r);
    if (!l) continue;
    const auto& [c, g, v, th, hh, x, length] = *l;
    const lob::result<hodograph_point<T>> p = hodograph_at_distance(c, g, v, th, x, never);
    REQUIRE_MESSAGE(p.has_value(), r[col::theta], " ", r[col::c], " ", r[col::h]);
    const double phi = std::strtod(r[col::phi_land].c_str(), nullptr);
    const double xd = std::strtod(r[col::x_land].c_str(), nullptr);
    const double td = std::strtod(r[col::t_land].c_str(), nullptr);
    const double u = std::strtod(r[col::v_land].c_str(), nullptr) * std::cos(phi);
    const double time_factor = 1 + xd / (u * td);
    const double rise_factor = 1 + std::abs(std::tan(phi)) * xd / length;
    const double et = rel_err(p->time, r[col::t_land]) / time_factor;
    const double ey = static_cast<double>(T(abs(T(p->rise - hh)))) / length / rise_factor;
    worst_time = std::max(worst_time, et);
    worst_rise = std::max(worst_rise, ey);
    CHECK_MESSAGE(et <= tolerance<T>::value, "time, theta ", r[col::theta], " c ", r[col::c], " err ", et);
    CHECK_MESSAGE(ey <= tolerance<T>::value, "rise, theta ", r[col::theta], " c ", r[col::c], " err ", ey);
    CHECK(p->distance == x);
    // and at the reference's landing time, the landing point (well conditioned: dx = u dt)
    const lob::result<hodograph_point<T>> q = hodograph_at_time(c, g, v, th, parse<T>(r[col::t_land]));
    REQUIRE(q.has_value());
    const double ex = rel_err(q->distance, r[col::x_land]);
    const double eh = static_cast<double>(T(abs(T(q->rise - hh)))) / length;
    worst_at_time = std::max({worst_at_time, ex, eh});
    CHECK_MESSAGE(ex <= tolerance<T>::value, "distance at time, theta ", r[col::theta], " err ", ex);
    CHECK_MESSAGE(eh <= tolerance<T>::value, "height at time, theta ", r[col::theta], " err ", eh);
    ++checked;
  }
  CHECK(checked > 100);
  MESSAGE("max conditioned rel err at a distance: time ", worst_time, ", height ", worst_rise,
          "; at a time: ", worst_at_time, " (", checked, " rows)");
}

// Aiming on the hodograph: the reference's landing point, aimed at from an elevation
// 0.01 rad off (started as the aim starts it, with the inclination at the point of a trial
// flight at the guess), gives an elevation whose flight passes the point: the row's own
// elevation, or near the edge of reach the other root. Newton's method may fail to
// converge (the aim then falls back to a bracketing search): that must be an error value,
// and rare.
TEST_CASE_TEMPLATE("aiming at a reference point finds a launch elevation through it", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  using lob::detail::hodograph_aim;
  using lob::detail::hodograph_at_distance;
  const std::vector<reference_row> rows = reference();
  REQUIRE(!rows.empty());
  const T never = T(1000000);
  double worst_miss = 0;
  int same = 0, other = 0, failed = 0;
  for (const reference_row& r : rows) {
    const std::optional<landing_row<T>> l = landing_of<T>(r);
    if (!l) continue;
    const auto& [c, g, v, th, hh, x, length] = *l;
    const T guess = th + T(1) / T(100);
    const lob::result<hodograph_point<T>> trial = hodograph_at_distance(c, g, v, guess, x, never);
    const std::optional<T> inclination = trial ? std::optional<T>(trial->inclination) : std::nullopt;
    const lob::result<lob::detail::hodograph_aim_root<T>> a =
        hodograph_aim(c, g, v, x, hh, guess, inclination);
    if (!a) {
      ++failed;
      CHECK(a.error().code() == lob::errc::no_convergence);
      MESSAGE("no convergence: theta ", r[col::theta], " c ", r[col::c], " h ", r[col::h]);
      continue;
    }
    // The miss of the aimed flight at the reference point: two computations, each within
    // the tolerance of the table's point, so within twice that of each other.
    const lob::result<hodograph_point<T>> p = hodograph_at_distance(c, g, v, a->elevation, x, never);
    REQUIRE(p.has_value());
    const double miss = static_cast<double>(T(abs(T(p->rise - hh)))) / length;
    worst_miss = std::max(worst_miss, miss);
    CHECK_MESSAGE(miss <= 2 * tolerance<T>::value, "theta ", r[col::theta], " c ", r[col::c], " miss ", miss);
    (abs(T(a->elevation - th)) < T(1) / T(1000) ? same : other) += 1;
  }
  CHECK(same > 100);
  CHECK(failed * 100 <= same + other + failed);
  MESSAGE("aimed at ", same + other + failed, " reference points: ", same, " gave the row's elevation, ",
          other, " the other root, ", failed, " did not converge; worst miss ", worst_miss);
}

TEST_CASE("the hodograph aim's slope matches a difference quotient of the height at the distance") {
  using lob::detail::hodograph_aim;
  using lob::detail::hodograph_at_distance;
  const double g = 9.80665, c = g / (25.0 * 25.0), v = 35.0;
  for (const double th : {-0.3, 0.2, 0.7, 1.2}) {
    const lob::result<hodograph_point<double>> target = hodograph_at_distance(c, g, v, th, 30.0, 1e6);
    REQUIRE(target.has_value());
    const lob::result<lob::detail::hodograph_aim_root<double>> a =
        hodograph_aim(c, g, v, 30.0, target->rise, th, std::optional<double>(target->inclination));
    REQUIRE(a.has_value());
    CHECK(std::abs(a->elevation - th) < 1e-14);
    const double h = 1e-5;
    const lob::result<hodograph_point<double>> up = hodograph_at_distance(c, g, v, th + h, 30.0, 1e6);
    const lob::result<hodograph_point<double>> down = hodograph_at_distance(c, g, v, th - h, 30.0, 1e6);
    REQUIRE((up && down));
    const double quotient = (up->rise - down->rise) / (2 * h);  // central difference, error ~ h^2
    CHECK(std::abs(a->slope - quotient) <= 1e-7 * std::abs(quotient));
  }
}

TEST_CASE_TEMPLATE("the hodograph aim rejects bad inputs", T, float, double, long double) {
  using lob::detail::hodograph_aim;
  const T g = lob::standard_gravity<T>(), c = T(1) / T(100), v = T(20);
  CHECK(hodograph_aim(c, g, v, T(0), T(1), T(0.5)).error().code() == lob::errc::invalid_argument);
  CHECK(hodograph_aim(c, g, v, T(10), std::numeric_limits<T>::infinity(), T(0.5)).error().code() ==
        lob::errc::invalid_argument);
  CHECK(hodograph_aim(T(-1), g, v, T(10), T(1), T(0.5)).error().code() == lob::errc::invalid_argument);
  // far beyond reach (the vacuum reach of 20 m/s is 41 m): no root, an error value
  CHECK(hodograph_aim(c, g, v, T(500), T(0), T(0.5)).error().code() == lob::errc::no_convergence);
}

TEST_CASE_TEMPLATE("the distance search reports what it cannot reach", T, float, double, long double LOB_AND_WIDE(mp50)) {
  using lob::detail::hodograph_at_distance;
  const T g = lob::standard_gravity<T>();
  const T c = T(1) / T(10), v = T(30), th = lob::deg(T(45));
  const auto code = [](const lob::result<hodograph_point<T>>& r) {
    return r ? lob::errc{} : r.error().code();
  };
  // Under quadratic drag the descent turns vertical and the horizontal distance tends to a
  // finite limit: along the path length s the horizontal speed is u0 e^(-c s) (du/ds = -c u),
  // so 200 m below the launch (over 20/c of path) less than e^-20 of it is left, and what
  // remains to go is below u e^-20 / (c v) < 1e-7 m.
  const lob::result<hodograph_point<T>> deep = hodograph_crossing(c, g, v, th, T(-200), side::falling);
  REQUIRE(deep.has_value());
  // Beyond that limit the search ends at max_time (30 s: 30 g / vt ~ 30 in tau, inside
  // even float's range).
  CHECK(code(hodograph_at_distance(c, g, v, th, T(deep->distance + 1), T(30))) == lob::errc::time_limit);
  // a distance that is reached, but only after max_time
  const lob::result<hodograph_point<T>> far = hodograph_at_distance(c, g, v, th, T(10), T(1000000));
  REQUIRE(far.has_value());
  CHECK(code(hodograph_at_distance(c, g, v, th, T(10), T(far->time / 2))) == lob::errc::time_limit);
  CHECK(code(hodograph_at_distance(c, g, v, pi_half<T>(), T(1), T(1000000))) == lob::errc::never_reaches);
  CHECK(code(hodograph_at_distance(c, g, v, th, T(0), T(1000000))) == lob::errc::invalid_argument);
  CHECK(code(hodograph_at_distance(c, g, v, th, T(-1), T(1000000))) == lob::errc::invalid_argument);
}

// Through fly(): the hodograph path's at_distance in 3-D (launch off the origin, any
// azimuth) against lob's adaptive path at a tight tolerance (a different method: the
// Dormand-Prince integration of the Cartesian equations).
TEST_CASE_TEMPLATE(
    "a flight's states at a distance and a time are the same on the fast and the adaptive path", T, double,
    long double) {
  const lob::quadratic_drag<T> m{.coefficient = T(1) / T(80)};
  const lob::medium<T> air;
  lob::flight_options<T> slow;
  slow.use_fast_paths = false;
  slow.relative_tolerance = T(1) / T(10000000000000LL);  // 1e-13
  slow.absolute_tolerance = T(1) / T(10000000000000LL);
  for (const double elevation : {-30.0, 5.0, 35.0, 70.0, 88.0}) {
    lob::shot<T> s;
    s.position = lob::vec3<T>(T(3), T(-4), T(12));
    s.velocity = lob::launch_velocity(T(40), lob::deg(T(elevation)), lob::deg(T(25)));
    const auto fast = lob::fly(m, air, s);
    const auto ref = lob::fly(m, air, s, slow);
    REQUIRE(fast);
    REQUIRE(ref);
    const lob::result<T> range = fast->range(T(0));
    REQUIRE(range);
    for (const T d : {T(*range / 3), T(*range), T(*range * 1.1)}) {
      const auto a = fast->at_distance(d);
      const auto b = ref->at_distance(d);
      REQUIRE(a);
      REQUIRE(b);
      INFO("elevation ", elevation, " distance ", static_cast<double>(d));
      const T scale = *range + T(12);
      CHECK(static_cast<double>(T((a->position - b->position).norm() / scale)) <= 1e-11);
      CHECK(static_cast<double>(T(abs(T(a->time / b->time - 1)))) <= 1e-11);
      CHECK(static_cast<double>(T((a->velocity - b->velocity).norm() / b->velocity.norm())) <= 1e-11);
      const auto at_a = fast->at(b->time);
      const auto at_b = ref->at(b->time);
      REQUIRE(at_a);
      REQUIRE(at_b);
      CHECK(static_cast<double>(T((at_a->position - at_b->position).norm() / scale)) <= 1e-11);
      CHECK(static_cast<double>(T((at_a->velocity - at_b->velocity).norm() / b->velocity.norm())) <= 1e-11);
    }
  }
}
