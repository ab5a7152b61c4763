// lob/batch: the batch states equal the scalar queries body by body, to the last bit (the
// same formulas in the same order), for vacuum, linear drag and every linear engine rule,
// in float and double; bad columns and bodies are errors naming the body.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <random>
#include <vector>

#include "lob/batch/batch_states.hpp"
#include "lob/flight.hpp"
#include "lob/step/stepped_flight.hpp"

using namespace lob;

namespace {

template <class T>
struct bodies {
  std::vector<T> x, y, z, vx, vy, vz;
  std::vector<T> ox, oy, oz, ovx, ovy, ovz;
  explicit bodies(std::size_t n) : x(n), y(n), z(n), vx(n), vy(n), vz(n), ox(n), oy(n), oz(n), ovx(n), ovy(n), ovz(n) {
    std::mt19937 rng(11);
    std::uniform_real_distribution<double> u(-1, 1);
    for (std::size_t i = 0; i < n; ++i) {
      x[i] = T(40 * u(rng)), y[i] = T(40 * u(rng)), z[i] = T(2 + u(rng));
      vx[i] = T(25 * u(rng)), vy[i] = T(25 * u(rng)), vz[i] = T(5 + 15 * u(rng));
    }
  }
  shot_columns<T> in() const { return {x, y, z, vx, vy, vz}; }
  state_columns<T> out() { return {ox, oy, oz, ovx, ovy, ovz}; }
  shot<T> launch(std::size_t i) const {
    return {vec3<T>(x[i], y[i], z[i]), vec3<T>(vx[i], vy[i], vz[i])};
  }
  bool equals(std::size_t i, const vec3<T>& p, const vec3<T>& v) const {
    return p.x() == ox[i] && p.y() == oy[i] && p.z() == oz[i] && v.x() == ovx[i] && v.y() == ovy[i] && v.z() == ovz[i];
  }
};

}  // namespace

TEST_CASE_TEMPLATE("batch states at t equal fly().at(t) bit for bit", T, float, double) {
  bodies<T> b(1000);  // several blocks and a partial one
  medium<T> air{};
  air.wind = vec3<T>(T(3), T(-1), T(0.5));
  for (const T t : {T(0), T(0.37), T(2.5)}) {
    REQUIRE(states_at(vacuum<T>{}, air, b.in(), t, b.out()));
    int same = 0;
    for (std::size_t i = 0; i < b.x.size(); ++i) {
      const auto s = fly(vacuum<T>{}, air, b.launch(i))->at(t);
      same += b.equals(i, s->position, s->velocity);
    }
    CHECK(same == 1000);
    const linear_drag<T> drag{T(0.2)};
    REQUIRE(states_at(drag, air, b.in(), t, b.out()));
    same = 0;
    for (std::size_t i = 0; i < b.x.size(); ++i) {
      const auto s = fly(drag, air, b.launch(i))->at(t);
      same += b.equals(i, s->position, s->velocity);
    }
    CHECK(same == 1000);
  }
}

TEST_CASE_TEMPLATE("batch states at step n equal stepped_flight::at_step(n) bit for bit", T, float, double) {
  bodies<T> b(600);
  const medium<T> air{};
  for (euler_order o : {euler_order::velocity_first, euler_order::position_first})
    for (damping_rule r : {damping_rule::power, damping_rule::rational, damping_rule::linear, damping_rule::factor}) {
      engine_step<T> rule;
      rule.order = o;
      rule.rule = r;
      rule.damping = r == damping_rule::factor ? T(0.997) : (r == damping_rule::power ? T(0.1) : T(0.25));
      for (const std::int64_t n : {0, 1, 77, 400}) {
        REQUIRE(states_at_step(rule, air, b.in(), n, b.out()));
        int same = 0;
        for (std::size_t i = 0; i < b.x.size(); ++i) {
          const auto s = fly(rule, air, b.launch(i))->at_step(n);
          same += b.equals(i, s->position, s->velocity);
        }
        CHECK(same == 600);
      }
    }
}

TEST_CASE("batch errors name the body") {
  bodies<double> b(300);
  const medium<double> air{};
  shot_columns<double> short_in = b.in();
  short_in.vz = short_in.vz.first(299);
  CHECK(states_at(vacuum<double>{}, air, short_in, 1.0, b.out()).error() == errc::invalid_argument);
  CHECK(states_at(vacuum<double>{}, air, b.in(), -1.0, b.out()).error() == errc::invalid_argument);
  b.vy[280] = std::numeric_limits<double>::quiet_NaN();
  const auto bad = states_at(vacuum<double>{}, air, b.in(), 1.0, b.out());
  REQUIRE(!bad);
  CHECK(bad.error() == errc::invalid_argument);
  CHECK(bad.error().message() == std::string("batch launch must be finite, with a representable speed; body, got 280"));
  b.vy[280] = 1e200;  // its square overflows: fly() refuses it too
  CHECK(!states_at(vacuum<double>{}, air, b.in(), 1.0, b.out()));
  CHECK(!fly(vacuum<double>{}, air, b.launch(280)));
  b.vy[280] = 1e150;
  CHECK(!states_at(vacuum<double>{}, air, b.in(), 1e300, b.out()));  // the state overflows
  engine_step<double> quad;
  quad.quadratic = 0.01;
  CHECK(states_at_step(quad, air, b.in(), 3, b.out()).error() == errc::invalid_argument);
  CHECK(states_at(vacuum<double>{}, air, shot_columns<double>{}, 1.0, state_columns<double>{}));  // no bodies
}
