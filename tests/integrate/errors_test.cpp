// Bad input to the drag models and to integrated flight: error values with clear messages,
// never NaN, UB or an endless loop; and the fixed-step modes' reproducibility.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <cmath>
#include <cstring>
#include <string>
#include <limits>

#include "integrate/common.hpp"

using lob_test::mp50;

namespace {

template <class R>
void check_error(const R& r, lob::errc code, const char* words) {
  REQUIRE_FALSE(r);
  CHECK(r.error() == code);
  INFO("message: ", std::string(r.error().message()));
  CHECK(std::strstr(r.error().message(), words) != nullptr);
}

lob::shot<double> ball() {
  lob::shot<double> s;
  s.velocity = lob::launch_velocity(40.0, lob::deg(35.0));
  return s;
}

}  // namespace

TEST_CASE_TEMPLATE("drag model factories compute their coefficients and reject bad input", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  const T g = lob::standard_gravity<T>();
  const auto q = lob::quadratic_drag<T>::from_terminal_speed(T(33), g);
  REQUIRE(q);
  CHECK(lob_test::rel_err(q->coefficient, T(g / T(1089))) <= T(4) * std::numeric_limits<T>::epsilon());
  CHECK(lob_test::rel_err(q->terminal_speed(g), T(33)) <= T(4) * std::numeric_limits<T>::epsilon());
  // The drag equation F = rho C_d A v^2 / 2 on a body of mass m: c = rho C_d A / (2 m).
  const auto b = lob::quadratic_drag<T>::from_body(T(1) / T(2), T(1) / T(50), T(1) / T(2), T(6) / T(5));
  REQUIRE(b);
  CHECK(lob_test::rel_err(b->coefficient, T(T(6) / T(5) * T(1) / T(2) * T(1) / T(50))) <=
        T(4) * std::numeric_limits<T>::epsilon());
  CHECK_FALSE(lob::quadratic_drag<T>::from_terminal_speed(T(0)));
  CHECK_FALSE(lob::quadratic_drag<T>::from_terminal_speed(T(-1)));
  CHECK_FALSE(lob::quadratic_drag<T>::from_body(T(0), T(1), T(1), T(1)));
  CHECK_FALSE(lob::quadratic_drag<T>::from_body(T(1), T(-1), T(1), T(1)));
  CHECK_FALSE(lob::quadratic_drag<T>::from_body(T(1), T(1), std::numeric_limits<T>::infinity(), T(1)));
  // Stokes' law F = 3 pi mu d v for the linear part (common practice, any fluids text).
  const auto s = lob::linear_quadratic_drag<T>::from_sphere(T(1) / T(20), T(1) / T(20), T(18) / T(1000000),
                                                            T(6) / T(5), T(47) / T(100));
  REQUIRE(s);
  const T pi = boost::math::constants::pi<T>();
  CHECK(lob_test::rel_err(s->rate, T(3 * pi * T(18) / T(1000000) * T(1) / T(20) / (T(1) / T(20)))) <=
        T(8) * std::numeric_limits<T>::epsilon());
  const auto f = lob::linear_quadratic_drag<T>::from_forces(T(2), T(1) / T(10), T(3) / T(100));
  REQUIRE(f);
  CHECK(f->rate == T(1) / T(20));
  // Terminal speed: the root of c v^2 + k v = g.
  const T vt = f->terminal_speed(g);
  CHECK(lob_test::rel_err(T(f->coefficient * vt * vt + f->rate * vt), g) <=
        T(8) * std::numeric_limits<T>::epsilon());
  CHECK_FALSE(lob::linear_quadratic_drag<T>::from_forces(T(1), T(-1), T(0)));
  CHECK_FALSE(lob::linear_quadratic_drag<T>::from_sphere(T(1), T(1), T(-1), T(1), T(1)));
}

TEST_CASE("negative or non-finite coefficients are rejected by fly()") {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const double inf = std::numeric_limits<double>::infinity();
  const lob::medium<double> air;
  check_error(lob::fly(lob::quadratic_drag<double>{.coefficient = -0.1}, air, ball()),
              lob::errc::invalid_argument, "must be >= 0, got -0.1");
  check_error(lob::fly(lob::quadratic_drag<double>{.coefficient = nan}, air, ball()),
              lob::errc::invalid_argument, "must be finite, got nan");
  check_error(lob::fly(lob::linear_quadratic_drag<double>{.rate = -1, .coefficient = 0.01}, air, ball()),
              lob::errc::invalid_argument, "linear drag rate must be >= 0");
  check_error(lob::fly(lob::linear_quadratic_drag<double>{.rate = 0.1, .coefficient = inf}, air, ball()),
              lob::errc::invalid_argument, "quadratic drag coefficient must be finite");
  lob::medium<double> bad_wind;
  bad_wind.wind = lob::vec3<double>(nan, 0, 0);
  check_error(lob::fly(lob::quadratic_drag<double>{.coefficient = 0.01}, bad_wind, ball()),
              lob::errc::invalid_argument, "wind must be finite");
  lob::shot<double> bad_shot = ball();
  bad_shot.velocity.z() = inf;
  check_error(lob::fly(lob::quadratic_drag<double>{.coefficient = 0.01}, air, bad_shot),
              lob::errc::invalid_argument, "launch velocity must be finite");
}

TEST_CASE("options out of range are rejected") {
  const lob::quadratic_drag<double> m{.coefficient = 0.01};
  const lob::medium<double> air;
  const auto with = [&](auto change) {
    lob::flight_options<double> o;
    change(o);
    return lob::fly(m, air, ball(), o);
  };
  check_error(with([](auto& o) { o.relative_tolerance = 0; }), lob::errc::invalid_argument,
              "relative tolerance");
  check_error(with([](auto& o) { o.relative_tolerance = 1e-16; }), lob::errc::invalid_argument,
              "relative tolerance must be in [1e-15, 1e-2], got");
  check_error(with([](auto& o) { o.relative_tolerance = 0.1; }), lob::errc::invalid_argument,
              "relative tolerance");
  check_error(with([](auto& o) { o.relative_tolerance = std::nan(""); }), lob::errc::invalid_argument,
              "relative tolerance");
  check_error(with([](auto& o) { o.absolute_tolerance = 0; }), lob::errc::invalid_argument,
              "absolute tolerance");
  check_error(with([](auto& o) { o.absolute_tolerance = -1e-9; }), lob::errc::invalid_argument,
              "absolute tolerance");
  check_error(with([](auto& o) { o.initial_step = -1; }), lob::errc::invalid_argument, "initial step");
  check_error(with([](auto& o) { o.fixed_step = 0; }), lob::errc::invalid_argument, "fixed step");
  check_error(with([](auto& o) { o.max_steps = 0; }), lob::errc::invalid_argument, "max_steps");
  check_error(with([](auto& o) { o.max_time = std::numeric_limits<double>::infinity(); }),
              lob::errc::invalid_argument, "max_time");
  CHECK(with([](auto& o) { o.relative_tolerance = 1e-15; }));
  CHECK(with([](auto& o) { o.relative_tolerance = 1e-2; }));
}

TEST_CASE("bad query arguments are error values") {
  const auto f = lob::fly(lob::quadratic_drag<double>{.coefficient = 0.01}, lob::medium<double>{}, ball());
  REQUIRE(f);
  check_error(f->at(-1.0), lob::errc::invalid_argument, "time must be finite");
  check_error(f->at(std::nan("")), lob::errc::invalid_argument, "time must be finite");
  check_error(f->crossing(std::nan(""), lob::side::rising), lob::errc::invalid_argument,
              "height must be finite");
  check_error(f->at_distance(-2.0), lob::errc::invalid_argument, "distance must be finite");
  std::array<lob::state<double>, 3> out;
  check_error(f->sample(out, -1.0), lob::errc::invalid_argument, "sample end time");
  for (const bool fast : {true, false}) {
    lob::flight_options<double> o;
    o.use_fast_paths = fast;
    const auto g =
        lob::fly(lob::quadratic_drag<double>{.coefficient = 0.01}, lob::medium<double>{}, ball(), o);
    check_error(g->crossing(1000.0, lob::side::falling), lob::errc::never_reaches, "above the apex");
    check_error(g->crossing(1000.0, lob::side::rising), lob::errc::never_reaches, "above the apex");
    check_error(g->crossing(-5.0, lob::side::rising), lob::errc::never_reaches, "rising branch starts above");
  }
}

TEST_CASE("a flight that never lands is an error value, not a hang") {
  const lob::quadratic_drag<double> m{.coefficient = 0.01};  // terminal speed 31.3 m/s
  // No gravity: no height is ever crossed on the way down.
  lob::medium<double> space;
  space.gravity = lob::vec3<double>::Zero();
  const auto f = lob::fly(m, space, ball());
  REQUIRE(f);
  check_error(f->landing(), lob::errc::invalid_argument, "need gravity");
  check_error(f->apex(), lob::errc::invalid_argument, "apex needs gravity");
  CHECK(f->at(2.0));  // the path itself is still defined
  // An updraft faster than the terminal speed carries the body up for good.
  lob::medium<double> updraft;
  updraft.wind = lob::vec3<double>(0, 0, 35);
  for (const auto method : {lob::stepper::adaptive, lob::stepper::rk4, lob::stepper::semi_implicit_euler}) {
    lob::flight_options<double> o;
    o.method = method;
    const auto g = lob::fly(m, updraft, ball(), o);
    REQUIRE(g);
    check_error(g->landing(), lob::errc::never_reaches, "updraft");
    check_error(g->apex(), lob::errc::never_reaches, "no apex");
    CHECK(g->crossing(50.0, lob::side::rising));  // it does rise through 50 m
  }
  // Thrown down into that updraft from a height, it turns up before reaching the ground.
  lob::shot<double> down;
  down.position = lob::vec3<double>(0, 0, 100);
  down.velocity = lob::vec3<double>(5, 0, -20);
  const auto h = lob::fly(m, updraft, down);
  check_error(h->landing(), lob::errc::never_reaches, "turns up");
  CHECK(h->landing(99.0));  // but it does sink through 99 m first
}

TEST_CASE("reaching a cap is an error value") {
  const lob::quadratic_drag<double> m{.coefficient = 0.01};
  for (const auto method : {lob::stepper::adaptive, lob::stepper::rk4, lob::stepper::semi_implicit_euler}) {
    lob::flight_options<double> few = lob_test::integrated(1e-9);
    few.method = method;
    few.max_steps = 5;
    check_error(lob::fly(m, lob::medium<double>{}, ball(), few)->landing(), lob::errc::step_limit,
                "max_steps");
    lob::flight_options<double> short_time = lob_test::integrated(1e-9);
    short_time.method = method;
    short_time.max_time = 1.0;
    const auto f = lob::fly(m, lob::medium<double>{}, ball(), short_time);
    check_error(f->landing(), lob::errc::time_limit, "max_time");
    check_error(f->at(2.0), lob::errc::time_limit, "max_time");
    CHECK(f->at(0.5));
  }
  // A vertical throw never moves sideways: never_reaches, as the closed forms say (issue 17).
  lob::shot<double> up;
  up.velocity = lob::vec3<double>(0, 0, 20);
  lob::flight_options<double> o;
  o.max_time = 1000;
  check_error(lob::fly(m, lob::medium<double>{}, up, o)->at_distance(1.0), lob::errc::never_reaches,
              "sideways");
}

TEST_CASE("fixed-step modes are reproducible bit for bit and step as engines do") {
  const lob::linear_quadratic_drag<double> m{.rate = 0.05, .coefficient = 0.008};
  lob::medium<double> air;
  air.wind = lob::vec3<double>(1.5, -2.0, 0.0);
  lob::flight_options<double> o;
  o.method = lob::stepper::semi_implicit_euler;
  o.fixed_step = 1.0 / 60.0;
  const auto a = lob::fly(m, air, ball(), o);
  const auto b = lob::fly(m, air, ball(), o);
  // The loop a game engine runs: velocity first, then position, every 1/60 s.
  lob::vec3<double> p = ball().position, v = ball().velocity;
  for (int n = 1; n <= 120; ++n) {
    v = v + o.fixed_step * (air.gravity + m.acceleration(lob::vec3<double>(v - air.wind)));
    p = p + o.fixed_step * v;
    const auto s = a->at(n * o.fixed_step);
    REQUIRE(s);
    CHECK(std::memcmp(s->position.data(), p.data(), sizeof(double) * 3) == 0);
    CHECK(std::memcmp(s->velocity.data(), v.data(), sizeof(double) * 3) == 0);
  }
  const double ta = a->landing()->time, tb = b->landing()->time;
  CHECK(std::memcmp(&ta, &tb, sizeof ta) == 0);
  o.method = lob::stepper::rk4;
  const auto c = lob::fly(m, air, ball(), o);
  const auto d = lob::fly(m, air, ball(), o);
  const double rc = *c->range(), rd = *d->range();
  CHECK(std::memcmp(&rc, &rd, sizeof rc) == 0);
}

TEST_CASE("fixed-step landings on the Hermite interpolant beat a straight line between steps") {
  // RK4 at 60 Hz: the steps themselves are accurate to about 1e-9; the landing between two
  // steps is where a straight line loses accuracy (its error is second order in the step).
  const auto rows = lob_test::load_reference<double>();
  const auto& r = rows.front();
  REQUIRE(r.name == "ball_vt33");
  lob::flight_options<double> o;
  o.method = lob::stepper::rk4;
  o.fixed_step = 1.0 / 60.0;
  const auto f = lob::fly(lob::quadratic_drag<double>{.coefficient = r.c}, r.air, r.launch, o);
  const auto land = f->landing();
  REQUIRE(land);
  const int n = static_cast<int>(std::floor(land->time / o.fixed_step));
  const auto s0 = f->at(n * o.fixed_step);
  const auto s1 = f->at((n + 1) * o.fixed_step);
  const double z0 = s0->position.z(), z1 = s1->position.z();
  REQUIRE(z0 > 0);
  REQUIRE(z1 <= 0);
  const double t_line = (n + z0 / (z0 - z1)) * o.fixed_step;
  const double err_hermite = std::abs(land->time - r.landing_time) / r.landing_time;
  const double err_line = std::abs(t_line - r.landing_time) / r.landing_time;
  INFO("relative landing-time error: Hermite ", err_hermite, ", straight line ", err_line);
  CHECK(err_hermite < 1e-7);
  CHECK(err_line > 100 * err_hermite);
}
