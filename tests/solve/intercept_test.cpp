// solve/intercept.hpp: meeting a receiver that moves with constant velocity.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <random>

#include "lob/lob.hpp"

namespace {
using vec = lob::vec3<double>;

// Distance [m] between body and receiver at the solution's meeting time, flown forward.
template <class M>
double meeting_miss(const M& model, const lob::medium<double>& air, const vec& from,
                    const lob::receiver<double>& r, const lob::aim_solution<double>& s) {
  const auto f = lob::fly(model, air, lob::shot<double>{from, s.velocity});
  REQUIRE(f.has_value());
  const auto at = f->at(s.time_of_flight);
  REQUIRE(at.has_value());
  return (at->position - (r.position + r.velocity * s.time_of_flight)).norm();
}
}  // namespace

TEST_CASE("a still receiver is met at the flat and the lofted aim times") {
  const lob::medium<double> air;
  const lob::linear_drag<double> model{0.1};
  const lob::receiver<double> r{vec(40, 15, 2), vec::Zero()};
  const auto m = lob::intercept(model, air, lob::intercept_request<double>{vec::Zero(), r, 35.0, 0.0});
  const auto a = lob::aim(model, air, lob::aim_request<double>{vec::Zero(), r.position, 35.0});
  REQUIRE(m.has_value());
  REQUIRE(a.has_value());
  CHECK(m->earliest->time_of_flight == doctest::Approx(a->flat->time_of_flight).epsilon(1e-12));
  CHECK(m->latest->time_of_flight == doctest::Approx(a->lofted->time_of_flight).epsilon(1e-12));
}

TEST_CASE("every interception flown forward meets its receiver") {
  std::mt19937_64 rng(99);
  std::uniform_real_distribution<double> pos(-60.0, 60.0);
  std::uniform_real_distribution<double> vel(-8.0, 8.0);
  std::uniform_real_distribution<double> rate(0.0, 0.4);
  int met = 0;
  for (int i = 0; i < 400; ++i) {
    lob::medium<double> air;
    air.wind = vec(vel(rng) / 2, vel(rng) / 2, 0);
    const lob::linear_drag<double> model{rate(rng)};
    const lob::receiver<double> r{vec(pos(rng), pos(rng), pos(rng) / 6),
                                  vec(vel(rng), vel(rng), vel(rng) / 8)};
    const auto m = lob::intercept(model, air, lob::intercept_request<double>{vec::Zero(), r, 40.0, 0.0});
    if (!m) {
      CHECK(m.error() == lob::errc::out_of_reach);
      continue;
    }
    ++met;
    CHECK(m->earliest->time_of_flight <= m->latest->time_of_flight);
    CHECK(meeting_miss(model, air, vec::Zero(), r, *m->earliest) <= 1e-9);
    CHECK(meeting_miss(model, air, vec::Zero(), r, *m->latest) <= 1e-9);
    CHECK(m->earliest->speed == doctest::Approx(40.0).epsilon(1e-12));
  }
  CHECK(met > 100);
}

TEST_CASE("the direct interception agrees with the exact one") {
  lob::medium<double> air;
  air.wind = vec(1, -2, 0);
  const lob::linear_drag<double> model{0.12};
  const lob::receiver<double> r{vec(50, -10, 0), vec(-3, 4, 0)};
  lob::intercept_options<double> o;
  o.samples = 40;
  const auto exact = lob::intercept(model, air, lob::intercept_request<double>{vec::Zero(), r, 38.0, 8.0}, o);
  const auto direct = lob::detail::intercept_direct(
      model, air, lob::intercept_request<double>{vec::Zero(), r, 38.0, 8.0}, 8.0, o);
  REQUIRE(exact.has_value());
  REQUIRE(direct.has_value());
  CHECK(direct->earliest->time_of_flight == doctest::Approx(exact->earliest->time_of_flight).epsilon(1e-9));
  CHECK(direct->latest->time_of_flight == doctest::Approx(exact->latest->time_of_flight).epsilon(1e-9));
  CHECK(meeting_miss(model, air, vec::Zero(), r, *direct->earliest) <= 1e-9);
  CHECK(meeting_miss(model, air, vec::Zero(), r, *direct->latest) <= 1e-9);
}

TEST_CASE("a receiver under quadratic drag is met") {
  const lob::medium<double> air;
  const lob::quadratic_drag<double> model{0.004};
  const lob::receiver<double> r{vec(35, 5, 0), vec(2, 1, 0)};
  lob::intercept_options<double> o;
  o.samples = 16;
  const auto m = lob::intercept(model, air, lob::intercept_request<double>{vec::Zero(), r, 30.0, 7.0}, o);
  REQUIRE(m.has_value());
  CHECK(meeting_miss(model, air, vec::Zero(), r, *m->earliest) <= 1e-9);
  CHECK(meeting_miss(model, air, vec::Zero(), r, *m->latest) <= 1e-9);
  CHECK(m->earliest->time_of_flight < m->latest->time_of_flight);
}

TEST_CASE("bad interception input gives error values") {
  const lob::medium<double> air;
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const lob::vacuum<double> model;
  const auto same = lob::intercept(
      model, air, lob::intercept_request<double>{vec::Zero(), {vec::Zero(), vec(1, 0, 0)}, 10.0, 0.0});
  REQUIRE_FALSE(same.has_value());
  CHECK(same.error() == lob::errc::invalid_argument);
  const auto badv = lob::intercept(
      model, air, lob::intercept_request<double>{vec::Zero(), {vec(5, 0, 0), vec(nan, 0, 0)}, 10.0, 0.0});
  REQUIRE_FALSE(badv.has_value());
  CHECK(badv.error() == lob::errc::invalid_argument);
  const auto badh = lob::intercept(
      model, air, lob::intercept_request<double>{vec::Zero(), {vec(5, 0, 0), vec::Zero()}, 10.0, -1.0});
  REQUIRE_FALSE(badh.has_value());
  CHECK(badh.error() == lob::errc::invalid_argument);
  const auto fast = lob::intercept(
      model, air, lob::intercept_request<double>{vec::Zero(), {vec(50, 0, 0), vec(60, 0, 0)}, 10.0, 5.0});
  REQUIRE_FALSE(fast.has_value());
  CHECK(fast.error() == lob::errc::out_of_reach);
}
