// Core types: result/error, the Real concept, state helpers, units.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cmath>
#include <cstring>
#include <limits>
#include <type_traits>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

static_assert(lob::Real<float> && lob::Real<double> && lob::Real<long double>);
static_assert(lob::Real<mp50>);
static_assert(!lob::Real<int> && !lob::Real<unsigned>);
static_assert(lob::DragModel<lob::vacuum<double>> && lob::DragModel<lob::linear_drag<mp50>>);

TEST_CASE("an error names its code and the offending value") {
  const lob::error e(lob::errc::invalid_argument, "launch speed must be finite",
                     std::numeric_limits<long double>::quiet_NaN());
  CHECK(e == lob::errc::invalid_argument);
  CHECK(lob::to_string(e.code()) == "invalid_argument");
  CHECK(std::strstr(e.message(), "launch speed must be finite, got nan") != nullptr);
}

TEST_CASE("a long error message is truncated, never overflows") {
  char text[400];
  std::memset(text, 'x', sizeof text - 1);
  text[sizeof text - 1] = '\0';
  const lob::error e(lob::errc::no_convergence, text, 1.0L);
  CHECK(std::strlen(e.message()) < lob::error::capacity);
}

TEST_CASE("a result holds a value or an error") {
  const lob::result<double> ok = 2.5;
  REQUIRE(ok.has_value());
  CHECK(*ok == 2.5);
  CHECK(ok.value_or(1.0) == 2.5);
  const lob::result<double> bad = lob::fail(lob::errc::out_of_reach, "too far", 12.0);
  REQUIRE_FALSE(bad);
  CHECK(bad.error() == lob::errc::out_of_reach);
  CHECK(bad.value_or(1.0) == 1.0);
  const lob::status fine{};
  CHECK(fine.has_value());
}

TEST_CASE_TEMPLATE("degrees convert to radians with every digit", T, float, double, long double LOB_AND_WIDE(mp50)) {
  using std::abs;
  const T half_turn = lob::deg(T(180));
  CHECK(abs(T(half_turn - boost::math::constants::pi<T>())) <= 2 * std::numeric_limits<T>::epsilon() * 4);
  // 9.80665 m/s^2 exactly by definition (CGPM 1901): within half an ulp of the decimal.
  T decimal;
  if constexpr (std::is_floating_point_v<T>) decimal = static_cast<T>(9.80665L);
  else decimal = T("9.80665");
  CHECK(abs(T(lob::standard_gravity<T>() / decimal - 1)) <= std::numeric_limits<T>::epsilon());
}

TEST_CASE("state helpers use the medium's up direction") {
  lob::medium<double> y_up;
  y_up.gravity = lob::vec3<double>(0, -9.81, 0);
  lob::state<double> s{1.0, lob::vec3<double>(3, 7, 4), lob::vec3<double>(1, -1, 0)};
  const lob::shot<double> launch{};
  CHECK(lob::height(s.position, y_up) == doctest::Approx(7.0));
  CHECK(lob::horizontal_distance(s, launch, y_up) == doctest::Approx(5.0));
  CHECK(lob::path_angle_below_horizon(s, y_up) == doctest::Approx(std::atan(1.0)));
  CHECK(lob::speed(s) == doctest::Approx(std::sqrt(2.0)));
}
