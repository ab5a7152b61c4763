// Accuracy of integrated flight against the independent mpmath reference
// (tests/data/integrate_quadratic_reference.csv: mpmath odefun Taylor method at 40 digits,
// checked against a 50-digit solve; scripts/integrate_reference.py), and the observed
// convergence orders of the steppers.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "integrate/common.hpp"

using lob_test::mp50;

namespace {

template <class T>
T power_of_ten(int e) {
  T p(1);
  for (int i = 0; i < e; ++i) p *= T(10);
  return T(T(1) / p);
}

// Flies a reference row with the model it names: quadratic drag when k = 0, the combined
// model otherwise.
template <class T, class Check>
void fly_reference(const lob_test::reference_flight<T>& r, const lob::flight_options<T>& o, Check check) {
  if (r.k == T(0)) {
    const auto f = lob::fly(lob::quadratic_drag<T>{.coefficient = r.c}, r.air, r.launch, o);
    REQUIRE(f);
    check(*f);
  } else {
    const auto f =
        lob::fly(lob::linear_quadratic_drag<T>{.rate = r.k, .coefficient = r.c}, r.air, r.launch, o);
    REQUIRE(f);
    check(*f);
  }
}

// Worst error / tolerance over all rows, for landing time, range, landing velocity,
// apex time and apex height, at requested tolerance 10^-e.
template <class T>
void check_tolerance(int e, const std::vector<lob_test::reference_flight<T>>& rows) {
  using std::abs;
  using std::max;
  const T tol = power_of_ten<T>(e);
  T worst_time(0), worst_range(0), worst_apex(0), worst_speed(0);
  for (const auto& r : rows) {
    fly_reference(r, lob_test::integrated(tol), [&](const auto& flight) {
      const auto land = flight.landing(r.landing_height);
      const auto reach = flight.range(r.landing_height);
      const auto top = flight.apex();
      REQUIRE(land);
      REQUIRE(reach);
      REQUIRE(top);
      const T et = lob_test::rel_err(land->time, r.landing_time);
      const T er = lob_test::rel_err(*reach, r.range);
      const T ev = T(T((land->velocity - r.landing_velocity).norm()) / T(r.landing_velocity.norm()));
      // Apex time is 0 for a downward launch: judge it against the flight time.
      const T ea = max(T(abs(T(top->time - r.apex_time)) / r.landing_time),
                       lob_test::rel_err(T(top->position.z()), r.apex_height));
      INFO(r.name, " tol 1e-", e);
      CHECK(et <= tol);
      CHECK(er <= tol);
      CHECK(ea <= tol);
      CHECK(ev <= 10 * tol);  // the velocity is an output of the step, not a controlled event
      worst_time = max(worst_time, et);
      worst_range = max(worst_range, er);
      worst_apex = max(worst_apex, ea);
      worst_speed = max(worst_speed, ev);
    });
  }
  char text[200];
  std::snprintf(
      text, sizeof text,
      "digits %d, tol 1e-%d: worst rel. error landing time %.2Le, range %.2Le, apex %.2Le, velocity %.2Le",
      std::numeric_limits<T>::digits, e, static_cast<long double>(worst_time),
      static_cast<long double>(worst_range), static_cast<long double>(worst_apex),
      static_cast<long double>(worst_speed));
  MESSAGE(text);
}

}  // namespace

TEST_CASE("the reference table is complete") {
  const auto rows = lob_test::load_reference<double>();
  CHECK(rows.size() == 18);
}

TEST_CASE_TEMPLATE("the adaptive path meets tolerances 1e-6 to 1e-13 on landing time and range", T, double,
                   long double) {
  const auto rows = lob_test::load_reference<T>();
  REQUIRE(rows.size() == 18);
  for (int e = 6; e <= 13; ++e) check_tolerance<T>(e, rows);
}

TEST_CASE("the adaptive path in float meets tolerance 1e-6") {
  const auto rows = lob_test::load_reference<float>();
  REQUIRE(rows.size() == 18);
  check_tolerance<float>(6, rows);
}

#if LOB_TEST_WIDE
TEST_CASE("the adaptive path at 50 digits meets tolerances down to 1e-18") {
  const auto rows = lob_test::load_reference<mp50>();
  REQUIRE(rows.size() == 18);
  check_tolerance<mp50>(13, rows);
  check_tolerance<mp50>(18, rows);
}
#endif

namespace {

// Integrates the reference row `name` to its landing time with n equal steps of the given
// one-step method and returns the largest error of position [m] and velocity [m/s]
// against the reference landing state, divided by the launch speed times flight time.
template <class T, class Step>
T fixed_step_error(const lob_test::reference_flight<T>& r, int n, Step step) {
  const lob::linear_quadratic_drag<T> m{.rate = r.k, .coefficient = r.c};
  const auto accel = [&](const lob::vec3<T>& v) {
    return lob::vec3<T>(r.air.gravity + m.acceleration(lob::vec3<T>(v - r.air.wind)));
  };
  lob::detail::phase<T> y{r.launch.position, r.launch.velocity};
  const T h = r.landing_time / T(n);
  for (int i = 0; i < n; ++i) y = step(accel, y, lob::detail::derivative(accel, y), h);
  using std::max;
  const T scale = T(r.launch.velocity.norm()) * r.landing_time;
  return max(T(T((y.position - r.landing_position).norm()) / scale),
             T(T((y.velocity - r.landing_velocity).norm()) * r.landing_time / scale));
}


// Least-squares slope of log2(error) against log2(steps), over n0, 2 n0, 4 n0, 8 n0 steps:
// the observed order of convergence.
template <class T, class Step>
double observed_order(const lob_test::reference_flight<T>& r, int n0, Step step) {
  double sx = 0, sy = 0, sxx = 0, sxy = 0;
  for (int i = 0; i < 4; ++i) {
    const int n = n0 << i;
    const double x = std::log2(static_cast<double>(n));
    const double y = std::log2(static_cast<double>(fixed_step_error<T>(r, n, step)));
    sx += x;
    sy += y;
    sxx += x * x;
    sxy += x * y;
  }
  return -(4 * sxy - sx * sy) / (4 * sxx - sx * sx);
}

}  // namespace

TEST_CASE_TEMPLATE("classical RK4 converges with order 4", T, double, long double) {
  const auto rows = lob_test::load_reference<T>();
  const auto rk4 = [](const auto& accel, const auto& y, const auto& f, const T& h) {
    return lob::detail::rk4_step(accel, y, f, h);
  };
  int checked = 0;
  for (const auto& r : rows) {
    if (r.name != "ball_vt33" && r.name != "crosswind" && r.name != "lin_quad_mild") continue;
    // 32 to 256 steps over the flight: errors from about 1e-5 to 1e-9 of the scale.
    const double order = observed_order<T>(r, 32, rk4);
    INFO(r.name, ": observed RK4 order ", order);
    CHECK(order > 3.8);
    CHECK(order < 4.2);
    ++checked;
  }
  CHECK(checked == 3);
}

TEST_CASE_TEMPLATE("the Dormand-Prince pair converges with order 5", T, long double LOB_AND_WIDE(mp50)) {
  const auto rows = lob_test::load_reference<T>();
  const auto dp5 = [](const auto& accel, const auto& y, const auto& f, const T& h) {
    lob::detail::phase<T> y1;
    lob::detail::dp5_stages<T> k;
    (void)lob::detail::dp5_step(accel, y, f, h, y1, k, T(1), T(1));
    return y1;
  };
  int checked = 0;
  for (const auto& r : rows) {
    if (r.name != "ball_vt33" && r.name != "crosswind" && r.name != "lin_quad_mild") continue;
    // 128 to 1024 steps: past the pre-asymptotic range where error terms still cancel,
    // above the roundoff of long double (errors 1e-11 .. 1e-16 of the scale).
    const double order = observed_order<T>(r, 128, dp5);
    INFO(r.name, ": observed Dormand-Prince order ", order);
    CHECK(order > 4.6);
    CHECK(order < 5.4);
    ++checked;
  }
  CHECK(checked == 3);
}

TEST_CASE_TEMPLATE("fixed-step flights land with the order of their method", T, double, long double) {
  using std::log2;
  const auto rows = lob_test::load_reference<T>();
  const auto& r = rows.front();  // ball_vt33
  REQUIRE(r.name == "ball_vt33");
  const lob::quadratic_drag<T> m{.coefficient = r.c};
  const auto landing_error = [&](lob::stepper method, int hz) {
    lob::flight_options<T> o;
    o.method = method;
    o.fixed_step = T(1) / T(hz);
    const auto f = lob::fly(m, r.air, r.launch, o);
    REQUIRE(f);
    const auto land = f->landing();
    REQUIRE(land);
    using std::max;
    return max(lob_test::rel_err(land->time, r.landing_time), lob_test::rel_err(*f->range(), r.range));
  };
  for (int hz = 8; hz <= 32; hz *= 2) {
    const T order = log2(T(landing_error(lob::stepper::rk4, hz) / landing_error(lob::stepper::rk4, 2 * hz)));
    INFO("RK4 at ", hz, " Hz, observed order ", static_cast<double>(order));
    CHECK(order > T(3.5));
    CHECK(order < T(4.5));
  }
  for (int hz = 60; hz <= 240; hz *= 2) {
    const T order = log2(T(landing_error(lob::stepper::semi_implicit_euler, hz) /
                           landing_error(lob::stepper::semi_implicit_euler, 2 * hz)));
    INFO("semi-implicit Euler at ", hz, " Hz, observed order ", static_cast<double>(order));
    CHECK(order > T(0.8));
    CHECK(order < T(1.2));
  }
}

TEST_CASE("the step-size controller's logarithm, power and factor stay within their stated bounds") {
  // Reference: std::log2, std::exp2 and std::pow in double (the C library, correctly
  // rounded to within an ulp or so), far more accurate than Mitchell's maps (log2 at most
  // 0.0861 below, exp2 at most 6.2 % above) and the factor composed from them (within
  // 3.7 % of the exact proportional-integral factor once centred).
  double low_log = 0, high_log = 0;
  for (double x = 1e-9; x < 1e9; x *= 1.01) {
    const double d = lob::detail::approx::log2(x) - std::log2(x);
    low_log = std::min(low_log, d);
    high_log = std::max(high_log, d);
  }
  double low_exp = 0, high_exp = 0;
  for (int i = -3000; i <= 4000; ++i) {
    const double y = static_cast<double>(i) / 1000.0;
    const double r = lob::detail::approx::exp2(y) / std::exp2(y) - 1;
    low_exp = std::min(low_exp, r);
    high_exp = std::max(high_exp, r);
  }
  // The first accepted step: h_new / h = 0.9 err^-0.17 (1e-4)^0.04 (err_old = 1e-4 at the
  // start, Hairer), clamped to [1/5, 10]; a rejection: 0.9 err^-0.2, clamped to [1/5, 1].
  double worst_factor = 0;
  for (double err = 1e-9; err < 1e3; err *= 1.003) {
    lob::detail::pi_controller<double> accept, reject;
    const double fa = accept.next(1.0, err, true);
    const double fr = reject.next(1.0, err, false);
    const double ea = std::clamp(0.9 * std::pow(err, -0.17) * std::pow(1e-4, 0.04), 0.2, 10.0);
    const double er = std::clamp(0.9 * std::pow(err, -0.2), 0.2, 1.0);
    worst_factor = std::max({worst_factor, std::fabs(fa / ea - 1), std::fabs(fr / er - 1)});
  }
  INFO("log2 error in [", low_log, ", ", high_log, "], exp2 relative error in [", low_exp, ", ", high_exp,
       "], worst relative factor error ", worst_factor);
  CHECK(low_log > -0.0861);
  CHECK(high_log <= 0.0);
  CHECK(low_exp >= 0.0);
  CHECK(high_exp < 0.062);
  CHECK(worst_factor < 0.037);
}
