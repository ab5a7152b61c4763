// solve/clearance.hpp: aiming past a wall or net, with the margin.
#include <doctest/doctest.h>

#include <cmath>
#include <cstring>
#include <limits>

#include "lob/lob.hpp"

namespace {
using vec = lob::vec3<double>;

// Vacuum path height at distance x for elevation e and speed v:
// y = x tan e - g x^2 / (2 v^2 cos^2 e) (any mechanics textbook).
double vacuum_height(double x, double e, double v) {
  const double g = lob::standard_gravity<double>();
  return x * std::tan(e) - g * x * x / (2 * v * v * std::cos(e) * std::cos(e));
}
}  // namespace

TEST_CASE("the margins over a wall match the vacuum path heights") {
  const lob::medium<double> air;
  const lob::vacuum<double> model;
  const double v = 30.0;
  const vec target(60, 0, 0);
  const auto aims = lob::aim(model, air, lob::aim_request<double>{vec::Zero(), target, v});
  REQUIRE(aims.has_value());
  const double flat_h = vacuum_height(25, aims->flat->elevation, v);
  const double lofted_h = vacuum_height(25, aims->lofted->elevation, v);
  REQUIRE(flat_h < lofted_h);

  // Low wall: both clear, margins as the textbook heights say.
  const auto low =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, v, {25.0, 2.0}});
  REQUIRE(low.has_value());
  REQUIRE(low->count() == 2);
  CHECK(low->flat->margin == doctest::Approx(flat_h - 2.0).epsilon(1e-12));
  CHECK(low->lofted->margin == doctest::Approx(lofted_h - 2.0).epsilon(1e-12));

  // Between the two paths: only the lofted one clears.
  const double mid = 0.5 * (flat_h + lofted_h);
  const auto between =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, v, {25.0, mid}});
  REQUIRE(between.has_value());
  CHECK_FALSE(between->flat.has_value());
  REQUIRE(between->lofted.has_value());
  CHECK(between->lofted->margin == doctest::Approx(lofted_h - mid).epsilon(1e-12));

  // Above both paths but below the envelope: error with the best (negative) margin.
  const double envelope = v * v / (2 * lob::standard_gravity<double>()) -
                          lob::standard_gravity<double>() * 25 * 25 / (2 * v * v);  // textbook envelope
  const double over = 0.5 * (lofted_h + envelope);
  const auto both_low =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, v, {25.0, over}});
  REQUIRE_FALSE(both_low.has_value());
  CHECK(both_low.error() == lob::errc::out_of_reach);
  CHECK(static_cast<double>(both_low.error().detail_value()) ==
        doctest::Approx(lofted_h - over).epsilon(1e-9));

  // Taller than any path at this speed: error naming the highest reachable height.
  const auto tall = lob::aim_over(
      model, air, lob::clearance_request<double>{vec::Zero(), target, v, {25.0, envelope + 1.0}});
  REQUIRE_FALSE(tall.has_value());
  CHECK(tall.error() == lob::errc::out_of_reach);
  CHECK(std::strstr(tall.error().message(), "taller than any path") != nullptr);
  CHECK(static_cast<double>(tall.error().detail_value()) == doctest::Approx(envelope).epsilon(1e-10));
}

TEST_CASE("a cleared aim under drag and wind still hits its target") {
  lob::medium<double> air;
  air.wind = vec(-2, 3, 0);
  const lob::quadratic_drag<double> model{0.005};
  const vec target(45, 10, -1);
  const auto s =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, 35.0, {20.0, 3.0}});
  REQUIRE(s.has_value());
  REQUIRE(s->count() >= 1);
  for (const auto* c : {&s->flat, &s->lofted}) {
    if (!*c) continue;
    CHECK((*c)->margin >= 0);
    const auto f = lob::fly(model, air, lob::shot<double>{vec::Zero(), (*c)->aim.velocity});
    REQUIRE(f.has_value());
    const auto at = f->at((*c)->aim.time_of_flight);
    REQUIRE(at.has_value());
    CHECK((at->position - target).norm() <= 1e-9);
  }
}

TEST_CASE("bad obstacles give clear error values") {
  const lob::medium<double> air;
  const lob::vacuum<double> model;
  const vec target(60, 0, 0);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const auto behind =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, 30.0, {-5.0, 1.0}});
  REQUIRE_FALSE(behind.has_value());
  CHECK(behind.error() == lob::errc::invalid_argument);
  CHECK(std::strstr(behind.error().message(), "behind the launcher") != nullptr);
  const auto at_zero =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, 30.0, {0.0, 1.0}});
  REQUIRE_FALSE(at_zero.has_value());
  CHECK(at_zero.error() == lob::errc::invalid_argument);
  const auto beyond =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, 30.0, {70.0, 1.0}});
  REQUIRE_FALSE(beyond.has_value());
  CHECK(std::strstr(beyond.error().message(), "beyond the target") != nullptr);
  const auto bad =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, 30.0, {nan, 1.0}});
  REQUIRE_FALSE(bad.has_value());
  CHECK(bad.error() == lob::errc::invalid_argument);
  const auto bad_top =
      lob::aim_over(model, air, lob::clearance_request<double>{vec::Zero(), target, 30.0, {10.0, nan}});
  REQUIRE_FALSE(bad_top.has_value());
  CHECK(bad_top.error() == lob::errc::invalid_argument);
}
