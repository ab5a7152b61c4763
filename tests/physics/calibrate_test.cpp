// Calibration: fitting drag parameters (and launch speed and elevation) to measured flights.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cmath>
#include <cstring>
#include <limits>
#include <random>
#include <string>
#include <vector>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

namespace {
struct scenario {
  double speed = 24.0;
  double elevation_deg = 38.0;
  double azimuth_deg = 20.0;
  double start = 0.05;  // first sample time [s]
  double step = 0.08;   // sample spacing [s]
  int count = 30;
};

lob::shot<double> launch_of(const scenario& s) {
  return lob::shot<double>{lob::vec3<double>(0.4, -0.2, 1.1),
                           lob::launch_velocity(s.speed, lob::deg(s.elevation_deg), lob::deg(s.azimuth_deg))};
}

// Samples of a true flight with Gaussian noise of `sigma` [m] on every coordinate.
template <class Model>
std::vector<lob::sample<double>> observe(const Model& truth, const lob::shot<double>& launch,
                                         const scenario& s, double sigma, std::mt19937_64& rng) {
  const lob::medium<double> air{};
  const auto flight = lob::fly(truth, air, launch);
  REQUIRE(flight.has_value());
  std::normal_distribution<double> noise(0.0, sigma);
  std::vector<lob::sample<double>> out;
  for (int i = 0; i < s.count; ++i) {
    const double t = s.start + s.step * i;
    const lob::result<lob::state<double>> at = flight->at(t);
    REQUIRE(at.has_value());
    out.push_back(
        {t, lob::vec3<double>(at->position + lob::vec3<double>(noise(rng), noise(rng), noise(rng)))});
  }
  return out;
}

const auto linear_family = [](double k) { return lob::linear_drag<double>{k}; };
const auto quadratic_family = [](double c) { return lob::quadratic_drag<double>{c}; };
}  // namespace

TEST_CASE("a fit to exact samples recovers the drag rate to high accuracy") {
  std::mt19937_64 rng(1);
  const scenario s;
  const lob::shot<double> launch = launch_of(s);
  const std::vector<lob::sample<double>> data = observe(lob::linear_drag<double>{0.13}, launch, s, 0.0, rng);
  const lob::measured_flight<double> flight{launch, data};
  const lob::result<lob::fit_result<double>> fit =
      lob::calibrate(linear_family, 0.05, flight, lob::medium<double>{});
  REQUIRE(fit.has_value());
  CHECK(fit->parameter == doctest::Approx(0.13).epsilon(1e-8));
  CHECK(fit->rms < 1e-8);
  CHECK(fit->residuals.size() == data.size());
}

// The statistical claim of the standard errors: over many seeds, the true value lies within
// 1.96 reported standard errors about 95% of the time. With 200 independent fits the count
// is binomial (sd 1.5%), so [90%, 99.5%] fails a correct method with probability below 1e-3;
// the spread of (estimate - truth) / error must be about 1 too.
TEST_CASE("the drag rate lies within its standard error as often as it should over many seeds") {
  const scenario s;
  const lob::shot<double> launch = launch_of(s);
  const double k_true = 0.11;
  int covered = 0;
  double sum = 0, sum2 = 0;
  const int seeds = 200;
  for (int seed = 0; seed < seeds; ++seed) {
    std::mt19937_64 rng(1000 + seed);
    const std::vector<lob::sample<double>> data =
        observe(lob::linear_drag<double>{k_true}, launch, s, 0.03, rng);
    const lob::measured_flight<double> flight{launch, data};
    const lob::result<lob::fit_result<double>> fit =
        lob::calibrate(linear_family, 0.2, flight, lob::medium<double>{});
    REQUIRE(fit.has_value());
    const double z = (fit->parameter - k_true) / fit->parameter_error;
    covered += std::abs(z) < 1.96 ? 1 : 0;
    sum += z;
    sum2 += z * z;
  }
  const double mean = sum / seeds;
  const double spread = std::sqrt(sum2 / seeds - mean * mean);
  MESSAGE("rate only: coverage " << covered << "/" << seeds << ", mean z " << mean << ", sd z " << spread);
  CHECK(covered >= 180);
  CHECK(covered <= 199);
  CHECK(std::abs(mean) < 0.25);  // 3.5 standard errors of a mean of 200 unit normals
  CHECK(spread > 0.8);
  CHECK(spread < 1.2);
}

TEST_CASE("speed, elevation and drag rate are recovered within their errors from several flights") {
  const lob::medium<double> air{};
  const double k_true = 0.09;
  const int seeds = 120;
  int covered_k = 0, covered_v = 0, covered_e = 0, total_v = 0;
  for (int seed = 0; seed < seeds; ++seed) {
    std::mt19937_64 rng(5000 + seed);
    scenario a, b;
    b.speed = 19.0;
    b.elevation_deg = 55.0;
    b.azimuth_deg = -30.0;
    b.count = 25;
    const lob::shot<double> true_a = launch_of(a), true_b = launch_of(b);
    const std::vector<lob::sample<double>> da =
        observe(lob::linear_drag<double>{k_true}, true_a, a, 0.02, rng);
    const std::vector<lob::sample<double>> db =
        observe(lob::linear_drag<double>{k_true}, true_b, b, 0.02, rng);
    // The rig's nominal settings are off: 4% slow and 2 degrees low.
    scenario na = a, nb = b;
    na.speed *= 0.96;
    na.elevation_deg -= 2;
    nb.speed *= 0.96;
    nb.elevation_deg -= 2;
    const lob::measured_flight<double> flights[] = {{launch_of(na), da}, {launch_of(nb), db}};
    lob::fit_options<double> options;
    options.fit_speed = true;
    options.fit_elevation = true;
    const lob::result<lob::fit_result<double>> fit = lob::calibrate(
        linear_family, 0.2, std::span<const lob::measured_flight<double>>(flights), air, options);
    REQUIRE(fit.has_value());
    REQUIRE(fit->speeds.size() == 2);
    REQUIRE(fit->elevations.size() == 2);
    covered_k += std::abs(fit->parameter - k_true) < 1.96 * fit->parameter_error ? 1 : 0;
    const double speeds[] = {a.speed, b.speed};
    const double elevations[] = {lob::deg(a.elevation_deg), lob::deg(b.elevation_deg)};
    for (int f = 0; f < 2; ++f) {
      covered_v += std::abs(fit->speeds[f] - speeds[f]) < 1.96 * fit->speed_errors[f] ? 1 : 0;
      covered_e += std::abs(fit->elevations[f] - elevations[f]) < 1.96 * fit->elevation_errors[f] ? 1 : 0;
      ++total_v;
    }
  }
  MESSAGE("coverage: rate " << covered_k << "/" << seeds << ", speed " << covered_v << "/" << total_v
                            << ", elevation " << covered_e << "/" << total_v);
  // Binomial with p = 0.95: n = 120 -> sd 2.0%, n = 240 -> sd 1.4%; bounds about 3 sd below.
  CHECK(covered_k >= 106);
  CHECK(covered_v >= 217);
  CHECK(covered_e >= 217);
  CHECK(covered_k <= 120);
}

TEST_CASE("a quadratic drag coefficient is recovered within its error through integrated flight") {
  // Every trajectory query integrates from the launch again, so this case keeps to 15
  // samples and 40 seeds.
  scenario s;
  s.count = 15;
  s.step = 0.16;
  const lob::shot<double> launch = launch_of(s);
  const double c_true = 0.012;
  const int seeds = 40;
  int covered = 0;
  for (int seed = 0; seed < seeds; ++seed) {
    std::mt19937_64 rng(9000 + seed);
    const std::vector<lob::sample<double>> data =
        observe(lob::quadratic_drag<double>{c_true}, launch, s, 0.02, rng);
    const lob::measured_flight<double> flight{launch, data};
    lob::fit_options<double> options;
    options.flight.relative_tolerance = 1e-10;
    options.flight.absolute_tolerance = 1e-10;
    const lob::result<lob::fit_result<double>> fit =
        lob::calibrate(quadratic_family, 0.03, flight, lob::medium<double>{}, options);
    REQUIRE(fit.has_value());
    covered += std::abs(fit->parameter - c_true) < 1.96 * fit->parameter_error ? 1 : 0;
  }
  MESSAGE("quadratic coverage " << covered << "/" << seeds);
  // n = 40, p = 0.95: 2 misses expected; 8 or more has probability about 1e-3.
  CHECK(covered >= 33);
}

TEST_CASE("a robust loss resists a few gross outliers") {
  std::mt19937_64 rng(77);
  const scenario s;
  const lob::shot<double> launch = launch_of(s);
  const double k_true = 0.15;
  std::vector<lob::sample<double>> data = observe(lob::linear_drag<double>{k_true}, launch, s, 0.01, rng);
  // Three samples where the tracker jumped to something else, metres away.
  data[5].position.z() += 3.0;
  data[14].position.x() -= 2.5;
  data[22].position.y() += 4.0;
  const lob::measured_flight<double> flight{launch, data};
  const lob::result<lob::fit_result<double>> plain =
      lob::calibrate(linear_family, 0.1, flight, lob::medium<double>{});
  lob::fit_options<double> options;
  options.loss = lob::fit_loss::huber;
  options.loss_scale = 0.03;
  const lob::result<lob::fit_result<double>> huber =
      lob::calibrate(linear_family, 0.1, flight, lob::medium<double>{}, options);
  options.loss = lob::fit_loss::cauchy;
  const lob::result<lob::fit_result<double>> cauchy =
      lob::calibrate(linear_family, 0.1, flight, lob::medium<double>{}, options);
  REQUIRE(plain.has_value());
  REQUIRE(huber.has_value());
  REQUIRE(cauchy.has_value());
  const double plain_off = std::abs(plain->parameter - k_true);
  const double huber_off = std::abs(huber->parameter - k_true);
  const double cauchy_off = std::abs(cauchy->parameter - k_true);
  MESSAGE("error of the rate: squared " << plain_off << ", huber " << huber_off << ", cauchy " << cauchy_off);
  CHECK(huber_off < plain_off / 5);
  CHECK(cauchy_off < plain_off / 5);
  // The outliers stand out in the residuals of the robust fit.
  CHECK(huber->residuals[5].z() > 2.5);
  CHECK(huber->residuals[14].x() < -2.0);
}

TEST_CASE("too few samples, bad inputs and a non-converged fit are errors") {
  std::mt19937_64 rng(3);
  const scenario s;
  const lob::shot<double> launch = launch_of(s);
  const std::vector<lob::sample<double>> data = observe(lob::linear_drag<double>{0.1}, launch, s, 0.01, rng);
  const lob::medium<double> air{};
  lob::fit_options<double> all;
  all.fit_speed = true;
  all.fit_elevation = true;

  const lob::measured_flight<double> one{launch, std::span<const lob::sample<double>>(data.data(), 1)};
  const lob::result<lob::fit_result<double>> few = lob::calibrate(linear_family, 0.1, one, air, all);
  REQUIRE_FALSE(few);
  CHECK(few.error() == lob::errc::too_few_samples);
  CHECK(std::strstr(few.error().message(), "residual components") != nullptr);

  const lob::measured_flight<double> none{launch, {}};
  CHECK(lob::calibrate(linear_family, 0.1, none, air).error() == lob::errc::too_few_samples);
  CHECK(lob::calibrate(linear_family, 0.1, std::span<const lob::measured_flight<double>>(), air).error() ==
        lob::errc::too_few_samples);

  const lob::measured_flight<double> good{launch, data};
  const lob::result<lob::fit_result<double>> negative = lob::calibrate(linear_family, -0.1, good, air);
  REQUIRE_FALSE(negative);
  CHECK(negative.error() == lob::errc::invalid_argument);
  CHECK(std::strstr(negative.error().message(), "initial drag parameter") != nullptr);

  std::vector<lob::sample<double>> broken = data;
  broken[3].time = std::nan("");
  const lob::measured_flight<double> bad_time{launch, broken};
  CHECK(lob::calibrate(linear_family, 0.1, bad_time, air).error() == lob::errc::invalid_argument);

  lob::fit_options<double> short_budget;
  short_budget.max_evaluations = 3;
  const lob::result<lob::fit_result<double>> tired =
      lob::calibrate(linear_family, 3.0, good, air, short_budget);
  REQUIRE_FALSE(tired);
  CHECK(tired.error() == lob::errc::no_convergence);
  CHECK(std::strstr(tired.error().message(), "did not converge") != nullptr);
  // A guess so far off that the body drops like a stone: the rate has no pull on the
  // samples there, and the fit says so instead of reporting that guess.
  const lob::result<lob::fit_result<double>> lost = lob::calibrate(linear_family, 40.0, good, air);
  REQUIRE_FALSE(lost);
  CHECK(lost.error() == lob::errc::no_convergence);

  // Samples all at the launch instant say nothing about drag.
  std::vector<lob::sample<double>> instant(4, lob::sample<double>{0.0, launch.position});
  const lob::measured_flight<double> blind{launch, instant};
  const lob::result<lob::fit_result<double>> unknowable = lob::calibrate(linear_family, 0.1, blind, air);
  REQUIRE_FALSE(unknowable);
  CHECK(unknowable.error() == lob::errc::no_convergence);
}

TEST_CASE("a calibration call has a total step budget") {
  // Exact samples of quadratic drag in a wind (integrated, not the hodograph path).
  lob::medium<double> windy{};
  windy.wind = lob::vec3<double>(2, 1, 0);
  const lob::shot<double> launch{lob::vec3<double>::Zero(), lob::launch_velocity(24.0, 0.6, 0.3)};
  const auto truth = lob::fly(lob::quadratic_drag<double>{0.02}, windy, launch);
  REQUIRE(truth.has_value());
  std::vector<lob::sample<double>> data;
  for (int i = 1; i <= 20; ++i) data.push_back({0.1 * i, truth->at(0.1 * i)->position});
  const lob::measured_flight<double> flight{launch, data};
  lob::fit_options<double> options;
  options.fit_speed = true;

  const lob::result<lob::fit_result<double>> fit = lob::calibrate(quadratic_family, 0.05, flight, windy, options);
  REQUIRE(fit.has_value());
  CHECK(fit->parameter == doctest::Approx(0.02).epsilon(1e-9));
  CHECK(fit->steps > 0);
  CHECK(fit->steps < options.max_total_steps);
  // A budget below what that fit drew: step_limit, whatever Levenberg-Marquardt made of the
  // refused flights.
  options.max_total_steps = fit->steps / 2;
  const lob::result<lob::fit_result<double>> tired = lob::calibrate(quadratic_family, 0.05, flight, windy, options);
  REQUIRE_FALSE(tired);
  CHECK(tired.error() == lob::errc::step_limit);
  CHECK(std::strstr(tired.error().message(), "max_total_steps") != nullptr);
  // A caller's pool is drawn from instead, and never overdrawn.
  lob::step_pool pool{100};
  options.flight.shared_steps = &pool;
  CHECK(lob::calibrate(quadratic_family, 0.05, flight, windy, options).error() == lob::errc::step_limit);
  CHECK(pool.exhausted);
  CHECK(pool.left == 0);
  options.flight.shared_steps = nullptr;
  options.max_total_steps = 0;
  CHECK(lob::calibrate(quadratic_family, 0.05, flight, windy, options).error() == lob::errc::invalid_argument);
  // Closed forms take no steps.
  const auto linear = lob::fly(lob::linear_drag<double>{0.1}, windy, launch);
  REQUIRE(linear.has_value());
  std::vector<lob::sample<double>> exact;
  for (int i = 1; i <= 20; ++i) exact.push_back({0.1 * i, linear->at(0.1 * i)->position});
  options.max_total_steps = 1;
  const lob::result<lob::fit_result<double>> closed =
      lob::calibrate(linear_family, 0.3, lob::measured_flight<double>{launch, exact}, windy, options);
  REQUIRE(closed.has_value());
  CHECK(closed->steps == 0);
  CHECK(closed->parameter == doctest::Approx(0.1).epsilon(1e-9));
}

TEST_CASE_TEMPLATE("calibration works in every scalar type", T, float, long double LOB_AND_WIDE(mp50)) {
  // Exact samples of a linear-drag flight; the fit stops at Eigen's default tolerances
  // (sqrt(eps) relative in the unknowns, eps of the solver's scalar: long double for the
  // 50-digit type), so that is what is asked of it.
  const lob::medium<T> air{};
  const lob::shot<T> launch{lob::vec3<T>::Zero(), lob::launch_velocity(T(20), lob::deg(T(40)))};
  const T k_true = T(3) / T(25);
  const auto flight = lob::fly(lob::linear_drag<T>{k_true}, air, launch);
  REQUIRE(flight.has_value());
  std::vector<lob::sample<T>> data;
  for (int i = 1; i <= 12; ++i) {
    const T t = T(i) / T(5);
    data.push_back({t, flight->at(t)->position});
  }
  const lob::measured_flight<T> measured{launch, data};
  const auto family = [](const T& k) { return lob::linear_drag<T>{k}; };
  const lob::result<lob::fit_result<T>> fit = lob::calibrate(family, T(1) / T(5), measured, air);
  REQUIRE(fit.has_value());
  using std::abs;
  using std::sqrt;
  const T eps = T(std::numeric_limits<lob::detail::lm_scalar<T>>::epsilon());
  CHECK(abs(T(fit->parameter / k_true - 1)) <= T(100) * sqrt(eps));
}
