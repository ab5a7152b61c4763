// linear_flight against published results, each source named beside its check, and
// the error codes of bad input.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/math/constants/constants.hpp>
#include <boost/math/special_functions/lambert_w.hpp>
#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cmath>
#include <cstring>
#include <limits>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

namespace {

template <class T>
lob::linear_flight<T> still_air(const T& k, const T& speed, const T& elevation_deg, const T& z0 = T(0)) {
  const lob::shot<T> s{lob::vec3<T>(T(0), T(0), z0), lob::launch_velocity(speed, lob::deg(elevation_deg))};
  return lob::linear_flight<T>::make(k, lob::medium<T>{}, s).value();
}

template <class T>
T rel(const T& a, const T& b) {
  using std::abs;
  return T(abs(T(a - b)) / abs(b));
}

bool names(const lob::error& e, const char* text) { return std::strstr(e.message(), text) != nullptr; }

}  // namespace

TEST_CASE_TEMPLATE("vacuum range, flight time and apex height are the textbook formulas", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  // Vacuum on level ground (any mechanics textbook): range v^2 sin(2 theta)/g, flight
  // time 2 v sin(theta)/g, apex height v^2 sin^2(theta)/(2 g); 45 degrees goes farthest.
  using std::sin;
  const T eps = std::numeric_limits<T>::epsilon();
  const T g = lob::standard_gravity<T>();
  for (int el = 5; el <= 85; el += 10) {
    const T v = T(37);
    const T th = lob::deg(T(el));
    const lob::linear_flight<T> f = still_air(T(0), v, T(el));
    CHECK(rel(*f.range(), T(v * v * sin(T(2 * th)) / g)) <= T(16 * eps));
    CHECK(rel(f.landing()->time, T(2 * v * sin(th) / g)) <= T(16 * eps));
    CHECK(rel(*f.max_height(), T(v * v * sin(th) * sin(th) / (2 * g))) <= T(16 * eps));
  }
  const T r45 = *still_air(T(0), T(37), T(45)).range();
  CHECK(*still_air(T(0), T(37), T(44)).range() < r45);
  CHECK(*still_air(T(0), T(37), T(46)).range() < r45);
}

TEST_CASE("the Lambert W flight time and range of Warburton & Wang and Packel & Yuen") {
  // Warburton & Wang, Am. J. Phys. 72 (2004); Packel & Yuen, College Math. J. 35 (2004):
  // on level ground T = (1 + x + W0(-(1 + x) e^-(1 + x)))/k with x = k v sin(theta)/g, and
  // range R = v cos(theta) (1 - e^-kT)/k. Evaluated here in long double where the textbook
  // form is well conditioned (x between 0.05 and 50).
  for (double k : {0.01, 0.1, 0.5, 2.0}) {
    for (double el : {10.0, 30.0, 45.0, 60.0, 80.0}) {
      const double v = 60;
      const lob::linear_flight<double> f = still_air(k, v, el);
      const long double th = static_cast<long double>(lob::deg(el));
      const long double kl = k, gl = 9.80665L, vl = v;
      const long double x = kl * vl * std::sin(th) / gl;
      const long double w = boost::math::lambert_w0(-(1 + x) * std::exp(-(1 + x)));
      const long double t = (1 + x + w) / kl;
      const long double r = vl * std::cos(th) * (1 - std::exp(-kl * t)) / kl;
      CHECK(std::abs(f.landing()->time - static_cast<double>(t)) <= 1e-14 * static_cast<double>(t));
      CHECK(std::abs(*f.range() - static_cast<double>(r)) <= 1e-14 * static_cast<double>(r));
    }
  }
}

TEST_CASE("weak drag follows the first-order expansions of flight time and range") {
  // Marion & Thornton, Classical Dynamics of Particles and Systems, sec. 2.4 (from memory):
  // for small k, T = (2 v sin(theta)/g)(1 - k v sin(theta)/(3 g)) and
  // R = (v^2 sin(2 theta)/g)(1 - 4 k v sin(theta)/(3 g)), each up to O(k^2). The
  // deviation must shrink like x^2 (x = k v sin(theta)/g) for x from 1e-2 down to 1e-7.
  const double v = 50, g = 9.80665;
  for (double el : {15.0, 45.0, 75.0}) {
    const double s = std::sin(lob::deg(el)), c = std::cos(lob::deg(el));
    for (double x = 1e-2; x >= 1e-7; x /= 10) {
      const double k = x * g / (v * s);
      const lob::linear_flight<double> f = still_air(k, v, el);
      const double t1 = 2 * v * s / g * (1 - x / 3);
      const double r1 = 2 * v * v * s * c / g * (1 - 4 * x / 3);
      const double dt = std::abs(f.landing()->time / t1 - 1);
      const double dr = std::abs(*f.range() / r1 - 1);
      CHECK(dt <= 0.5 * x * x + 4e-16);
      CHECK(dr <= 2.0 * x * x + 4e-16);
      CHECK(dt >= 0.01 * x * x);  // the second-order term is really there
    }
  }
}

TEST_CASE("Boost's Lambert W gives the omega constant and -1 at the branch point") {
  // W0(1) = 0.5671432904097838 (the omega constant) and W0(-1/e) = -1 (Corless, Gonnet,
  // Hare, Jeffrey & Knuth, Adv. Comput. Math. 5 (1996)).
  const double omega = boost::math::lambert_w0(1.0, lob::detail::no_throw_policy{});
  CHECK(std::abs(omega - 0.5671432904097838) <= 2e-16);
  const double e = boost::math::constants::e<double>();
  CHECK(std::abs(boost::math::lambert_w0(-1 / e, lob::detail::no_throw_policy{}) + 1) <= 1e-7);
  // The branch-point series lob uses: u(p) = 1 + W(-exp(-p^2/2 - 1)); u(0) = 0 is W = -1
  // exactly, and at |p| = 1/2 (where lob switches to Boost) both ways agree.
  CHECK(lob::detail::branch_ratio(0.0) == 1.0);
  for (double p : {0.5, -0.5, 0.25, -0.1}) {
    const long double z = -std::exp(-static_cast<long double>(p) * p / 2 - 1);
    const long double w = p > 0 ? boost::math::lambert_w0(z) : boost::math::lambert_wm1(z);
    CHECK(std::abs(p * lob::detail::branch_ratio(p) - static_cast<double>(1 + w)) <= 4e-16 * std::abs(p));
  }
}

TEST_CASE("with drag the apex comes earlier and lower, the descent takes longer and the range is shorter") {
  // common practice: one flight of our own (a 28 m/s throw at 50 degrees, k = 0.3/s)
  const lob::linear_flight<double> vac = still_air(0.0, 28.0, 50.0);
  const lob::linear_flight<double> drag = still_air(0.3, 28.0, 50.0);
  CHECK(drag.apex()->time < vac.apex()->time);
  CHECK(*drag.max_height() < *vac.max_height());
  CHECK(drag.landing()->time - drag.apex()->time > drag.apex()->time);
  CHECK(*drag.range() < *vac.range());
  CHECK(lob::speed(*drag.landing()) < 28.0);
  CHECK(lob::path_angle_below_horizon(*drag.landing(), drag.air()) > lob::deg(50.0));  // steeper fall
}

TEST_CASE_TEMPLATE("a vertical shot lands on its launch point", T, float, double, long double LOB_AND_WIDE(mp50)) {
  const T eps = std::numeric_limits<T>::epsilon();
  for (const char* k : {"0", "1e-9", "0.2", "40"}) {
    const lob::shot<T> up{lob::vec3<T>::Zero(), lob::vec3<T>(T(0), T(0), T(20))};
    const lob::linear_flight<T> f = lob::linear_flight<T>::make(T(mp50(k)), lob::medium<T>{}, up).value();
    const lob::result<lob::state<T>> land = f.landing(T(0));
    REQUIRE(land.has_value());
    CHECK(*f.range() == T(0));
    CHECK(land->position.x() == T(0));
    if (std::numeric_limits<T>::digits < 30 && T(mp50(k)) < T(1e-6)) continue;  // below float's resolution
    if (T(mp50(k)) == T(0)) {
      // vacuum: back at the launch speed after 2 v/g (any mechanics textbook)
      CHECK(rel(lob::speed(*land), T(20)) <= T(16 * eps));
      CHECK(rel(land->time, T(40 / lob::standard_gravity<T>())) <= T(16 * eps));
    } else {
      CHECK(lob::speed(*land) < T(20));  // common practice
      CHECK(T(land->time - f.apex()->time) > f.apex()->time);
    }
  }
}

TEST_CASE("a grazing shot lands after about 2 v sin(theta)/g and a level one at once") {
  // Vacuum (any mechanics textbook) and weak drag, elevation 1e-6 degrees.
  const double v = 300, th = lob::deg(1e-6);
  const lob::linear_flight<double> f = still_air(0.0, v, 1e-6);
  CHECK(std::abs(f.landing()->time - 2 * v * std::sin(th) / 9.80665) <= 4e-16 * f.landing()->time);
  const lob::linear_flight<double> level = still_air(0.05, v, 0.0);
  CHECK(level.landing(0.0)->time == 0.0);
  CHECK(level.landing(-1.0)->time > 0.0);
  CHECK(level.crossing(0.0, lob::side::rising)->time == 0.0);
  CHECK(level.crossing(1e-9, lob::side::rising).error() == lob::errc::never_reaches);
}

TEST_CASE("a crosswind drifts the body by w (t - (1 - e^-kt)/k) and does nothing in vacuum") {
  // The explicit solution of a = g - k (v - w) across the shot: y(t) = w (t - (1 - e^-kt)/k)
  // for a launch with no y velocity; in vacuum the air's motion cannot act on the body.
  lob::medium<double> air;
  air.wind = {0.0, 6.0, 0.0};
  const lob::shot<double> s{{0.0, 0.0, 0.0}, {30.0, 0.0, 30.0}};
  for (double k : {1e-6, 0.05, 0.7, 9.0}) {
    const lob::linear_flight<double> f = lob::linear_flight<double>::make(k, air, s).value();
    const lob::state<double> land = *f.landing(0.0);
    const long double t = land.time, kl = k;
    const long double drift = 6.0L * (t + std::expm1(-kl * t) / kl);
    CHECK(std::abs(land.position.y() - static_cast<double>(drift)) <= 1e-13 * static_cast<double>(drift));
    // still-air timing: a crosswind changes nothing along the vertical
    const lob::linear_flight<double> calm =
        lob::linear_flight<double>::make(k, lob::medium<double>{}, s).value();
    CHECK(calm.landing(0.0)->time == doctest::Approx(land.time).epsilon(1e-15));
  }
  const lob::linear_flight<double> vac = lob::linear_flight<double>::make(0.0, air, s).value();
  CHECK(vac.landing(0.0)->position.y() == 0.0);
  // common practice: a headwind shortens the range, a tailwind lengthens it
  lob::medium<double> head, tail;
  head.wind = {-5.0, 0.0, 0.0};
  tail.wind = {5.0, 0.0, 0.0};
  const double calm = *lob::linear_flight<double>::make(0.2, lob::medium<double>{}, s)->range();
  CHECK(*lob::linear_flight<double>::make(0.2, head, s)->range() < calm);
  CHECK(*lob::linear_flight<double>::make(0.2, tail, s)->range() > calm);
}

TEST_CASE("zero drag and vanishing drag meet smoothly") {
  // The landing time at k = 10^-n approaches the vacuum value linearly in k, with no jump
  // at k = 0 and no loss of digits on the way (the textbook form would lose them all).
  const lob::linear_flight<double> vac = still_air(0.0, 80.0, 35.0, 2.0);
  const double t0 = vac.landing(0.0)->time;
  double previous = 1;
  for (int n = 2; n <= 300; n += 2) {
    const double k = std::pow(10.0, -n);
    const double t = still_air(k, 80.0, 35.0, 2.0).landing(0.0)->time;
    const double d = std::abs(t / t0 - 1);
    CHECK(d <= previous);
    CHECK(d <= 2 * k * 80.0 / 9.80665 + 2.3e-16);
    previous = d + 2.3e-16;
  }
}

TEST_CASE("bad input gives a specific error naming the offending value") {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  const lob::shot<double> s{{0, 0, 0}, {10, 0, 10}};
  lob::medium<double> air;
  const auto bad_rate = lob::linear_flight<double>::make(-0.5, air, s);
  REQUIRE_FALSE(bad_rate);
  CHECK(bad_rate.error() == lob::errc::invalid_argument);
  CHECK(names(bad_rate.error(), "got -0.5"));
  CHECK(names(lob::linear_flight<double>::make(nan, air, s).error(), "got nan"));
  CHECK(lob::linear_flight<double>::make(inf, air, s).error() == lob::errc::invalid_argument);
  lob::medium<double> bad_air;
  bad_air.gravity = {0, 0, nan};
  CHECK(lob::linear_flight<double>::make(0.1, bad_air, s).error() == lob::errc::invalid_argument);
  bad_air = {};
  bad_air.wind = {inf, 0, 0};
  CHECK(lob::linear_flight<double>::make(0.1, bad_air, s).error() == lob::errc::invalid_argument);
  CHECK(lob::linear_flight<double>::make(0.1, air, {{nan, 0, 0}, {1, 0, 1}}).error() ==
        lob::errc::invalid_argument);
  CHECK(lob::linear_flight<double>::make(0.1, air, {{0, 0, 0}, {1, nan, 1}}).error() ==
        lob::errc::invalid_argument);
  // fly() checks the model the same way
  CHECK(lob::fly(lob::linear_drag<double>{-1.0}, air, s).error() == lob::errc::invalid_argument);
  CHECK(lob::linear_drag<double>::from_terminal_speed(0.0).error() == lob::errc::invalid_argument);
  CHECK(names(lob::linear_drag<double>::from_terminal_speed(0.0).error(), "got 0"));
  CHECK(lob::linear_drag<double>::from_terminal_speed(30.0, 0.0).error() == lob::errc::invalid_argument);
  CHECK(lob::linear_drag<double>::from_terminal_speed(30.0)->rate == doctest::Approx(9.80665 / 30.0));

  const lob::linear_flight<double> f = lob::linear_flight<double>::make(0.1, air, s).value();
  CHECK(names(f.at(nan).error(), "got nan"));
  CHECK(f.at(-1.0).error() == lob::errc::invalid_argument);
  CHECK(f.landing(nan).error() == lob::errc::invalid_argument);
  CHECK(f.range(inf).error() == lob::errc::invalid_argument);
  const auto above = f.landing(100.0);
  REQUIRE_FALSE(above);
  CHECK(above.error() == lob::errc::never_reaches);
  CHECK(names(above.error(), "above the apex"));
  CHECK(f.range(100.0).error() == lob::errc::never_reaches);
  CHECK(f.crossing(-1.0, lob::side::rising).error() == lob::errc::never_reaches);
  CHECK(f.at_distance(-2.0).error() == lob::errc::invalid_argument);
  CHECK(f.at_distance(1000.0).error() == lob::errc::never_reaches);  // u/k = 100 m

  // zero gravity where a landing is asked for
  lob::medium<double> space;
  space.gravity = {0, 0, 0};
  const lob::linear_flight<double> drift = lob::linear_flight<double>::make(0.1, space, s).value();
  CHECK(drift.landing(0.0).error() == lob::errc::invalid_argument);
  CHECK(names(drift.landing(0.0).error(), "gravity"));
  CHECK(drift.apex().error() == lob::errc::invalid_argument);
  CHECK(drift.max_height().error() == lob::errc::invalid_argument);
  CHECK(drift.range(0.0).error() == lob::errc::invalid_argument);
  CHECK(drift.at(1.0).has_value());

  // an updraft at least the fall speed: no apex, no landing
  lob::medium<double> updraft;
  updraft.wind = {0, 0, 10};
  const lob::linear_flight<double> lifted = lob::linear_flight<double>::make(1.0, updraft, s).value();
  CHECK(lifted.apex().error() == lob::errc::never_reaches);
  CHECK(lifted.landing(0.0).error() == lob::errc::never_reaches);
  CHECK(lifted.crossing(50.0, lob::side::rising).has_value());

  // a launch speed whose square overflows T is refused when the flight is made (issue 17)
  CHECK(lob::linear_flight<double>::make(0.0, air, {{0, 0, 0}, {1e300, 0, 1e300}}).error() ==
        lob::errc::invalid_argument);
  // a result that overflows T is an error, not inf or nan (max_time set past the asked time)
  const lob::linear_flight<double> huge =
      lob::linear_flight<double>::make(0.0, air, {{0, 0, 0}, {1e150, 0, 1e150}}, 1e300).value();
  CHECK(huge.at(1e300).error() == lob::errc::invalid_argument);
  const auto far = huge.landing(0.0);
  CHECK((far.has_value() ? lob::is_finite(far->time) && lob::is_finite(far->position)
                         : far.error() == lob::errc::invalid_argument));
}
