// Integrated flight against published exact results, against lob's closed forms, and
// against the facts of the trade: vertical motion under quadratic drag, zero drag,
// energy, ascent and descent, the best elevation, wind drift, frames, queries agreeing
// with one another, and a user-defined model.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <array>
#include <cmath>
#include <random>

#include "integrate/common.hpp"

using lob_test::mp50;

namespace {

template <class T>
T tolerance_for() {
  // Requested tolerance per type: near the best each precision supports.
  if constexpr (std::numeric_limits<T>::digits > 64) return T(1) / T(1000000000000000000LL);  // 1e-18
  else if constexpr (std::numeric_limits<T>::digits > 24) return T(1) / T(1000000000000LL);    // 1e-12
  else return T(1) / T(100000);                                                                // 1e-5
}

}  // namespace

// Vertical motion under quadratic drag, exact (Timmerman & van der Weele, "On the rise and
// fall of a ball with linear or quadratic drag", Am. J. Phys. 67 (1999) 538; also any
// intermediate mechanics text): with v_t = sqrt(g / c), a ball thrown up at v0 reaches its
// top after (v_t / g) atan(v0 / v_t) at height (v_t^2 / 2g) ln(1 + v0^2 / v_t^2); dropped
// from rest it falls at v_t tanh(g t / v_t).
TEST_CASE_TEMPLATE("a vertical throw under quadratic drag matches the exact rise and fall", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  using std::atan;
  using std::log;
  using std::tanh;
  const T g = lob::standard_gravity<T>();
  const T c = T(3) / T(1000);
  const T vt = sqrt(T(g / c));
  const T v0 = T(45);
  const T tol = tolerance_for<T>();
  const lob::quadratic_drag<T> m{.coefficient = c};
  lob::shot<T> up;
  up.velocity = lob::vec3<T>(T(0), T(0), v0);
  for (const bool fast : {false, true}) {
    lob::flight_options<T> o = lob_test::integrated(tol);
    o.use_fast_paths = fast;
    const auto f = lob::fly(m, lob::medium<T>{}, up, o);
    REQUIRE(f);
    const auto top = f->apex();
    REQUIRE(top);
    const T t_top = vt / g * atan(T(v0 / vt));
    const T h_top = vt * vt / (2 * g) * log(T(1 + v0 * v0 / (vt * vt)));
    INFO("fast path ", fast);
    CHECK(lob_test::rel_err(top->time, t_top) <= tol);
    CHECK(lob_test::rel_err(T(top->position.z()), h_top) <= tol);
  }
  lob::shot<T> drop;
  drop.position = lob::vec3<T>(T(0), T(0), T(500));
  const auto f = lob::fly(m, lob::medium<T>{}, drop, lob_test::integrated(tol));
  REQUIRE(f);
  for (int i = 1; i <= 8; ++i) {
    const T t = T(i);
    const auto s = f->at(t);
    REQUIRE(s);
    CHECK(lob_test::rel_err(T(-s->velocity.z()), T(vt * tanh(T(g * t / vt)))) <= tol);
  }
}

TEST_CASE_TEMPLATE("zero quadratic drag flies like vacuum", T, double, long double) {
  const T tol = tolerance_for<T>();
  const lob::medium<T> air;
  lob::shot<T> s;
  s.position = lob::vec3<T>(T(1), T(2), T(3));
  s.velocity = lob::launch_velocity(T(27), lob::deg(T(52)), lob::deg(T(20)));
  const auto drag = lob::fly(lob::quadratic_drag<T>{.coefficient = T(0)}, air, s, lob_test::integrated(tol));
  const auto exact = lob::fly(lob::vacuum<T>{}, air, s);
  REQUIRE(drag);
  REQUIRE(exact);
  CHECK(lob_test::rel_err(drag->landing()->time, exact->landing()->time) <= tol);
  CHECK(lob_test::rel_err(*drag->range(), *exact->range()) <= tol);
  CHECK(lob_test::rel_err(drag->apex()->time, exact->apex()->time) <= tol);
  CHECK(lob_test::rel_err(T(drag->apex()->position.z()), T(exact->apex()->position.z())) <= tol);
}

TEST_CASE_TEMPLATE("the combined model without its quadratic part equals the linear closed form", T, double,
                   long double) {
  const T tol = tolerance_for<T>();
  lob::medium<T> air;
  air.wind = lob::vec3<T>(T(-3), T(2), T(1) / T(2));
  lob::shot<T> s;
  s.position = lob::vec3<T>(T(0), T(0), T(2));
  s.velocity = lob::launch_velocity(T(33), lob::deg(T(41)), lob::deg(T(-15)));
  const T k = T(27) / T(100);
  const auto combined = lob::fly(lob::linear_quadratic_drag<T>{.rate = k, .coefficient = T(0)}, air, s,
                                 lob_test::integrated(tol));
  const auto exact = lob::fly(lob::linear_drag<T>{.rate = k}, air, s);
  REQUIRE(combined);
  REQUIRE(exact);
  for (const T h : {T(0), T(-3), T(5)}) {
    const auto a = combined->landing(h);
    const auto b = exact->landing(h);
    REQUIRE(a);
    REQUIRE(b);
    CHECK(lob_test::rel_err(a->time, b->time) <= tol);
    CHECK(T((a->position - b->position).norm()) <= tol * T(b->position.norm()));
    CHECK(lob_test::rel_err(*combined->range(h), *exact->range(h)) <= tol);
  }
  for (const T t : {T(1) / T(2), T(2), T(3)}) {
    const auto a = combined->at(t);
    const auto b = exact->at(t);
    CHECK(T((a->position - b->position).norm()) <= tol * T(b->position.norm()));
  }
  CHECK(lob_test::rel_err(combined->apex()->time, exact->apex()->time) <= tol);
  CHECK(lob_test::rel_err(combined->crossing(T(6), lob::side::rising)->time,
                          exact->crossing(T(6), lob::side::rising)->time) <= tol);
}

TEST_CASE("energy never increases in still air") {
  using T = double;
  std::mt19937 rng(20261201);
  std::uniform_real_distribution<double> speed(5, 70), elev(-30, 85), coef(0.0005, 0.3), lin(0, 0.5);
  const T g = lob::standard_gravity<T>();
  for (int trial = 0; trial < 40; ++trial) {
    lob::shot<T> s;
    s.position = lob::vec3<T>(0, 0, 10);
    s.velocity = lob::launch_velocity(speed(rng), lob::deg(elev(rng)), 0.3);
    const auto f = lob::fly(lob::linear_quadratic_drag<T>{.rate = lin(rng), .coefficient = coef(rng)},
                            lob::medium<T>{}, s, lob_test::integrated(1e-10));
    REQUIRE(f);
    const auto land = f->landing();
    REQUIRE(land);
    std::array<lob::state<T>, 200> path;
    REQUIRE(f->sample(path, land->time).value_or(0) == path.size());
    const auto energy = [&](const lob::state<T>& p) {
      return 0.5 * p.velocity.squaredNorm() + g * p.position.z();
    };
    const T e0 = energy(path[0]);
    for (std::size_t i = 1; i < path.size(); ++i) {
      // Drag only takes energy away; the slack is the integration tolerance.
      CHECK(energy(path[i]) <= energy(path[i - 1]) + 1e-9 * e0);
    }
  }
}

TEST_CASE_TEMPLATE("with quadratic drag the descent is longer than the ascent", T, double, long double) {
  // Common practice: drag slows the fall more than the climb, so the top comes before
  // half the flight time (on level ground).
  std::mt19937 rng(7);
  std::uniform_real_distribution<double> speed(3, 80), elev(5, 89), coef(0.0005, 0.5);
  for (int trial = 0; trial < 40; ++trial) {
    lob::shot<T> s;
    s.velocity = lob::launch_velocity(T(speed(rng)), lob::deg(T(elev(rng))));
    const auto f = lob::fly(lob::quadratic_drag<T>{.coefficient = T(coef(rng))}, lob::medium<T>{}, s,
                            lob_test::integrated(T(1e-10)));
    REQUIRE(f);
    const T up = f->apex()->time;
    const T down = f->landing()->time - up;
    CHECK(down > up);
  }
}

TEST_CASE("with quadratic drag the farthest elevation on level ground is below 45 degrees") {
  // Common practice: drag moves the best elevation below 45 degrees.
  for (const double c : {0.002, 0.009, 0.05}) {
    for (const double v0 : {20.0, 40.0, 70.0}) {
      double best = 0, best_range = 0;
      for (int tenth = 150; tenth <= 500; tenth += 5) {
        lob::shot<double> s;
        s.velocity = lob::launch_velocity(v0, lob::deg(tenth / 10.0));
        const auto f = lob::fly(lob::quadratic_drag<double>{.coefficient = c}, lob::medium<double>{}, s,
                                lob_test::integrated(1e-11));
        const double r = f->range().value_or(0);
        if (r > best_range) {
          best_range = r;
          best = tenth / 10.0;
        }
      }
      INFO("c ", c, " v0 ", v0, " best elevation ", best);
      CHECK(best < 45.0);
      CHECK(best > 15.0);
    }
  }
}

TEST_CASE_TEMPLATE("a crosswind moves the landing point sideways, for every model", T, double, long double) {
  lob::shot<T> s;
  s.velocity = lob::launch_velocity(T(40), lob::deg(T(35)));
  const auto drift = [&](const auto& model, const T& w) {
    lob::medium<T> air;
    air.wind = lob::vec3<T>(T(0), w, T(0));
    const auto f = lob::fly(model, air, s, lob_test::integrated(T(1e-11)));
    REQUIRE(f);
    const auto land = f->landing();
    REQUIRE(land);
    return land->position.y();
  };
  const auto check_model = [&](const auto& model) {
    CHECK(drift(model, T(0)) == T(0));
    T last(0);
    for (const T w : {T(2), T(4), T(8)}) {
      const T y = drift(model, w);
      CHECK(y > last);          // downwind, and more with more wind
      CHECK(drift(model, T(-w)) == doctest::Approx(static_cast<double>(-y)).epsilon(1e-9));
      last = y;
    }
  };
  check_model(lob::quadratic_drag<T>{.coefficient = T(9) / T(1000)});
  check_model(lob::linear_quadratic_drag<T>{.rate = T(1) / T(10), .coefficient = T(5) / T(1000)});
  // The combined model with no quadratic part drifts exactly as the linear closed form:
  // with x(t) = x0 + w t + (v0 - w) (1 - e^-kt)/k + gravity terms, the sideways drift at
  // landing is w (t - (1 - e^-kt)/k).
  const T k = T(1) / T(5);
  lob::medium<T> air;
  air.wind = lob::vec3<T>(T(0), T(6), T(0));
  const auto exact = lob::fly(lob::linear_drag<T>{.rate = k}, air, s);
  const T y_exact = exact->landing()->position.y();
  using std::exp;
  const T t_land = exact->landing()->time;
  CHECK(lob_test::rel_err(y_exact, T(T(6) * (t_land - (1 - exp(T(-k * t_land))) / k))) <= T(1e-12));
  CHECK(lob_test::rel_err(drift(lob::linear_quadratic_drag<T>{.rate = k, .coefficient = T(0)}, T(6)),
                          y_exact) <= T(1e-10));
}

TEST_CASE("heights are measured along up for any gravity direction") {
  // An engine's y-up frame: gravity (0, -g, 0). The same shot turned into that frame must
  // land at the same time and range.
  using T = double;
  const T g = lob::standard_gravity<T>();
  const lob::quadratic_drag<T> m{.coefficient = 0.01};
  lob::shot<T> z_up;
  z_up.position = lob::vec3<T>(0, 0, 3);
  z_up.velocity = lob::vec3<T>(20, 5, 25);
  lob::medium<T> air_z;
  air_z.wind = lob::vec3<T>(1, -2, 0);
  // (x, y, z) -> (x, z, -y): z-up to y-up, a rotation.
  const auto turn = [](const lob::vec3<T>& v) { return lob::vec3<T>(v.x(), v.z(), -v.y()); };
  lob::shot<T> y_up{turn(z_up.position), turn(z_up.velocity)};
  lob::medium<T> air_y;
  air_y.gravity = lob::vec3<T>(0, -g, 0);
  air_y.wind = turn(air_z.wind);
  const auto a = lob::fly(m, air_z, z_up, lob_test::integrated(1e-12));
  const auto b = lob::fly(m, air_y, y_up, lob_test::integrated(1e-12));
  for (const T h : {0.0, 1.0, -4.0}) {
    CHECK(b->landing(h)->time == doctest::Approx(a->landing(h)->time).epsilon(1e-11));
    CHECK(*b->range(h) == doctest::Approx(*a->range(h)).epsilon(1e-11));
    CHECK((b->landing(h)->position - turn(a->landing(h)->position)).norm() < 1e-9);
  }
  CHECK(b->apex()->position.y() == doctest::Approx(a->apex()->position.z()).epsilon(1e-11));
}

TEST_CASE_TEMPLATE("queries agree with one another", T, double, long double) {
  lob::medium<T> air;
  air.wind = lob::vec3<T>(T(-2), T(1), T(0));
  lob::shot<T> s;
  s.position = lob::vec3<T>(T(5), T(-1), T(1));
  s.velocity = lob::launch_velocity(T(30), lob::deg(T(38)), lob::deg(T(10)));
  const auto f =
      lob::fly(lob::quadratic_drag<T>{.coefficient = T(1) / T(100)}, air, s, lob_test::integrated(T(1e-11)));
  REQUIRE(f);
  const auto top = f->apex();
  const auto land = f->landing();
  REQUIRE(top);
  REQUIRE(land);
  // The state at the apex and landing times is the apex and landing state.
  CHECK(T((f->at(top->time)->position - top->position).norm()) < T(1e-9));
  CHECK(T((f->at(land->time)->position - land->position).norm()) < T(1e-9));
  CHECK(T(lob::up(air).dot(top->velocity)) == doctest::Approx(0).epsilon(1e-9));
  // Heights: the apex height is crossed at the apex; lower heights on both branches.
  const T mid = top->position.z() / 2;
  const auto rise = f->crossing(mid, lob::side::rising);
  const auto fall = f->crossing(mid, lob::side::falling);
  REQUIRE(rise);
  REQUIRE(fall);
  CHECK(rise->time < top->time);
  CHECK(fall->time > top->time);
  CHECK(rise->position.z() == doctest::Approx(static_cast<double>(mid)).epsilon(1e-12));
  CHECK(fall->position.z() == doctest::Approx(static_cast<double>(mid)).epsilon(1e-12));
  // Distance: the landing's horizontal distance is reached at the landing.
  const auto far = f->at_distance(*f->range());
  REQUIRE(far);
  CHECK(far->time == doctest::Approx(static_cast<double>(land->time)).epsilon(1e-10));
  // Sampling writes the same states as at() at the same times.
  std::array<lob::state<T>, 7> path;
  REQUIRE(f->sample(path, land->time).value_or(0) == 7);
  for (const auto& p : path) {
    const auto q = f->at(p.time);
    REQUIRE(q);
    CHECK(q->position == p.position);
    CHECK(q->velocity == p.velocity);
  }
  CHECK(path.front().time == T(0));
  CHECK(path.front().position == s.position);
  CHECK(path.back().time == land->time);
}

namespace {

// A user model lob knows nothing about: a sphere whose drag coefficient falls with speed
// through a function of the user's (an invented smooth curve, not a measured one).
struct soft_sphere {
  using scalar_type = double;
  double area_over_mass;  // [m^2/kg]
  double density;         // [kg/m^3]
  double (*drag_coefficient)(double speed);
  [[nodiscard]] lob::vec3<double> acceleration(const lob::vec3<double>& v_air) const {
    const double s = v_air.norm();
    return -0.5 * density * area_over_mass * drag_coefficient(s) * s * v_air;
  }
};

double constant_cd(double) { return 0.47; }
double falling_cd(double s) { return 0.25 + 0.25 / (1 + (s / 25) * (s / 25)); }

}  // namespace

TEST_CASE("a user-defined model flies through the same interface") {
  static_assert(lob::DragModel<soft_sphere>);
  const soft_sphere constant{0.0021, 1.2, &constant_cd};
  const soft_sphere softer{0.0021, 1.2, &falling_cd};
  lob::shot<double> s;
  s.velocity = lob::launch_velocity(45.0, lob::deg(40.0));
  lob::medium<double> air;
  air.wind = lob::vec3<double>(0, 3, 0);
  const auto user = lob::fly(constant, air, s, lob_test::integrated(1e-11));
  const auto builtin = lob::fly(lob::quadratic_drag<double>{.coefficient = 0.5 * 1.2 * 0.0021 * 0.47}, air, s,
                                lob_test::integrated(1e-11));
  REQUIRE(user);
  REQUIRE(builtin);
  CHECK(*user->range() == doctest::Approx(*builtin->range()).epsilon(1e-12));
  CHECK(user->landing()->position.y() == doctest::Approx(builtin->landing()->position.y()).epsilon(1e-12));
  // A drag coefficient that falls with speed (from 0.5 at rest to 0.25) carries farther.
  const auto soft = lob::fly(softer, air, s, lob_test::integrated(1e-11));
  REQUIRE(soft);
  CHECK(*soft->range() > *user->range());
  CHECK(soft->landing()->position.y() > 0);
}
