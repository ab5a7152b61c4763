// From a body and the air to a drag model: factories, the speed-dependent model, and the
// recommendation of a model for a speed range.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cmath>
#include <cstring>
#include <limits>
#include <string>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

static_assert(lob::DragModel<lob::correlated_drag<double>>);
static_assert(lob::DragModel<lob::correlated_drag<mp50>>);

namespace {
lob::air_properties<double> sea_air() { return *lob::site_air(lob::site<double>{}); }
lob::sphere<double> solid(double density, double diameter) {
  return {density * boost::math::constants::pi<double>() * diameter * diameter * diameter / 6, diameter};
}
}  // namespace

TEST_CASE_TEMPLATE("the factories build each model from the body and the air", T, float, double, long double
                   LOB_AND_WIDE(mp50)) {
  const lob::air_properties<T> air{T(12) / T(10), T(18) / T(1000000), T(340), T(293), T(101325)};
  const lob::sphere<T> ball{T(57) / T(1000), T(67) / T(1000)};
  using std::abs;
  const T eps = T(16) * std::numeric_limits<T>::epsilon();
  const T pi = boost::math::constants::pi<T>();

  const lob::result<lob::linear_drag<T>> lin = lob::make_linear_drag(ball, air);
  REQUIRE(lin.has_value());
  // Stokes' law, F = 3 pi mu d v.
  CHECK(abs(T(lin->rate / (T(3) * pi * air.dynamic_viscosity * ball.diameter / ball.mass) - 1)) <= eps);

  const lob::result<lob::quadratic_drag<T>> quad = lob::make_quadratic_drag(ball, air, T(1) / T(2));
  REQUIRE(quad.has_value());
  // The drag equation, F = Cd rho A v^2 / 2.
  CHECK(abs(T(quad->coefficient / (air.density * ball.area() / (T(4) * ball.mass)) - 1)) <= eps);

  const lob::body<T> thing{ball.mass, ball.area(), T(1) / T(2)};
  const lob::result<lob::quadratic_drag<T>> same = lob::make_quadratic_drag(thing, air);
  REQUIRE(same.has_value());
  CHECK(abs(T(same->coefficient / quad->coefficient - 1)) <= eps);
  // Its terminal speed sqrt(g / c) agrees with the general body's (no buoyancy volume).
  const lob::result<lob::terminal_state<T>> fall = lob::terminal_speed(thing, air);
  REQUIRE(fall.has_value());
  CHECK(abs(T(quad->terminal_speed() / fall->speed - 1)) <= eps);

  const lob::result<lob::linear_quadratic_drag<T>> both =
      lob::make_linear_quadratic_drag(ball, air, T(4) / T(10));
  REQUIRE(both.has_value());
  CHECK(abs(T(both->rate / lin->rate - 1)) <= eps);
  CHECK(abs(T(both->coefficient / (quad->coefficient * T(4) / T(5)) - 1)) <= eps);

  const lob::result<lob::correlated_drag<T>> corr = lob::make_correlated_drag(ball, air);
  REQUIRE(corr.has_value());
  // At rest the speed-dependent model is Stokes drag (Cd Re -> 24).
  const lob::vec3<T> creep(T(0), T(0), T(1) / T(1000000000));
  const lob::vec3<T> a = corr->acceleration(creep);
  CHECK(abs(T(a.z() / (-lin->rate * creep.z()) - 1)) <= T(1e-3));
  CHECK(corr->acceleration(lob::vec3<T>::Zero()).norm() == T(0));

  CHECK_FALSE(lob::make_quadratic_drag(ball, air, T(0)));
  CHECK_FALSE(lob::make_linear_quadratic_drag(ball, air, T(-1)));
  CHECK_FALSE(lob::make_correlated_drag(lob::sphere<T>{T(0), T(1)}, air));
}

TEST_CASE("the speed-dependent model balances gravity at the terminal speed and flies to it") {
  const lob::air_properties<double> air = sea_air();
  const lob::sphere<double> pellet = solid(7800, 0.006);  // steel, 6 mm
  const lob::result<lob::terminal_state<double>> t = lob::terminal_speed(pellet, air);
  REQUIRE(t.has_value());
  const lob::result<lob::correlated_drag<double>> model = lob::make_correlated_drag(pellet, air);
  REQUIRE(model.has_value());
  // Drag at the terminal speed = weight minus buoyancy, per unit mass.
  const lob::vec3<double> falling(0, 0, -t->speed);
  const double g_net = 9.80665 * (1 - air.density * pellet.volume() / pellet.mass);
  CHECK(model->acceleration(falling).z() == doctest::Approx(g_net).epsilon(1e-12));
  // Integrated by fly(): dropped from rest, after 40 s it falls at the terminal speed (the
  // model has no buoyancy, a 1e-4 effect for steel in air).
  const lob::shot<double> drop{lob::vec3<double>(0, 0, 5000), lob::vec3<double>::Zero()};
  const auto flight = lob::fly(*model, lob::medium<double>{}, drop);
  REQUIRE(flight.has_value());
  const lob::result<lob::state<double>> late = flight->at(40.0);
  REQUIRE(late.has_value());
  CHECK(-late->velocity.z() == doctest::Approx(t->speed).epsilon(2e-4));
}

TEST_CASE("a fine droplet is advised linear drag") {
  const lob::result<lob::model_advice<double>> a =
      lob::choose_drag_model(solid(1000, 20e-6), sea_air(), 0.0, 0.02);
  REQUIRE(a.has_value());
  CHECK(a->kind == lob::drag_kind::linear);
  CHECK(a->reynolds_max < 0.1);
  CHECK(a->linear_error < 0.05);
  CHECK(std::strstr(a->why(), "Stokes regime") != nullptr);
  CHECK(std::strstr(a->why(), "linear") != nullptr);
}

TEST_CASE("a ball at throwing speeds is advised quadratic drag with a Cd near 0.47") {
  // A 57 g, 67 mm ball of our own between 8 and 35 m/s: Re 3.6e4..1.6e5.
  const lob::sphere<double> ball{0.057, 0.067};
  const lob::result<lob::model_advice<double>> a = lob::choose_drag_model(ball, sea_air(), 8.0, 35.0);
  REQUIRE(a.has_value());
  MESSAGE(std::string(a->why()));
  CHECK(a->kind == lob::drag_kind::quadratic);
  CHECK(a->reynolds_min > 1e4);
  CHECK(a->reynolds_max < 2e5);
  CHECK(a->quadratic_cd == doctest::Approx(0.47).epsilon(0.06));  // common practice value
  CHECK(a->linear_error > 0.5);
  // The advised Cd builds the model.
  CHECK(lob::make_quadratic_drag(ball, sea_air(), a->quadratic_cd).has_value());
}

TEST_CASE("a grain in the intermediate regime needs more than one constant") {
  // A 0.5 mm sand grain (2650 kg/m^3) from rest to 4 m/s: Re 0..130.
  const lob::result<lob::model_advice<double>> a =
      lob::choose_drag_model(solid(2650, 0.5e-3), sea_air(), 0.0, 4.0);
  REQUIRE(a.has_value());
  MESSAGE(std::string(a->why()));
  CHECK(a->kind != lob::drag_kind::linear);
  CHECK(a->kind != lob::drag_kind::quadratic);
  CHECK(a->linear_quadratic_error <= a->quadratic_error);
  // A tolerance tighter than the linear-plus-quadratic fit leaves the correlation itself.
  lob::choice_options<double> strict;
  strict.tolerance = a->linear_quadratic_error / 2;
  const lob::result<lob::model_advice<double>> b =
      lob::choose_drag_model(solid(2650, 0.5e-3), sea_air(), 0.0, 4.0, strict);
  REQUIRE(b.has_value());
  CHECK(b->kind == lob::drag_kind::speed_dependent);
}

TEST_CASE("the advice's errors are what the models really make") {
  // Check the reported quadratic error independently on a finer grid of 2001 speeds.
  const lob::sphere<double> ball{0.0027, 0.040};
  const lob::air_properties<double> air = sea_air();
  const lob::result<lob::model_advice<double>> a = lob::choose_drag_model(ball, air, 2.0, 20.0);
  REQUIRE(a.has_value());
  double worst = 0;
  for (int i = 0; i <= 2000; ++i) {
    const double v = 2.0 * std::pow(10.0, i / 2000.0);
    const double re = air.density * v * ball.diameter / air.dynamic_viscosity;
    const double drag = 0.5 * air.density * v * v * ball.area() / ball.mass;
    const double a_true = drag * *lob::sphere_drag_coefficient(re);
    const double a_model = drag * a->quadratic_cd;
    worst = std::max(worst, std::abs(a_model - a_true) / std::max(a_true, 9.80665));
  }
  CHECK(worst == doctest::Approx(a->quadratic_error).epsilon(0.02));
}

TEST_CASE("bad speed ranges and out-of-range Reynolds numbers are errors") {
  const lob::sphere<double> ball{0.43, 0.22};
  const lob::air_properties<double> air = sea_air();
  CHECK(lob::choose_drag_model(ball, air, 5.0, 5.0).error() == lob::errc::invalid_argument);
  CHECK(lob::choose_drag_model(ball, air, -1.0, 5.0).error() == lob::errc::invalid_argument);
  const lob::result<lob::model_advice<double>> fast = lob::choose_drag_model(ball, air, 1.0, 40.0);
  REQUIRE_FALSE(fast);
  CHECK(std::strstr(fast.error().message(), "morrison_2013") != nullptr);
  lob::choice_options<double> wide;
  wide.correlation = lob::sphere_correlation::morrison_2013;
  CHECK(lob::choose_drag_model(ball, air, 1.0, 40.0, wide).has_value());
  lob::choice_options<double> silly;
  silly.tolerance = 0;
  CHECK_FALSE(lob::choose_drag_model(ball, air, 1.0, 10.0, silly));
}
