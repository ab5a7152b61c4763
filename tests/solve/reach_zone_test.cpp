// solve/reach_zone.hpp: the boundary of the reachable region in a vertical plane and the
// ground footprint of the farthest landings.
#include <doctest/doctest.h>

#include <array>
#include <cmath>
#include <limits>
#include <span>

#include "lob/lob.hpp"

namespace {
using vec = lob::vec3<double>;
}

TEST_CASE_TEMPLATE("the vacuum reach boundary is the textbook parabola", T, float, double, long double) {
  using std::abs;
  // y = v^2/(2g) - g x^2/(2 v^2) above the launch point (any mechanics textbook).
  const T eps = std::numeric_limits<T>::epsilon();
  const lob::medium<T> air;
  const T g = lob::standard_gravity<T>();
  const T v = T(20);
  const T h0 = T(3);
  std::array<lob::boundary_point<T>, 17> pts{};
  const auto n = lob::reach_boundary(
      lob::vacuum<T>{}, air, lob::reach_request<T>{lob::vec3<T>(T(0), T(0), h0), v, T(1) / T(2), T(-2)},
      std::span<lob::boundary_point<T>>(pts));
  REQUIRE(n.has_value());
  CHECK(*n == pts.size());
  const T scale = v * v / (2 * g);
  for (const auto& p : pts) {
    const T y = h0 + v * v / (2 * g) - g * p.distance * p.distance / (2 * v * v);
    // 1e-9 relative in double; the elevation (not the height) is found to half the digits.
    CHECK(abs(T(p.height - y)) <= T(64) * eps * scale * T(8));
  }
  CHECK(abs(T(pts.back().height + 2)) <= 16 * eps);
}

TEST_CASE("every boundary point under drag and wind is at the edge of reach") {
  // Independent check: the exact least speed (time-of-flight reduction) that reaches a
  // boundary point equals the speed the boundary was drawn for.
  lob::medium<double> air;
  air.wind = vec(-3, 0, 0);
  const lob::linear_drag<double> model{0.15};
  std::array<lob::boundary_point<double>, 9> pts{};
  const double speed = 28.0;
  const auto n = lob::reach_boundary(model, air, lob::reach_request<double>{vec::Zero(), speed, 0.0, -4.0},
                                     std::span<lob::boundary_point<double>>(pts));
  REQUIRE(n.has_value());
  for (std::size_t i = 1; i < pts.size(); ++i) {
    const auto least = lob::least_speed(
        model, air, lob::target_request<double>{vec::Zero(), vec(pts[i].distance, 0, pts[i].height)});
    REQUIRE(least.has_value());
    CHECK(std::abs(least->speed - speed) <= 1e-9 * speed);
  }
}

TEST_CASE("the footprint is a circle in still air and leans downwind in wind") {
  const lob::medium<double> still;
  const double g = lob::standard_gravity<double>();
  std::array<lob::footprint_point<double>, 8> pts{};
  const auto n = lob::reach_footprint(lob::vacuum<double>{}, still,
                                      lob::reach_request<double>{vec(0, 0, 2), 18.0, 0.0, 0.0},
                                      std::span<lob::footprint_point<double>>(pts));
  REQUIRE(n.has_value());
  // (v/g) sqrt(v^2 + 2 g h) (Lichtenberg & Wills, Am. J. Phys. 46 (1978)).
  const double reach = 18.0 / g * std::sqrt(18.0 * 18.0 + 2 * g * 2);
  for (const auto& p : pts) {
    CHECK(p.range == doctest::Approx(reach).epsilon(1e-12));
    CHECK(std::hypot(p.landing.x(), p.landing.y()) == doctest::Approx(reach).epsilon(1e-12));
  }
  lob::medium<double> windy;
  windy.wind = vec(5, 0, 0);
  const auto m = lob::reach_footprint(lob::quadratic_drag<double>{0.01}, windy,
                                      lob::reach_request<double>{vec::Zero(), 18.0, 0.0, 0.0},
                                      std::span<lob::footprint_point<double>>(pts));
  REQUIRE(m.has_value());
  CHECK(pts[0].range > pts[4].range);  // azimuth 0 downwind, pi upwind
  CHECK(pts[0].landing.x() > 0);
  CHECK(pts[4].landing.x() < 0);
}

TEST_CASE("bad reach-zone input gives error values") {
  const lob::medium<double> air;
  std::array<lob::boundary_point<double>, 1> one{};
  const auto a =
      lob::reach_boundary(lob::vacuum<double>{}, air, lob::reach_request<double>{vec::Zero(), 10.0, 0.0, 0.0},
                          std::span<lob::boundary_point<double>>(one));
  REQUIRE_FALSE(a.has_value());
  CHECK(a.error() == lob::errc::invalid_argument);
  std::array<lob::boundary_point<double>, 4> four{};
  const auto b =
      lob::reach_boundary(lob::vacuum<double>{}, air, lob::reach_request<double>{vec::Zero(), 0.0, 0.0, 0.0},
                          std::span<lob::boundary_point<double>>(four));
  REQUIRE_FALSE(b.has_value());
  CHECK(b.error() == lob::errc::invalid_argument);
  const auto c = lob::reach_boundary(lob::vacuum<double>{}, air,
                                     lob::reach_request<double>{vec::Zero(), 10.0, 0.0, 50.0},
                                     std::span<lob::boundary_point<double>>(four));
  REQUIRE_FALSE(c.has_value());
  CHECK(c.error() == lob::errc::out_of_reach);
  std::span<lob::footprint_point<double>> none;
  const auto d = lob::reach_footprint(lob::vacuum<double>{}, air,
                                      lob::reach_request<double>{vec::Zero(), 10.0, 0.0, 0.0}, none);
  REQUIRE_FALSE(d.has_value());
  CHECK(d.error() == lob::errc::invalid_argument);
}
