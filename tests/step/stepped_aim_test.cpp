// lob/step/stepped_aim.hpp: aims for an engine's stepped body, checked by flying them with
// the plain engine loop of tests/step/plain_engine.hpp (written without lob's stepping
// code) and interpolating between its steps as the engine does.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdint>
#include <limits>
#include <string>

#include "lob/step/stepped_aim.hpp"
#include "step/plain_engine.hpp"

using namespace lob;
using step_test::engine_of;
using step_test::every_rule;

namespace {

// The engine's body at tau = step - 1 + fraction steps, by its own loop in T.
template <class T>
vec3<T> flown_to(const engine_step<T>& rule, const medium<T>& air, const vec3<T>& from, const vec3<T>& velocity,
                 std::int64_t step, T fraction) {
  auto e = engine_of<T>(rule, air, shot<T>{from, velocity});
  vec3<T> before(e.x[0], e.x[1], e.x[2]);
  for (std::int64_t n = 0; n < step; ++n) {
    before = vec3<T>(e.x[0], e.x[1], e.x[2]);
    e.step();
  }
  const vec3<T> after(e.x[0], e.x[1], e.x[2]);
  return step == 0 ? after : vec3<T>(before + (after - before) * fraction);
}

}  // namespace

TEST_CASE_TEMPLATE("stepped aims flown by the engine loop meet the target", T, float, double) {
  const medium<T> air{};
  // The miss is the engine loop's own rounding over hundreds of steps and the rounding of
  // the velocity to T: bound 16 ulps of the scale (measured worst 3.8 in float, 4.9 in
  // double).
  const T ulps = T(16);
  T worst = 0;
  int solutions = 0, unreachable = 0;
  for (T d : {T(0), T(1e-7), T(0.15), T(1.2)})
    for (const engine_step<T>& rule : every_rule<T>(T(1) / T(60), d, T(0)))
      for (const vec3<T>& target : {vec3<T>(T(30), T(0), T(0)), vec3<T>(T(12), T(-7), T(4)),
                                    vec3<T>(T(2), T(1), T(-6)), vec3<T>(T(0.5), T(0), T(0.2))})
        for (const vec3<T>& moving : {vec3<T>::Zero().eval(), vec3<T>(T(-2), T(1.5), T(0))}) {
          const stepped_aim_request<T> req{vec3<T>(T(0), T(0), T(1)), target, T(24), moving};
          const auto s = aim(rule, air, req);
          INFO("d ", double(d), " order ", int(rule.order), " rule ", int(rule.rule), " gravity ", int(rule.gravity),
               " target ", double(target.x()), " moving ", double(moving.x()), ": ",
               std::string(s ? "" : s.error().message()));
          if (!s) {  // strong damping: out of reach, with a least speed above the asked one
            REQUIRE(s.error() == errc::out_of_reach);
            CHECK(s.error().detail_value() > req.speed);
            ++unreachable;
            continue;
          }
          CHECK(s->count() >= 1);
          if (s->flat && s->lofted) CHECK(s->flat->solution.time_of_flight < s->lofted->solution.time_of_flight);
          for (const auto& one : {s->flat, s->lofted}) {
            if (!one) continue;
            ++solutions;
            const aim_solution<T>& a = one->solution;
            CHECK(a.speed == doctest::Approx(double(req.speed)).epsilon(double(8 * std::numeric_limits<T>::epsilon())));
            CHECK(a.time_of_flight == doctest::Approx(double((T(one->step - 1) + one->fraction) * rule.dt)));
            const vec3<T> at = flown_to(rule, air, req.launch_point, a.velocity, one->step, one->fraction);
            const vec3<T> goal = target + moving * a.time_of_flight;
            const T scale = T(1) + T(target.norm()) + req.speed * a.time_of_flight +
                            T(10) * a.time_of_flight * a.time_of_flight;
            const T miss = T((at - goal).norm()) / (std::numeric_limits<T>::epsilon() * scale);
            worst = std::max(worst, miss);
            CHECK(miss <= ulps);
          }
        }
  CHECK(solutions > 400);
  MESSAGE(unreachable, " out of reach; ", solutions, " stepped aims flown by the engine loop: worst miss ", double(worst), " ulps of the scale");
}

TEST_CASE_TEMPLATE("velocity_to_meet puts the engine's body on the target at that step", T, float, double) {
  const medium<T> air{};
  for (const engine_step<T>& rule : every_rule<T>(T(1) / T(30), T(0.4), T(0)))
    for (int n : {1, 7, 45, 300}) {
      const vec3<T> from(T(0), T(0), T(1.5)), target(T(20), T(5), T(0));
      const vec3<T> moving(T(0), T(-1), T(0));
      const auto v = velocity_to_meet(rule, air, from, target, T(n), moving);
      REQUIRE(v);
      const vec3<T> at = flown_to(rule, air, from, *v, n, T(1));
      const T t = T(n) * rule.dt;
      const T scale = T(1) + T(target.norm()) + T(v->norm()) * t + T(10) * t * t;
      CHECK(T((at - (target + moving * t)).norm()) <= T(64) * std::numeric_limits<T>::epsilon() * scale);
    }
}

TEST_CASE("out of reach carries the least speed that reaches") {
  const medium<double> air{};
  engine_step<double> rule;
  rule.damping = 0.3;
  const stepped_aim_request<double> far{vec3<double>(0, 0, 0), vec3<double>(80, 0, 0), 15.0};
  const auto s = aim(rule, air, far);
  REQUIRE(!s);
  CHECK(s.error() == errc::out_of_reach);
  const double least = double(s.error().detail_value());
  CHECK(least > 15.0);
  stepped_aim_request<double> just = far;
  just.speed = least * (1 + 1e-6);
  const auto ok = aim(rule, air, just);
  REQUIRE(ok);
  CHECK(ok->count() >= 1);
  if (ok->flat && ok->lofted)  // near the edge the two meet
    CHECK(std::abs(ok->flat->solution.elevation - ok->lofted->solution.elevation) < 0.01);
}

TEST_CASE("a finer step approaches the continuous aim (lob::aim, vacuum)") {
  const medium<double> air{};
  const aim_request<double> cont{vec3<double>(0, 0, 0), vec3<double>(40, 0, 0), 25.0};
  const auto exact = aim(vacuum<double>{}, air, cont);
  REQUIRE(exact);
  REQUIRE(exact->flat);
  double previous = 1;
  for (double hz : {30.0, 300.0, 3000.0}) {
    engine_step<double> rule;
    rule.dt = 1 / hz;
    const auto s = aim(rule, air, stepped_aim_request<double>{cont.launch_point, cont.target, cont.speed});
    REQUIRE(s);
    REQUIRE(s->flat);
    const double diff = std::abs(s->flat->solution.elevation - exact->flat->elevation);
    MESSAGE(hz, " Hz: flat elevation differs from the continuous aim by ", diff, " rad");
    CHECK(diff < previous / 5);  // first order in dt: 10x finer, about 10x closer
    previous = diff;
  }
}

TEST_CASE("a far, fast target: the meeting fraction keeps its accuracy where the quadratic's coefficients cancel") {
  // Found by fuzz_step: the target passes 4.4e9 m away at 5.3e11 m/s, so M = X + V t - ...
  // is small against its parts and Q(s) = |M|^2 - u^2 A^2 cancels; the fraction is
  // polished by Newton's method on |M| - u A. Flown by the engine loop it meets the target
  // within the rounding of the target's own coordinates (an ulp of 5e11 m/s x 0.013 s).
  medium<double> air{};
  air.gravity = vec3<double>(12.505378805218584, 2.1463340199893182, -1.24094184831394e-12);
  engine_step<double> rule;
  rule.dt = 0.0067114093959731542;
  rule.damping = 0.32899977111467155;
  const vec3<double> from(964.961, 260.009, 801.2);
  const vec3<double> target(4440431086.894927, 260.00900000000001, 801.20001713464183);
  const vec3<double> moving(-533092376537.52966, 7.0498207064927136, 1.8452735179674988);
  const auto s = aim(rule, air, stepped_aim_request<double>{from, target, 404.602, moving});
  INFO(std::string(s ? "" : s.error().message()));
  REQUIRE(s);
  REQUIRE(s->flat);
  const auto& a = s->flat->solution;
  const vec3<double> at = flown_to(rule, air, from, a.velocity, s->flat->step, s->flat->fraction);
  const double miss = (at - (target + moving * a.time_of_flight)).norm();
  MESSAGE("miss ", miss, " m");
  CHECK(miss < 1e-3);  // was 6.2 m from the quadratic alone
}

TEST_CASE("bad stepped aims are errors") {
  const medium<double> air{};
  engine_step<double> rule;
  const stepped_aim_request<double> ok{vec3<double>(0, 0, 0), vec3<double>(10, 0, 0), 20.0};
  const auto fine = aim(rule, air, ok);
  INFO(std::string(fine ? "" : fine.error().message()));
  CHECK(fine);
  auto bad = ok;
  bad.speed = 0;
  CHECK(aim(rule, air, bad).error() == errc::invalid_argument);
  bad = ok;
  bad.target = bad.launch_point;
  CHECK(aim(rule, air, bad).error() == errc::invalid_argument);
  bad = ok;
  bad.target.x() = std::numeric_limits<double>::infinity();
  CHECK(aim(rule, air, bad).error() == errc::invalid_argument);
  bad = ok;
  bad.target_velocity.y() = 1e300;
  CHECK(aim(rule, air, bad).error() == errc::invalid_argument);
  engine_step<double> quad = rule;
  quad.quadratic = 0.01;
  CHECK(aim(quad, air, ok).error() == errc::invalid_argument);
  medium<double> windy{};
  windy.wind.x() = 3;
  CHECK(aim(rule, windy, ok).error() == errc::invalid_argument);
  CHECK(velocity_to_meet(rule, air, ok.launch_point, ok.target, 0.0).error() == errc::invalid_argument);
  CHECK(velocity_to_meet(rule, air, ok.launch_point, ok.target, std::nan("")).error() == errc::invalid_argument);
}
