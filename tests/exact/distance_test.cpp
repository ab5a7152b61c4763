// linear_flight::at_distance and max_height: the first state at a horizontal distance,
// checked against a different formulation (dense sampling of the explicit path, and the
// 50-digit explicit solution), and the apex height against the apex state.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <array>
#include <cmath>
#include <limits>
#include <random>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;
// References in these tests use plain formulas that cancel as k -> 0; 100 digits leave
// more than 60 correct after losing up to 2 log10(1/k) of them.
using mp100 = boost::multiprecision::cpp_bin_float_100;

namespace {

template <class T>
lob::linear_flight<T> make_flight(const T& k, const lob::vec3<T>& v0, const lob::vec3<T>& wind,
                                  const lob::vec3<T>& p0 = lob::vec3<T>::Zero()) {
  lob::medium<T> air;
  air.wind = wind;
  const lob::shot<T> s{p0, v0};
  return lob::linear_flight<T>::make(k, air, s).value();
}

template <class T>
T rel(const T& a, const T& b) {
  using std::abs;
  return b == T(0) ? T(abs(a)) : T(abs(T(a - b)) / abs(b));
}

}  // namespace

TEST_CASE_TEMPLATE("in still air the distance is reached at -log1p(-k d/u)/k", T, float, double, long double
                   LOB_AND_WIDE(mp50)) {
  const T eps = std::numeric_limits<T>::epsilon();
  // Reference: the same time from the explicit expression -log(1 - k d/u)/k in 100 digits
  // (a different formulation: a plain log, whose cancellation 100 digits absorb).
  for (const char* kstr : {"0", "1e-12", "1e-6", "0.01", "0.3", "7"}) {
    const T k = T(mp50(kstr));
    const lob::linear_flight<T> f =
        make_flight<T>(k, lob::vec3<T>(T(30), T(40), T(12)), lob::vec3<T>::Zero());
    const T limit = k == T(0) ? T(1e30) : T(T(50) / k);
    const T d = limit < T(600) ? T(limit * T(3) / T(4)) : T(600);
    const lob::result<lob::state<T>> s = f.at_distance(d);
    REQUIRE(s.has_value());
    const mp100 K(k), D(d), U(50);
    const mp100 tref = K == 0 ? mp100(D / U) : mp100(-log(mp100(1 - K * D / U)) / K);
    CHECK(rel(mp100(s->time), tref) <= mp100(8 * eps));
    CHECK(rel(T(lob::horizontal_distance(*s, f.launch(), f.air())), d) <= T(8 * eps));
  }
}

TEST_CASE("in still air with drag a distance at or past u/k is never reached") {
  const lob::linear_flight<double> f = make_flight<double>(0.5, {3.0, 4.0, 1.0}, lob::vec3<double>::Zero());
  CHECK(f.at_distance(9.9).has_value());
  const auto s = f.at_distance(10.0);
  REQUIRE_FALSE(s);
  CHECK(s.error() == lob::errc::never_reaches);
  const auto bad = f.at_distance(-1.0);
  REQUIRE_FALSE(bad);
  CHECK(bad.error() == lob::errc::invalid_argument);
  CHECK(f.at_distance(std::numeric_limits<double>::quiet_NaN()).error() == lob::errc::invalid_argument);
  const lob::linear_flight<double> up = make_flight<double>(0.5, {0.0, 0.0, 10.0}, lob::vec3<double>::Zero());
  CHECK(up.at_distance(1.0).error() == lob::errc::never_reaches);
  CHECK(up.at_distance(0.0)->time == 0.0);
}

TEST_CASE("into a strong headwind the first crossing of a distance is found, not a later one") {
  // Launched at 40 m/s against a 12 m/s wind with k = 1/s: the body flies out to about
  // 28 m, is carried back through the launch point and then downwind forever. Distances
  // below the turn are reached three times; the first one is wanted. The reference scans
  // the explicit path in long double on a fine grid (a different formulation).
  using T = long double;
  const lob::linear_flight<double> f = make_flight<double>(1.0, {40.0, 3.0, 20.0}, {-12.0, 0.0, 0.0});
  const auto dist = [&](T t) {
    const T s = (1 - std::exp(-t)) ;  // k = 1
    const T x = -12 * t + 52 * s;
    const T y = 3 * s;
    return std::sqrt(x * x + y * y);
  };
  for (double d : {1.0, 10.0, 25.0, 27.9, 29.0, 60.0}) {
    const auto s = f.at_distance(d);
    REQUIRE(s.has_value());
    T lo = 0, step = 1e-4L;
    while (dist(lo + step) < d) lo += step;
    T hi = lo + step;
    for (int i = 0; i < 200; ++i) {
      const T m = (lo + hi) / 2;
      (dist(m) < d ? lo : hi) = m;
    }
    CHECK(std::abs(s->time - static_cast<double>(hi)) <= 1e-13 * static_cast<double>(hi));
    CHECK(std::abs(lob::horizontal_distance(*s, f.launch(), f.air()) - d) <= 1e-13 * d);
  }
}

TEST_CASE("with a tailwind or crosswind the distance grows and is reached once") {
  std::mt19937_64 rng(20261201);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  double worst = 0;
  for (int i = 0; i < 2000; ++i) {
    const double k = std::pow(10.0, 3 * u(rng) - 1);
    const lob::vec3<double> v0(30 * u(rng), 30 * u(rng), 20 + 10 * u(rng));
    const lob::vec3<double> wind(8 * u(rng), 8 * u(rng), 0.0);
    const lob::linear_flight<double> f = make_flight<double>(k, v0, wind, {5.0, -3.0, 2.0});
    const double d = 100 * (u(rng) + 1.0001);
    const auto s = f.at_distance(d);
    REQUIRE(s.has_value());
    const double got = lob::horizontal_distance(*s, f.launch(), f.air());
    worst = std::max(worst, std::abs(got - d) / d);
    // Nothing earlier on the path is as far: check a few earlier times.
    for (int j = 1; j < 8; ++j) {
      const auto e = f.at(s->time * j / 8.0);
      CHECK(lob::horizontal_distance(*e, f.launch(), f.air()) < d * (1 + 1e-12));
    }
  }
  MESSAGE("worst relative distance error " << worst);
  CHECK(worst <= 1e-13);
}

TEST_CASE_TEMPLATE("the apex height equals the height of the apex state", T, float, double, long double
                   LOB_AND_WIDE(mp50)) {
  const T eps = std::numeric_limits<T>::epsilon();
  for (const char* kstr : {"0", "1e-9", "0.05", "3", "200"}) {
    const T k = T(mp50(kstr));
    const lob::linear_flight<T> f = make_flight<T>(k, lob::vec3<T>(T(10), T(0), T(25)), lob::vec3<T>::Zero(),
                                                   lob::vec3<T>(T(0), T(0), T(2)));
    const lob::result<T> h = f.max_height();
    REQUIRE(h.has_value());
    // Reference: the apex height from the explicit form v/k - (g/k^2) log(1 + k v/g) in
    // 100 digits (a different formulation), or v^2/(2g) in vacuum; g as T holds it.
    const mp100 K(k), V(25), G(lob::standard_gravity<T>());
    const mp100 href =
        K == 0 ? mp100(2 + V * V / (2 * G)) : mp100(2 + V / K - G / (K * K) * log(mp100(1 + K * V / G)));
    CHECK(rel(mp100(*h), href) <= mp100(16 * eps));
  }
  const lob::linear_flight<double> down =
      make_flight<double>(0.1, {10.0, 0.0, -5.0}, lob::vec3<double>::Zero(), {0.0, 0.0, 7.0});
  CHECK(*down.max_height() == 7.0);
}

TEST_CASE("sampling an exact flight writes the states at() gives, end points included") {
  const auto flight =
      lob::fly(lob::linear_drag<double>{0.3}, lob::medium<double>{},
               lob::shot<double>{lob::vec3<double>::Zero(), lob::launch_velocity(18.0, lob::deg(50.0))});
  REQUIRE(flight);
  std::array<lob::state<double>, 7> points{};
  const auto written = flight->sample(points, 2.4);
  REQUIRE(written);
  CHECK(*written == points.size());
  CHECK(points.front().time == 0.0);
  CHECK(points.back().time == 2.4);
  for (const auto& p : points) {
    const auto direct = flight->at(p.time);
    REQUIRE(direct);
    CHECK(p.position == direct->position);  // the same closed form, bit for bit
    CHECK(p.velocity == direct->velocity);
  }
  const auto bad = flight->sample(points, -1.0);
  REQUIRE_FALSE(bad);
  CHECK(bad.error() == lob::errc::invalid_argument);
}
