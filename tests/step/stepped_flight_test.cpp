// lob/step: the engine step flown as the engine flies it, and its closed forms.
// - replay() against a stepping loop written here on plain arrays, for every rule, both
//   Euler orders, both gravity timings, with and without the quadratic term, in float and
//   double: equal to the last bit (IEEE arithmetic, same operation order).
// - at_step(), apex() and crossing() of the linear rules against the same recurrence
//   stepped in 50-digit arithmetic (Boost.Multiprecision cpp_bin_float_50) from the
//   factor the engine uses: positions within a stated ulp bound, steps equal.
#include <doctest/doctest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <array>
#include <cmath>
#include <cstdint>
#include <vector>

#include "lob/step/stepped_flight.hpp"
#include "step/plain_engine.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;
using namespace lob;
using step_test::engine_of;
using step_test::every_rule;

namespace {

template <class T>
shot<T> lob_shot() {  // a lob from 1.2 m at 21 m/s, 40 degrees, slightly to the side
  return shot<T>{vec3<T>(T(0), T(0), T(1.2)), vec3<T>(T(16.1), T(2.5), T(13.5))};
}

template <class T>
T ulp_of(const T& scale) {
  return T(std::numeric_limits<T>::epsilon() * scale);
}

}  // namespace

TEST_CASE_TEMPLATE("replay equals an engine loop to the last bit, every rule", T, float, double) {
  const medium<T> air{};
  const shot<T> launch = lob_shot<T>();
  for (T c : {T(0), T(0.004)})
    for (T dt : {T(1) / T(30), T(1) / T(60), T(1) / T(240)})
      for (const engine_step<T>& rule : every_rule<T>(dt, T(0.35), c)) {
        const auto flight = fly(rule, air, launch);
        REQUIRE(flight);
        auto e = engine_of<T>(rule, air, launch);
        for (std::int64_t n = 1; n <= 400; ++n) {
          e.step();
          if (n % 37 != 0 && n != 400) continue;
          const auto s = flight->replay(n);
          REQUIRE(s);
          for (int i = 0; i < 3; ++i) {
            CHECK(s->position[i] == e.x[i]);
            CHECK(s->velocity[i] == e.v[i]);
          }
        }
        if (c != T(0)) {  // with the quadratic term at_step is the loop itself
          const auto s = flight->at_step(400);
          REQUIRE(s);
          CHECK(s->position.x() == e.x[0]);
        }
      }
}

TEST_CASE_TEMPLATE("closed form equals the 50-digit recurrence", T, float, double) {
  // The reference steps the recurrence in 50 digits from the engine's rounded factor, so
  // it is the exact answer the closed form claims; the engine's own loop in T drifts from
  // it by its roundings (measured below, not bounded).
  const medium<T> air{};
  const shot<T> launch = lob_shot<T>();
  // float: the closed form is evaluated in double, so within 1 ulp of float of the scale;
  // double: within 8 ulps of the scale (measured worst 1.5 over these cases).
  const T bound = std::is_same_v<T, float> ? T(1) : T(8);
  T worst = 0, worst_loop = 0;
  for (T d : {T(0), T(1e-12), T(1e-6), T(0.02), T(0.35), T(3), T(40)})
    for (const engine_step<T>& rule : every_rule<T>(T(1) / T(60), d, T(0))) {
      if (rule.rule == damping_rule::linear && !(d * rule.dt < T(1))) continue;
      const auto flight = fly(rule, air, launch);
      REQUIRE(flight);
      CHECK(flight->closed_form());
      auto ref = engine_of<mp50>(rule, air, launch);
      auto loop = engine_of<T>(rule, air, launch);
      for (std::int64_t n = 1; n <= 1200; ++n) {
        ref.step();
        loop.step();
        if (n % 97 != 0) continue;
        const auto s = flight->at_step(n);
        REQUIRE(s);
        const T scale = T(1) + T(n) * rule.dt * T(launch.velocity.norm()) + T(n * n) * rule.dt * rule.dt * T(10);
        for (int i = 0; i < 3; ++i) {
          const T err = T(abs(mp50(s->position[i]) - ref.x[i]) / ulp_of(scale));
          const T verr = T(abs(mp50(s->velocity[i]) - ref.v[i]) / ulp_of(T(T(1) + T(n) * rule.dt * T(10) + T(30))));
          worst = std::max(worst, std::max(err, verr));
          worst_loop = std::max(worst_loop, T(abs(mp50(loop.x[i]) - ref.x[i]) / ulp_of(scale)));
          CHECK(err <= bound);
          CHECK(verr <= bound);
        }
      }
    }
  MESSAGE("closed form vs 50-digit recurrence, worst ", double(worst), " ulps of the scale; the engine's own loop in T: ",
          double(worst_loop));
}

TEST_CASE_TEMPLATE("apex and crossing steps of the closed form are the recurrence's", T, float, double) {
  const medium<T> air{};
  for (T elev_z : {T(-4), T(0.0), T(0.3), T(6), T(13.5), T(40)})
    for (T d : {T(0), T(1e-9), T(0.2), T(2.5)})
      for (const engine_step<T>& rule : every_rule<T>(T(1) / T(50), d, T(0))) {
        const shot<T> launch{vec3<T>(T(0), T(0), T(2)), vec3<T>(T(11), T(-1), elev_z)};
        const auto flight = fly(rule, air, launch);
        REQUIRE(flight);
        // The reference: the recurrence in 50 digits, heights at every step.
        auto ref = engine_of<mp50>(rule, air, launch);
        std::vector<mp50> z{ref.x[2]};
        for (int n = 0; n < 20000 && ref.x[2] > mp50(-30); ++n) {
          ref.step();
          z.push_back(ref.x[2]);
        }
        std::int64_t top = 0;
        while (top + 1 < std::int64_t(z.size()) && z[top + 1] > z[top]) ++top;
        const auto apex = flight->apex();
        REQUIRE(apex);
        CHECK(apex->step == top);
        for (T h : {T(-20), T(0), T(1), T(2), T(2.5), T(9)}) {
          const auto fall = flight->crossing(h, side::falling);
          const auto rise = flight->crossing(h, side::rising);
          std::int64_t nf = top + 1;
          while (nf < std::int64_t(z.size()) && z[nf] > mp50(h)) ++nf;
          if (z[top] < mp50(h)) {
            CHECK(!fall);
            CHECK(!rise);
            if (!fall) CHECK(fall.error() == errc::never_reaches);
            continue;
          }
          REQUIRE(fall);
          CHECK(fall->step == nf);
          CHECK(fall->fraction >= T(0));
          CHECK(fall->fraction <= T(1));
          CHECK(fall->point.position.z() == doctest::Approx(double(h)).epsilon(1e-5));
          if (z[0] > mp50(h)) {
            CHECK(!rise);
          } else {
            std::int64_t nr = 0;
            while (z[nr] < mp50(h)) ++nr;
            REQUIRE(rise);
            CHECK(rise->step == nr);
          }
        }
      }
}

TEST_CASE_TEMPLATE("the quadratic term: apex and landing steps by stepping equal the loop's", T, float, double) {
  const medium<T> air{};
  const shot<T> launch = lob_shot<T>();
  for (const engine_step<T>& rule : every_rule<T>(T(1) / T(60), T(0.1), T(0.01))) {
    const auto flight = fly(rule, air, launch);
    REQUIRE(flight);
    CHECK(!flight->closed_form());
    auto e = engine_of<T>(rule, air, launch);
    std::vector<T> z{e.x[2]};
    while (e.x[2] > T(0)) {
      e.step();
      z.push_back(e.x[2]);
    }
    std::int64_t top = 0;
    while (z[top + 1] > z[top]) ++top;
    const auto apex = flight->apex();
    REQUIRE(apex);
    CHECK(apex->step == top);
    const auto land = flight->landing(T(0));
    REQUIRE(land);
    CHECK(land->step == std::int64_t(z.size()) - 1);
    const T s = z[z.size() - 2] / (z[z.size() - 2] - z.back());
    CHECK(land->fraction == doctest::Approx(double(s)).epsilon(1e-5));
  }
}

TEST_CASE("the engine's step against the continuous flight it approximates") {
  // Vacuum: semi-implicit Euler at 60 Hz lands short of the parabola; the difference is
  // first order in dt (x_n = x0 + n dt v0 + g dt^2 n(n+1)/2, common practice).
  const medium<double> air{};
  const shot<double> launch{vec3<double>(0, 0, 0), vec3<double>(20, 0, 15)};
  engine_step<double> rule;
  rule.damping = 0;
  const auto flight = fly(rule, air, launch);
  REQUIRE(flight);
  const auto range = flight->range(0.0);
  REQUIRE(range);
  const double exact = 2 * 20.0 * 15.0 / 9.80665;  // vacuum range, level ground
  const double rel = (*range - exact) / exact;
  MESSAGE("60 Hz semi-implicit Euler vacuum range ", *range, " m vs the parabola's ", exact, " m: ", 100 * rel, " %");
  CHECK(rel < 0);
  CHECK(rel > -0.03);
}

TEST_CASE("bad engine steps and media are errors naming the value") {
  const medium<double> air{};
  const shot<double> launch = lob_shot<double>();
  engine_step<double> rule;
  for (double dt : {0.0, -1.0, std::nan(""), HUGE_VAL}) {
    rule.dt = dt;
    const auto f = fly(rule, air, launch);
    REQUIRE(!f);
    CHECK(f.error() == errc::invalid_argument);
  }
  rule = {};
  rule.rule = damping_rule::linear;
  rule.damping = 60;  // dt d = 1: the factor is zero
  CHECK(!fly(rule, air, launch));
  rule.rule = damping_rule::power;
  rule.damping = 1.5;
  CHECK(!fly(rule, air, launch));
  rule = {};
  rule.quadratic = -1;
  CHECK(!fly(rule, air, launch));
  medium<double> windy{};
  windy.wind = vec3<double>(1, 0, 0);
  CHECK(!fly(engine_step<double>{}, windy, launch));
  const auto f = fly(engine_step<double>{}, air, launch);
  REQUIRE(f);
  CHECK(f->at_step(-1).error() == errc::invalid_argument);
  CHECK(f->at_step(stepped_flight<double>::default_max_steps + 1).error() == errc::step_limit);
  CHECK(f->crossing(1e9, side::falling).error() == errc::never_reaches);
  CHECK(f->crossing(std::nan(""), side::falling).error() == errc::invalid_argument);
  CHECK(f->at(-1.0).error() == errc::invalid_argument);
  medium<double> none{};
  none.gravity = vec3<double>::Zero();
  const auto drift = fly(engine_step<double>{}, none, launch);
  REQUIRE(drift);
  CHECK(drift->apex().error() == errc::invalid_argument);
  CHECK(drift->at_step(10));
}
