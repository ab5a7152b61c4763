// solve/farthest.hpp: the elevation of maximum range. Closed forms (vacuum, linear drag)
// against published formulas and against direct maximisation of the range.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cmath>
#include <limits>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

namespace {

template <class T>
lob::farthest_request<T> request(const T& speed, const T& launch_height, const T& landing_height = T(0)) {
  return lob::farthest_request<T>{lob::vec3<T>(T(0), T(0), launch_height), speed, T(0), landing_height};
}

}  // namespace

TEST_CASE_TEMPLATE("farthest elevation from a height in vacuum follows the shot-put formula", T, float,
                   double, long double LOB_AND_WIDE(mp50)) {
  using std::abs;
  using std::asin;
  using std::sqrt;
  // sin(theta*) = v / sqrt(2 v^2 + 2 g h), reach (v/g) sqrt(v^2 + 2 g h)
  // (Lichtenberg & Wills, Am. J. Phys. 46 (1978)).
  const T eps = std::numeric_limits<T>::epsilon();
  const lob::medium<T> air;
  const T g = lob::standard_gravity<T>();
  const T v = T(14);
  for (const int hh : {0, 2, 25, -7}) {
    const T h = T(hh);
    const auto s = lob::farthest_elevation(lob::vacuum<T>{}, air, request(v, h));
    REQUIRE(s.has_value());
    const T elev = asin(T(v / sqrt(T(2 * v * v + 2 * g * h))));
    const T reach = v / g * sqrt(T(v * v + 2 * g * h));
    CHECK(abs(T(s->elevation - elev)) <= 64 * eps);
    CHECK(abs(T(s->range - reach)) <= 256 * eps * reach);
  }
}

TEST_CASE("the linear-drag closed form agrees with direct maximisation of the range") {
  // Direct: Brent's method on the range of the exact flight, in long double (elevation
  // to ~3e-10, range to ~1e-19 relative), against the closed form in double.
  const lob::medium<long double> air_l;
  const lob::medium<double> air;
  for (const double alpha : {1e-6, 1e-3, 0.05, 0.4, 1.0, 2.5, 10.0, 80.0}) {
    for (const double h : {0.0, 3.0, 40.0, -2.0}) {
      const double v = 20.0;
      const double k = alpha * lob::standard_gravity<double>() / v;
      const auto closed = lob::farthest_elevation(lob::linear_drag<double>{k}, air, request(v, h));
      const lob::aim_frame<long double> frame = lob::aim_frame<long double>::make(air_l).value();
      const auto direct = lob::detail::farthest_direct(
          lob::linear_drag<long double>{static_cast<long double>(k)}, air_l, frame,
          request<long double>(20.0L, static_cast<long double>(h)), lob::solve_options<long double>{});
      if (!direct) {
        // Then the plane is beyond reach and the closed form must say so too.
        CHECK_FALSE(closed.has_value());
        continue;
      }
      REQUIRE(closed.has_value());
      INFO("alpha = " << alpha << ", h = " << h);
      CHECK(std::abs(closed->elevation - static_cast<double>(direct->elevation)) <= 2e-9);
      const double r_direct = static_cast<double>(direct->range);
      CHECK(std::abs(closed->range - r_direct) <= 4e-15 * r_direct);
      CHECK(closed->range >= r_direct * (1 - 4e-16));
    }
  }
}

TEST_CASE("the linear-drag closed form keeps its digits as drag vanishes") {
  // Against direct maximisation in 50 digits (Brent, elevation to ~1e-25): the closed form
  // in double must stay within a few ulp where its Lambert W argument nears -1/e.
  using std::abs;
  const lob::medium<mp50> air50;
  const lob::aim_frame<mp50> frame = lob::aim_frame<mp50>::make(air50).value();
  for (const double alpha : {1e-7, 1e-4, 3e-3}) {
    const double v = 30.0;
    const double k = alpha * lob::standard_gravity<double>() / v;
    const auto closed =
        lob::farthest_elevation(lob::linear_drag<double>{k}, lob::medium<double>{}, request(v, 1.5));
    REQUIRE(closed.has_value());
    lob::solve_options<mp50> o;
    o.max_iterations = 400;
    const auto direct = lob::detail::farthest_direct(lob::linear_drag<mp50>{mp50(k)}, air50, frame,
                                                     request<mp50>(mp50(30), mp50(15) / 10), o);
    REQUIRE(direct.has_value());
    CHECK(abs(mp50(closed->elevation) - direct->elevation) <=
          mp50(8 * std::numeric_limits<double>::epsilon()));
  }
}

TEST_CASE_TEMPLATE("at alpha = 1 on level ground sin(theta*) = 1/(e - 1) and k T* = 1", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  // Derived here: with alpha = k v / g = 1 the envelope equation 1 - (1 - s) e^s = alpha^2
  // has the root s = k T* = 1, so sin(theta*) = alpha / (e^1 - 1).
  using std::abs;
  using std::asin;
  const T eps = std::numeric_limits<T>::epsilon();
  const T v = T(25);
  const T k = lob::standard_gravity<T>() / v;
  const auto s = lob::farthest_elevation(lob::linear_drag<T>{k}, lob::medium<T>{}, request(v, T(0)));
  REQUIRE(s.has_value());
  const T e = boost::math::constants::e<T>();
  CHECK(abs(T(s->elevation - asin(T(1 / (e - 1))))) <= 64 * eps);
  CHECK(abs(T(k * s->time_of_flight - 1)) <= 256 * eps);
}

TEST_CASE("farthest elevation tends to 45 degrees as drag vanishes and lies below it with drag") {
  // Common practice: 45 degrees in vacuum on level ground, lower under drag.
  const double quarter = std::atan(1.0);
  double last = 0;
  for (const double k : {1.0, 0.3, 0.1, 0.01, 1e-4, 1e-8}) {
    const auto s =
        lob::farthest_elevation(lob::linear_drag<double>{k}, lob::medium<double>{}, request(30.0, 0.0));
    REQUIRE(s.has_value());
    CHECK(s->elevation < quarter);
    CHECK(s->elevation > last);  // rises towards 45 degrees as the drag falls
    last = s->elevation;
  }
  CHECK(std::abs(last - quarter) <= 1e-7);
  const auto q =
      lob::farthest_elevation(lob::quadratic_drag<double>{0.01}, lob::medium<double>{}, request(30.0, 0.0));
  REQUIRE(q.has_value());
  CHECK(q->elevation < quarter);
  const auto q0 =
      lob::farthest_elevation(lob::quadratic_drag<double>{1e-9}, lob::medium<double>{}, request(30.0, 0.0));
  REQUIRE(q0.has_value());
  CHECK(std::abs(q0->elevation - quarter) <= 1e-5);
}

TEST_CASE("farthest elevation under wind and for quadratic drag is a true maximum") {
  lob::medium<double> air;
  air.wind = lob::vec3<double>(4, 1, 0);
  const lob::quadratic_drag<double> q{0.006};
  const lob::linear_drag<double> l{0.2};
  for (const double h : {0.0, -5.0, 3.0}) {
    const auto sq = lob::farthest_elevation(q, air, request(35.0, 1.0, h));
    const auto sl = lob::farthest_elevation(l, air, request(35.0, 1.0, h));
    REQUIRE(sq.has_value());
    REQUIRE(sl.has_value());
    const lob::aim_frame<double> frame = lob::aim_frame<double>::make(air).value();
    for (const double d : {-1e-3, 1e-3}) {
      const auto nq = lob::detail::land_shot(q, air, frame, request(35.0, 1.0, h), sq->elevation + d,
                                             lob::solve_options<double>{});
      const auto nl = lob::detail::land_shot(l, air, frame, request(35.0, 1.0, h), sl->elevation + d,
                                             lob::solve_options<double>{});
      REQUIRE(nq.has_value());
      REQUIRE(nl.has_value());
      CHECK(nq->range < sq->range);
      CHECK(nl->range < sl->range);
    }
  }
}

TEST_CASE("a landing plane above every reachable point is out of reach") {
  const lob::medium<double> air;
  // Vacuum apex of a vertical shot: v^2 / (2 g) (any mechanics textbook), about 11.47 m.
  for (const auto& s :
       {lob::farthest_elevation(lob::vacuum<double>{}, air, request(15.0, 0.0, 12.0)),
        lob::farthest_elevation(lob::linear_drag<double>{0.1}, air, request(15.0, 0.0, 11.5)),
        lob::farthest_elevation(lob::quadratic_drag<double>{0.01}, air, request(15.0, 0.0, 11.5))}) {
    REQUIRE_FALSE(s.has_value());
    CHECK(s.error() == lob::errc::out_of_reach);
  }
  const auto ok = lob::farthest_elevation(lob::vacuum<double>{}, air, request(15.0, 0.0, 11.0));
  REQUIRE(ok.has_value());
  CHECK(ok->elevation > 1.0);
}

TEST_CASE("bad farthest-elevation input gives error values") {
  const lob::medium<double> air;
  const double nan = std::numeric_limits<double>::quiet_NaN();
  for (const auto& s : {lob::farthest_elevation(lob::vacuum<double>{}, air, request(0.0, 0.0)),
                        lob::farthest_elevation(lob::vacuum<double>{}, air, request(nan, 0.0)),
                        lob::farthest_elevation(lob::vacuum<double>{}, air, request(10.0, nan)),
                        lob::farthest_elevation(lob::vacuum<double>{}, air, request(10.0, 0.0, nan)),
                        lob::farthest_elevation(lob::linear_drag<double>{nan}, air, request(10.0, 0.0))}) {
    REQUIRE_FALSE(s.has_value());
    CHECK(s.error() == lob::errc::invalid_argument);
  }
}
