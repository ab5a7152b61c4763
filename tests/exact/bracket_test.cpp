// linear_flight against a different formulation evaluated with 100 digits: the explicit
// solution z(t) (plain exponentials, no Lambert W, no closed-form apex) with its apex and
// landing found by a bracketing root finder (Boost.Math TOMS 748), for seeded random
// flights whose inputs are exact in the type under test. This is how float gets its
// reference (the table's double inputs do not survive rounding to float).
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/math/tools/toms748_solve.hpp>
#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cstdint>
#include <limits>
#include <random>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;
// 100 digits: the plain explicit form loses up to about 2 log10(1/k) = 24 digits at
// k = 1e-12, which still leaves far more than any type under test needs.
using mp100 = boost::multiprecision::cpp_bin_float_100;

namespace {

struct inputs {
  double k, vx, vy, vz, wx, wy, wz, h;  // rounded to T before use
};

// The explicit solution in 100 digits: offsets from the launch and the velocity.
struct explicit_flight {
  mp100 k, g, v[3], w[3];

  void at(const mp100& t, mp100 pos[3], mp100 vel[3]) const {
    const mp100 acc[3] = {0, 0, -g};
    for (int i = 0; i < 3; ++i) {
      if (k == 0) {
        pos[i] = v[i] * t + acc[i] * t * t / 2;
        vel[i] = v[i] + acc[i] * t;
      } else {
        const mp100 e = exp(mp100(-k * t));
        const mp100 one = 1 - e;
        pos[i] = w[i] * t + (v[i] - w[i]) * one / k + acc[i] * (t / k - one / (k * k));
        vel[i] = w[i] + (v[i] - w[i]) * e + acc[i] * one / k;
      }
    }
  }
  mp100 z(const mp100& t) const {
    mp100 p[3], q[3];
    at(t, p, q);
    return p[2];
  }
  mp100 vz(const mp100& t) const {
    mp100 p[3], q[3];
    at(t, p, q);
    return q[2];
  }
};

template <class F>
mp100 root(F f, mp100 lo, mp100 hi) {
  std::uintmax_t iterations = 400;
  const std::pair<mp100, mp100> r = boost::math::tools::toms748_solve(
      f, lo, hi, boost::math::tools::eps_tolerance<mp100>(300), iterations);
  REQUIRE(iterations < 400);
  return (r.first + r.second) / 2;
}

struct reference {
  mp100 apex_time, apex_rise, landing_time, range, landing_speed;
};

reference solve(const explicit_flight& f, const mp100& dh) {
  reference r;
  if (f.v[2] > 0) {
    mp100 hi = 1;
    while (f.vz(hi) > 0) hi *= 2;
    r.apex_time = root([&](const mp100& t) { return f.vz(t); }, mp100(0), hi);
    r.apex_rise = f.z(r.apex_time);
  } else {
    r.apex_time = 0;
    r.apex_rise = 0;
  }
  mp100 lo = r.apex_time, hi = r.apex_time + 1;
  while (f.z(hi) - dh >= 0) {
    lo = hi;
    hi = r.apex_time + 2 * (hi - r.apex_time);
  }
  r.landing_time = root([&](const mp100& t) { return mp100(f.z(t) - dh); }, lo, hi);
  mp100 p[3], q[3];
  f.at(r.landing_time, p, q);
  r.range = sqrt(mp100(p[0] * p[0] + p[1] * p[1]));
  r.landing_speed = sqrt(mp100(q[0] * q[0] + q[1] * q[1] + q[2] * q[2]));
  return r;
}

mp100 rel(const mp100& got, const mp100& ref) {
  using std::abs;
  return ref == 0 ? mp100(abs(got)) : mp100(abs(got - ref) / abs(ref));
}

template <class T>
void check_random(int count, double tolerance) {
  std::mt19937_64 rng(424242);
  std::uniform_real_distribution<double> u(0, 1);
  mp100 worst[4] = {0, 0, 0, 0};
  const T g = lob::standard_gravity<T>();
  for (int n = 0; n < count; ++n) {
    const T k = u(rng) < 0.1 ? T(0) : T(std::pow(10.0, -12 + 15 * u(rng)));
    const double speed = std::pow(10.0, -2 + 5.30103 * u(rng));
    const double el = (-89 + 179 * u(rng)) * 3.14159265358979323846 / 180;
    const bool windy = u(rng) < 0.5;
    T wz = windy ? T(-2 + 4 * u(rng)) : T(0);
    if (k * wz > g / 2) wz = T(0);
    lob::medium<T> air;
    air.wind = windy ? lob::vec3<T>(T(-15 + 30 * u(rng)), T(-15 + 30 * u(rng)), wz) : lob::vec3<T>::Zero();
    const lob::shot<T> s{lob::vec3<T>::Zero(),
                         lob::vec3<T>(T(speed * std::cos(el)), T(0), T(speed * std::sin(el)))};
    explicit_flight e{mp100(k), mp100(g), {}, {}};
    for (int i = 0; i < 3; ++i) {
      e.v[i] = mp100(s.velocity[i]);
      e.w[i] = mp100(air.wind[i]);
    }
    // Landing plane: level, below, or at a fraction of the apex rise above the launch.
    const double pick = u(rng);
    T h;
    if (s.velocity.z() > T(0) && pick < 0.35) {
      h = T(0);
    } else if (s.velocity.z() > T(0) && pick < 0.7) {
      const reference level = solve(e, mp100(0));
      h = T(static_cast<double>(level.apex_rise) * (0.05 + 0.85 * u(rng)));
    } else {
      h = T(-std::pow(10.0, -3 + 7 * u(rng)));
    }
    const reference r = solve(e, mp100(h));
    const lob::linear_flight<T> f = lob::linear_flight<T>::make(k, air, s).value();
    const lob::result<lob::state<T>> land = f.landing(h);
    const lob::result<T> range = f.range(h);
    const lob::result<T> top = f.max_height();
    REQUIRE(land.has_value());
    REQUIRE(range.has_value());
    REQUIRE(top.has_value());
    const mp100 errs[4] = {rel(mp100(land->time), r.landing_time), rel(mp100(*range), r.range),
                           rel(mp100(*top), r.apex_rise), rel(mp100(lob::speed(*land)), r.landing_speed)};
    for (int i = 0; i < 4; ++i) worst[i] = errs[i] > worst[i] ? errs[i] : worst[i];
  }
  MESSAGE("digits " << std::numeric_limits<T>::digits << ", " << count
                    << " random flights, max relative errors: time " << worst[0] << ", range " << worst[1]
                    << ", apex height " << worst[2] << ", landing speed " << worst[3]);
  for (const mp100& w : worst) CHECK(w <= mp100(tolerance));
}

}  // namespace

TEST_CASE("float holds 1e-5 against a bracketing root of the explicit path") {
  check_random<float>(400, 1e-5);
}

TEST_CASE("double holds 1e-14 against a bracketing root of the explicit path") {
  check_random<double>(400, 1e-14);
}

TEST_CASE("long double holds 1e-17 against a bracketing root of the explicit path") {
  check_random<long double>(300, 1e-17);
}

#if LOB_TEST_WIDE
TEST_CASE("the 50-digit type holds 1e-45 against a bracketing root of the explicit path") {
  check_random<mp50>(100, 1e-45);
}
#endif
