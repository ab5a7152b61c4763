// Terminal speed: consistent with Cd(Re), against measured falling water drops.
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

namespace {
// Terminal velocities of water drops falling in air at 1013 mb, 20 C and 50% relative
// humidity: Gunn & Kinzer (1949), "The terminal velocity of fall for water droplets in
// stagnant air", J. Meteorol. 6, 243-248, Table 2 (values from memory): equivalent
// diameter [mm], speed [m/s].
struct drop_row {
  double diameter_mm, speed;
};
constexpr drop_row gunn_kinzer[] = {
    {0.1, 0.27}, {0.2, 0.72}, {0.3, 1.17}, {0.4, 1.62}, {0.5, 2.06}, {0.6, 2.47}, {0.8, 3.27},
    {1.0, 4.03}, {1.2, 4.64}, {1.4, 5.17}, {1.6, 5.65}, {1.8, 6.09}, {2.0, 6.49}, {2.4, 7.18},
    {3.0, 8.06}, {4.0, 8.83}, {5.0, 9.09}};

lob::sphere<double> water_drop(double diameter_mm) {
  const double d = diameter_mm * 1e-3;
  // Water at 20 C: 998.2 kg/m^3 (common practice).
  return lob::sphere<double>{998.2 * boost::math::constants::pi<double>() * d * d * d / 6.0, d};
}

double log_slope(double re, lob::sphere_correlation c) {
  const double h = 1e-4;
  return (std::log(*lob::sphere_drag_coefficient(re * (1 + h), c)) -
          std::log(*lob::sphere_drag_coefficient(re * (1 - h), c))) /
         (std::log1p(h) - std::log1p(-h));
}
}  // namespace

// The claim: a correlation within e of the true Cd gives the speed within e / (2 + s),
// s = dlnCd/dlnRe (terminal_speed.hpp). Water drops up to about 1.4 mm stay close to
// spheres (Pruppacher & Klett, "Microphysics of Clouds and Precipitation", 1997, ch. 10:
// axis ratio above 0.95 below 1.4 mm; from memory); 1% is allowed for the measurement.
TEST_CASE("terminal speeds of small water drops match Gunn and Kinzer within the correlation's accuracy") {
  const lob::result<lob::air_properties<double>> air = lob::make_air(293.15, 101325.0, 0.5);
  REQUIRE(air.has_value());
  const lob::sphere_correlation tried[] = {
      lob::sphere_correlation::clift_gauvin_1970, lob::sphere_correlation::brown_lawler_2003,
      lob::sphere_correlation::morrison_2013, lob::sphere_correlation::schiller_naumann_1933};
  for (const lob::sphere_correlation c : tried) {
    double worst = 0;
    for (const drop_row& r : gunn_kinzer) {
      if (r.diameter_mm < 0.15 || r.diameter_mm > 1.45) continue;
      const lob::result<lob::terminal_state<double>> t =
          lob::terminal_speed(water_drop(r.diameter_mm), *air, c);
      REQUIRE(t.has_value());
      const double e = t->speed / r.speed - 1;
      const double bound = lob::info(c).accuracy / (2 + log_slope(t->reynolds, c)) + 0.01;
      CAPTURE(r.diameter_mm);
      CAPTURE(lob::info(c).name);
      CHECK(std::abs(e) <= bound);
      worst = std::abs(e) > std::abs(worst) ? e : worst;
    }
    MESSAGE(std::string(lob::info(c).name) << ": worst speed error, 0.2..1.4 mm drops: " << worst);
  }
  // The 0.1 mm entry as recalled (0.27 m/s) lies 9% below Stokes' speed at Re 1.8, which no
  // rigid-sphere law allows (Oseen and every correlation here add 20% to Stokes' drag at
  // that Re); we doubt our recollection of that entry and only report it.
  const lob::result<lob::terminal_state<double>> tiny = lob::terminal_speed(water_drop(0.1), *air);
  REQUIRE(tiny.has_value());
  MESSAGE("0.1 mm drop: " << tiny->speed << " m/s against 0.27 m/s recalled");
}

// Larger drops flatten into oblate spheroids and fall slower than a rigid sphere of the
// same volume (Pruppacher & Klett 1997, ch. 10; from memory): the sphere correlation
// must over-predict them, increasingly with size. What it cannot claim is their speed.
TEST_CASE("flattened rain drops fall slower than the rigid-sphere prediction") {
  const lob::result<lob::air_properties<double>> air = lob::make_air(293.15, 101325.0, 0.5);
  REQUIRE(air.has_value());
  double previous = 0;
  for (const drop_row& r : gunn_kinzer) {
    if (r.diameter_mm < 2.35) continue;
    const lob::result<lob::terminal_state<double>> t = lob::terminal_speed(water_drop(r.diameter_mm), *air);
    REQUIRE(t.has_value());
    const double over = t->speed / r.speed - 1;
    CAPTURE(r.diameter_mm);
    CHECK(over > 0.05);
    CHECK(over > previous);
    previous = over;
  }
}

// Independent reference: the balance Cd(Re) rho v^2 A / 2 = (m - rho V) g checked at the
// returned speed in 50 digits, and the speed against a bisection in 50 digits on the speed
// itself (a different unknown from lob's Re).
TEST_CASE_TEMPLATE("the terminal speed solves the force balance to the precision of T", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  const lob::air_properties<T> air{T(1225) / T(1000), T(17894) / T(1000000000), T(340), T(288), T(101325)};
  const double masses[] = {2e-6, 0.0027, 0.057, 0.45};
  const double diameters[] = {1e-3, 0.04, 0.067, 0.22};
  for (int i = 0; i < 4; ++i) {
    const lob::sphere<T> ball{T(masses[i]), T(diameters[i])};
    const lob::result<lob::terminal_state<T>> t = lob::terminal_speed(ball, air);
    REQUIRE(t.has_value());
    CAPTURE(i);
    const mp50 rho = mp50(air.density), mu = mp50(air.dynamic_viscosity), d = mp50(ball.diameter),
               m = mp50(ball.mass);
    const mp50 area = boost::math::constants::pi<mp50>() * d * d / 4;
    const mp50 w =
        (m - rho * boost::math::constants::pi<mp50>() * d * d * d / 6) * lob::standard_gravity<mp50>();
    const auto excess = [&](const mp50& v) {
      const mp50 re = rho * v * d / mu;
      return mp50(lob::detail::cd_times_re(re, lob::sphere_correlation::clift_gauvin_1970) / re * rho * v *
                      v * area / 2 -
                  w);
    };
    mp50 lo = 0, hi = 1000;
    for (int k = 0; k < 400; ++k) {
      const mp50 mid = (lo + hi) / 2;
      (excess(mid) < 0 ? lo : hi) = mid;
    }
    const mp50 want = (lo + hi) / 2;
    CHECK(abs(mp50(t->speed) / want - 1) <= mp50(32 * std::numeric_limits<T>::epsilon()));
    CHECK(t->iterations > 0);
    CHECK(t->iterations < 200);
  }
}

TEST_CASE("the lowest balance is returned where the drag crisis allows several") {
  // A light 0.3 m sphere of our own: with Morrison's curve its terminal Re lies near the
  // crisis, where Cd Re^2 is not monotonic.
  const lob::air_properties<double> air{1.225, 1.7894e-5, 340.3, 288.15, 101325};
  const lob::sphere<double> globe{0.9, 0.3};
  const lob::result<lob::terminal_state<double>> t =
      lob::terminal_speed(globe, air, lob::sphere_correlation::morrison_2013);
  REQUIRE(t.has_value());
  // No balance at a lower Reynolds number: the excess drag is negative everywhere below.
  const double n_best = 2 * (0.9 - 1.225 * globe.volume()) * 9.80665 * 1.225 * 0.09 /
                        (globe.area() * 1.7894e-5 * 1.7894e-5);
  for (int i = 1; i < 2000; ++i) {
    const double re = t->reynolds * i / 2000.0;
    CHECK(re * lob::detail::cd_times_re(re, lob::sphere_correlation::morrison_2013) < n_best);
  }
}

TEST_CASE("a general body falls at sqrt(2 W / (rho A Cd))") {
  const lob::air_properties<double> air{1.2, 1.8e-5, 340, 293, 101325};
  const lob::body<double> shuttle{0.005, 0.0028, 0.6};
  const lob::result<lob::terminal_state<double>> t = lob::terminal_speed(shuttle, air);
  REQUIRE(t.has_value());
  CHECK(t->speed == doctest::Approx(std::sqrt(2 * 0.005 * 9.80665 / (1.2 * 0.0028 * 0.6))).epsilon(1e-14));
}

TEST_CASE("terminal speeds outside the correlation or of floating bodies are errors") {
  const lob::air_properties<double> air{1.2, 1.8e-5, 340, 293, 101325};
  const lob::result<lob::terminal_state<double>> fast = lob::terminal_speed(
      lob::sphere<double>{0.05, 0.02}, air, lob::sphere_correlation::schiller_naumann_1933);
  REQUIRE_FALSE(fast);
  CHECK(fast.error() == lob::errc::invalid_argument);
  CHECK(std::strstr(fast.error().message(), "beyond the correlation's range") != nullptr);
  const lob::result<lob::terminal_state<double>> balloon =
      lob::terminal_speed(lob::sphere<double>{0.001, 0.3}, air);
  REQUIRE_FALSE(balloon);
  CHECK(balloon.error() == lob::errc::never_reaches);
  CHECK_FALSE(lob::terminal_speed(lob::sphere<double>{-1, 0.3}, air));
  CHECK_FALSE(
      lob::terminal_speed(lob::sphere<double>{1, 0.3}, air, lob::sphere_correlation::clift_gauvin_1970, 0.0));
  const lob::air_properties<double> vacuum{0, 1.8e-5, 340, 293, 0};
  CHECK_FALSE(lob::terminal_speed(lob::sphere<double>{1, 0.3}, vacuum));
}
