// Invariants of linear-drag flight over seeded random launches, at least 10^5 cases per
// property in double (10^4 in float and long double). Facts of the trade, `common
// practice`: with drag the apex comes earlier and lower, the descent lasts longer than the
// ascent, the range is shorter, the path is not symmetric; zero drag is the vacuum.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <random>

#include "lob/lob.hpp"

namespace {

template <class T>
struct launch_case {
  T k;
  lob::shot<T> shot;
  lob::medium<T> air;
};

// A random upward launch in still air: speed 0.01 .. 2000 m/s, elevation 0.5 .. 90 deg,
// k with k v/g between 1e-10 and 1e3 (so that drag changes the result by more than
// rounding), launch height 0.
template <class T>
launch_case<T> random_upward(std::mt19937_64& rng) {
  std::uniform_real_distribution<double> u(0, 1);
  const double speed = std::pow(10.0, -2 + 5.30103 * u(rng));
  const double el = (0.5 + 89.5 * u(rng)) * 3.14159265358979323846 / 180;
  const double x = std::pow(10.0, -10 + 13 * u(rng));  // k v_z / g
  const double vz = speed * std::sin(el);
  launch_case<T> c;
  c.shot.velocity = lob::vec3<T>(T(speed * std::cos(el)), T(0), T(vz));
  c.k = T(x * 9.80665 / vz);
  return c;
}

template <class T>
lob::linear_flight<T> flight(const T& k, const launch_case<T>& c) {
  return lob::linear_flight<T>::make(k, c.air, c.shot).value();
}

template <class T>
int count_for() {
  return std::is_same_v<T, double> ? 100000 : 10000;
}

}  // namespace

TEST_CASE_TEMPLATE("zero drag is the vacuum parabola of the textbook", T, float, double, long double) {
  // Vacuum formulas (any mechanics textbook): t = (v + sqrt(v^2 - 2 g dh))/g,
  // range = u t, apex rise v^2/(2g), landing speed sqrt(|v0|^2 - 2 g dh); evaluated here
  // in long double (a different formulation from the library's apex form).
  std::mt19937_64 rng(1001);
  std::uniform_real_distribution<double> u(0, 1);
  const T eps = std::numeric_limits<T>::epsilon();
  long double worst = 0;
  for (int n = 0; n < count_for<T>(); ++n) {
    launch_case<T> c = random_upward<T>(rng);
    c.air.wind =
        lob::vec3<T>(T(20 * u(rng) - 10), T(20 * u(rng) - 10), T(4 * u(rng) - 2));  // no effect at k = 0
    const T dh = u(rng) < 0.5 ? T(0) : T(-std::pow(10.0, -3 + 7 * u(rng)));
    const lob::linear_flight<T> f = flight(T(0), c);
    const lob::linear_flight<T> v = lob::fly(lob::vacuum<T>{}, c.air, c.shot).value();
    const long double g = static_cast<long double>(lob::standard_gravity<T>());
    const long double vz = static_cast<long double>(c.shot.velocity.z());
    const long double ux = static_cast<long double>(c.shot.velocity.x());
    const long double d = static_cast<long double>(dh);
    const long double t = (vz + std::sqrt(vz * vz - 2 * g * d)) / g;
    const long double speed = std::sqrt(ux * ux + vz * vz - 2 * g * d);
    const auto land = f.landing(dh);
    const auto same = v.landing(dh);
    REQUIRE(land.has_value());
    REQUIRE(same.has_value());
    CHECK(land->time == same->time);
    const long double errs[4] = {
        std::abs(static_cast<long double>(land->time) - t) / t,
        std::abs(static_cast<long double>(*f.range(dh)) - ux * t) / (ux * t),
        std::abs(static_cast<long double>(*f.max_height()) - vz * vz / (2 * g)) / (vz * vz / (2 * g)),
        std::abs(static_cast<long double>(lob::speed(*land)) - speed) / speed};
    for (long double e : errs) worst = std::max(worst, e);
  }
  MESSAGE("max relative deviation from the vacuum formulas: " << static_cast<double>(worst));
  CHECK(worst <= static_cast<long double>(8 * eps));
}

TEST_CASE_TEMPLATE("drag never lengthens the range, and more drag shortens it further", T, float, double,
                   long double) {
  // common practice
  std::mt19937_64 rng(1002);
  std::uniform_real_distribution<double> u(0, 1);
  const T slack = T(1) + 4 * std::numeric_limits<T>::epsilon();
  for (int n = 0; n < count_for<T>(); ++n) {
    const launch_case<T> c = random_upward<T>(rng);
    const T dh = u(rng) < 0.5 ? T(0) : T(-std::pow(10.0, -3 + 7 * u(rng)));
    const T r0 = *flight(T(0), c).range(dh);
    const T r1 = *flight(c.k, c).range(dh);
    const T r2 = *flight(T(c.k * T(1.5)), c).range(dh);
    CHECK(r1 <= r0 * slack);
    CHECK(r2 <= r1 * slack);
  }
}

TEST_CASE_TEMPLATE("with drag the descent lasts longer than the ascent", T, float, double, long double) {
  // common practice (level landing); with k v/g >= 1e-10 the difference is far above rounding
  std::mt19937_64 rng(1003);
  int failures = 0;
  for (int n = 0; n < count_for<T>(); ++n) {
    const launch_case<T> c = random_upward<T>(rng);
    if (std::numeric_limits<T>::digits < 40 && c.k * c.shot.velocity.z() / T(9.80665) < T(1e-5)) continue;
    const lob::linear_flight<T> f = flight(c.k, c);
    const T up = f.apex()->time;
    const T down = T(f.landing(T(0))->time - up);
    if (!(down > up)) ++failures;
  }
  CHECK(failures == 0);
}

TEST_CASE_TEMPLATE("with drag the apex comes earlier and lower", T, float, double, long double) {
  // common practice
  std::mt19937_64 rng(1004);
  int failures = 0;
  for (int n = 0; n < count_for<T>(); ++n) {
    const launch_case<T> c = random_upward<T>(rng);
    if (std::numeric_limits<T>::digits < 40 && c.k * c.shot.velocity.z() / T(9.80665) < T(1e-5)) continue;
    const lob::linear_flight<T> f0 = flight(T(0), c);
    const lob::linear_flight<T> f = flight(c.k, c);
    if (!(f.apex()->time < f0.apex()->time)) ++failures;
    if (!(*f.max_height() < *f0.max_height())) ++failures;
  }
  CHECK(failures == 0);
}

TEST_CASE("with drag the path is not symmetric: a height is passed faster rising than falling") {
  // common practice
  std::mt19937_64 rng(1005);
  std::uniform_real_distribution<double> u(0, 1);
  int failures = 0;
  for (int n = 0; n < 100000; ++n) {
    const launch_case<double> c = random_upward<double>(rng);
    const lob::linear_flight<double> f = flight(c.k, c);
    const double h = *f.max_height() * (0.05 + 0.9 * u(rng));
    const auto up = f.crossing(h, lob::side::rising);
    const auto down = f.crossing(h, lob::side::falling);
    REQUIRE(up.has_value());
    REQUIRE(down.has_value());
    if (!(lob::speed(*up) > lob::speed(*down))) ++failures;
    // and the crossings bracket the apex
    if (!(up->time < f.apex()->time && f.apex()->time < down->time)) ++failures;
  }
  CHECK(failures == 0);
}

TEST_CASE("every landing state lies on the path at its time and at the asked height") {
  // Self-consistency over 10^5 random launches (any elevation, wind, both signs of dh):
  // at(t_landing) agrees with landing(h), and the height is h.
  std::mt19937_64 rng(1006);
  std::uniform_real_distribution<double> u(0, 1);
  double worst = 0;
  for (int n = 0; n < 100000; ++n) {
    const double k = u(rng) < 0.1 ? 0.0 : std::pow(10.0, -12 + 15 * u(rng));
    const double speed = std::pow(10.0, -2 + 5.30103 * u(rng));
    const double el = (-89 + 179 * u(rng)) * 3.14159265358979323846 / 180;
    lob::medium<double> air;
    air.wind = {30 * u(rng) - 15, 30 * u(rng) - 15, std::min(4 * u(rng) - 2, 4.0 / std::max(k, 1e-300))};
    const lob::shot<double> s{{1.0, 2.0, 3.0}, {speed * std::cos(el), 0.0, speed * std::sin(el)}};
    const lob::linear_flight<double> f = lob::linear_flight<double>::make(k, air, s).value();
    const double h = 3.0 - std::pow(10.0, -2 + 5 * u(rng));
    const auto land = f.landing(h);
    REQUIRE(land.has_value());
    CHECK(land->position.z() == doctest::Approx(h).epsilon(1e-15));
    const auto at = f.at(land->time);
    // Positions are absolute: both carry the rounding of adding the launch point, and of
    // the launch and wind terms that a headwind makes cancel.
    const double scale = land->position.head<2>().norm() + (s.velocity.norm() + air.wind.norm()) * land->time;
    worst = std::max(worst, (at->position - land->position).head<2>().norm() / scale);
  }
  MESSAGE("max horizontal mismatch between at(t) and landing(), relative to its scale: " << worst);
  CHECK(worst <= 1e-14);
}

TEST_CASE("at(t) without checks only where the state cannot overflow") {
  // linear_flight answers at(t) unchecked up to a horizon where |x0| + |v0| t + |pull| t^2
  // stays below max/16; beyond it the checked path must still refuse an overflow.
  const lob::medium<double> air{};
  const auto fast = lob::linear_flight<double>::make(0.0, air, lob::shot<double>{{0, 0, 0}, {1e150, 0, 1e150}});
  REQUIRE(fast);
  CHECK(fast->at(1.0));
  const auto far = fast->at(1e160);
  REQUIRE(!far);
  CHECK(far.error() == lob::errc::invalid_argument);
  lob::medium<double> faint{};
  faint.gravity = lob::vec3<double>(0, 0, -1e-300);
  const auto slow = lob::linear_flight<double>::make(0.0, faint, lob::shot<double>{});
  REQUIRE(slow);
  const auto late = slow->at(1e200);  // t^2 overflows even though g t^2 would not
  if (late) CHECK(lob::is_finite(late->position));
  const auto later = slow->at(1e300);
  if (later) CHECK(lob::is_finite(later->position));
}
