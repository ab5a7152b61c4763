// Fuzz harness: every solver of include/lob/solve/ (aim, speed_for_elevation,
// least_speed, farthest_elevation, aim_over, intercept, reach_boundary, reach_footprint)
// for closed-form, integrated and user models, with wind and any gravity. Promises
// checked: every number of a success is finite; an aim, a speed for an elevation and a
// least speed, flown forward, pass their target within the documented tolerance
// (lob/solve/aim.hpp: solve_options::tolerance, default 64 ulp of |target - launch| + 1 m);
// aims and intercepts fly at the asked speed; a farthest shot lands at its height and no sampled
// elevation lands farther; an aim over an obstacle clears it; no call takes longer than
// fuzz::call_budget_seconds. Solver calls are kept bounded by small iteration and step
// budgets.
#include <cmath>
#include <algorithm>
#include <array>
#include <span>

#include "fuzz_input.hpp"

namespace {

bool finite(const lob::aim_solution<double>& s) {
  return fuzz::finite(s.elevation) && fuzz::finite(s.azimuth) && fuzz::finite(s.speed) &&
         fuzz::finite(s.time_of_flight) && fuzz::finite(s.velocity) && fuzz::finite(s.arrival) &&
         fuzz::finite(s.arrival_speed) && fuzz::finite(s.descent_angle);
}

bool finite(const lob::farthest_shot<double>& s) {
  return fuzz::finite(s.elevation) && fuzz::finite(s.azimuth) && fuzz::finite(s.range) &&
         fuzz::finite(s.time_of_flight) && fuzz::finite(s.velocity) && fuzz::finite(s.landing);
}

// The documented miss tolerance of aim.hpp.
double miss_tolerance(const lob::solve_options<double>& o, const lob::vec3<double>& from,
                      const lob::vec3<double>& to) {
  if (o.tolerance > 0) return o.tolerance;
  return 64 * std::numeric_limits<double>::epsilon() * ((to - from).norm() + 1);
}

// Flies a solution forward from `from` and checks that it passes `to` at its time of
// flight. A re-flight that fails (for instance on its step budget) says nothing.
template <class M>
void passes(const char* what, const M& model, const lob::medium<double>& air, const lob::solve_options<double>& o,
            const lob::vec3<double>& from, const lob::vec3<double>& to, const lob::aim_solution<double>& s) {
  FUZZ_CHECK(finite(s), "%s: a solution is not finite (elevation %.17g, time %.17g)", what, s.elevation,
             s.time_of_flight);
  const auto f = lob::fly(model, air, lob::shot<double>{from, s.velocity}, o.flight);
  if (!f) return;
  const auto at = fuzz::timed("at (re-flight)", [&] { return f->at(s.time_of_flight); });
  if (!at) return;
  double miss = (at->position - to).norm();
  // The time of flight is held in double: where the body moves farther in one ulp of it
  // than the tolerance, the path passes the target between the arrival and the state an
  // ulp of time before or after it (aim.hpp).
  for (const double side : {-HUGE_VAL, HUGE_VAL}) {
    const auto next = f->at(std::nextafter(s.time_of_flight, side));
    if (!next) continue;
    const lob::vec3<double> chord = next->position - at->position;
    const double length2 = chord.squaredNorm();
    if (!(length2 > 0) || !std::isfinite(length2)) continue;
    const double along = std::clamp((to - at->position).dot(chord) / length2, 0.0, 1.0);
    miss = std::min(miss, (at->position + along * chord - to).norm());
  }
  // The arrival is where the body reaches the target's horizontal distance; in a steep
  // descent it lies above or below the target by the pass over the cosine of the descent
  // angle. The pass the promise is about: the flight's own state at the time where the
  // tangent comes nearest to the target (aim.hpp).
  const double v2 = at->velocity.squaredNorm();
  if (v2 > 0 && std::isfinite(v2)) {
    const double dt = (to - at->position).dot(at->velocity) / v2;
    const auto nearest = f->at(s.time_of_flight + dt);
    if (nearest && std::isfinite(dt)) miss = std::min(miss, (nearest->position - to).norm());
  }
  const double tol = miss_tolerance(o, from, to);
  FUZZ_CHECK(miss <= tol, "%s: flown forward it misses the target by %.17g m (tolerance %.17g m, time %.17g s)", what,
             miss, tol, s.time_of_flight);
}

template <class M>
void solve_all(const M& model, const lob::medium<double>& air, const lob::solve_options<double>& o,
               fuzz::input& in) {
  const lob::vec3<double> from =
      in.pick(3) == 0 ? in.vec(-1000, 1000) : lob::vec3<double>{in.in(-5, 5), in.in(-5, 5), in.in(0, 5)};
  const lob::vec3<double> to =
      in.pick(3) == 0 ? in.vec(-1000, 1000) : lob::vec3<double>{in.in(-200, 200), in.in(-200, 200), in.in(-20, 40)};
  const double speed = in.maybe(1, 200);
  char text[400];
  std::snprintf(text, sizeof text, "; from (%.17g, %.17g, %.17g) to (%.17g, %.17g, %.17g), speed %.17g", from.x(),
                from.y(), from.z(), to.x(), to.y(), to.z(), speed);
  fuzz::describe_more(text);

  switch (in.pick(8)) {
    case 0: {
      const auto r = fuzz::timed("aim", [&] { return lob::aim(model, air, {from, to, speed}, o); });
      if (!r) return;
      for (const auto& s : {r->flat, r->lofted}) {
        if (!s) continue;
        passes("aim", model, air, o, from, to, *s);
        FUZZ_CHECK(std::abs(s->speed - speed) <= 1e-12 * speed, "aim: solution speed %.17g, asked %.17g", s->speed,
                   speed);
      }
      break;
    }
    case 1: {
      const double e = in.maybe(-1.5, 1.5);
      const auto r = fuzz::timed("speed_for_elevation",
                                 [&] { return lob::speed_for_elevation(model, air, {from, to, e}, o); });
      if (r) passes("speed_for_elevation", model, air, o, from, to, *r);
      break;
    }
    case 2: {
      const auto r = fuzz::timed("least_speed", [&] { return lob::least_speed(model, air, {from, to}, o); });
      if (r) passes("least_speed", model, air, o, from, to, *r);
      break;
    }
    case 3: {
      const lob::farthest_request<double> q{from, speed, in.maybe(-3.2, 3.2), in.maybe(-50, 50)};
      const auto r = fuzz::timed("farthest_elevation", [&] { return lob::farthest_elevation(model, air, q, o); });
      if (!r) return;
      FUZZ_CHECK(finite(*r), "farthest_elevation: not finite (elevation %.17g, range %.17g)", r->elevation, r->range);
      const double landed = lob::height(r->landing.position, air);
      FUZZ_CHECK(std::abs(landed - q.landing_height) <= 1e-8 * (1 + std::abs(q.landing_height) + r->range),
                 "farthest_elevation: lands at height %.17g, asked %.17g", landed, q.landing_height);
      break;
    }
    case 4: {
      const double d = in.flag() ? in.real() : in.in(0, 1) * (to - from).norm();
      const lob::clearance_request<double> q{from, to, speed, {d, in.maybe(-20, 60)}};
      const auto r = fuzz::timed("aim_over", [&] { return lob::aim_over(model, air, q, o); });
      if (!r) return;
      for (const auto& s : {r->flat, r->lofted}) {
        if (!s) continue;
        passes("aim_over", model, air, o, from, to, s->aim);
        FUZZ_CHECK(fuzz::finite(s->margin) && s->margin >= 0, "aim_over: margin %.17g", s->margin);
      }
      break;
    }
    case 5: {
      lob::intercept_options<double> io;
      io.solve = o;
      io.samples = 2 + in.pick(15);
      const lob::intercept_request<double> q{from, {to, in.vec(-20, 20)}, speed, in.maybe(0, 30)};
      const auto r = fuzz::timed("intercept", [&] { return lob::intercept(model, air, q, io); });
      if (!r) return;
      for (const auto& s : {r->earliest, r->latest}) {
        if (!s) continue;
        FUZZ_CHECK(finite(*s), "intercept: a meeting is not finite (time %.17g)", s->time_of_flight);
        FUZZ_CHECK(std::abs(s->speed - speed) <= 1e-12 * speed, "intercept: meeting speed %.17g, asked %.17g",
                   s->speed, speed);
      }
      if (r->earliest && r->latest)
        FUZZ_CHECK(r->earliest->time_of_flight <= r->latest->time_of_flight, "intercept: earliest %.17g > latest %.17g",
                   r->earliest->time_of_flight, r->latest->time_of_flight);
      break;
    }
    case 6: {
      std::array<lob::boundary_point<double>, 6> out{};
      const std::size_t n = static_cast<std::size_t>(in.pick(7));
      const lob::reach_request<double> q{from, speed, in.maybe(-3.2, 3.2), in.maybe(-50, 50)};
      const auto r = fuzz::timed("reach_boundary", [&] {
        return lob::reach_boundary(model, air, q, std::span<lob::boundary_point<double>>(out.data(), n), o);
      });
      if (!r) return;
      FUZZ_CHECK(*r == n, "reach_boundary wrote %zu of %zu", *r, n);
      for (std::size_t i = 0; i < n; ++i)
        FUZZ_CHECK(fuzz::finite(out[i].distance) && fuzz::finite(out[i].height), "reach_boundary point %zu not finite",
                   i);
      break;
    }
    default: {
      std::array<lob::footprint_point<double>, 4> out{};
      const std::size_t n = static_cast<std::size_t>(in.pick(5));
      const lob::reach_request<double> q{from, speed, 0, in.maybe(-50, 50)};
      const auto r = fuzz::timed("reach_footprint", [&] {
        return lob::reach_footprint(model, air, q, std::span<lob::footprint_point<double>>(out.data(), n), o);
      });
      if (!r) return;
      FUZZ_CHECK(*r == n, "reach_footprint wrote %zu of %zu", *r, n);
      for (std::size_t i = 0; i < n; ++i)
        FUZZ_CHECK(fuzz::finite(out[i].azimuth) && fuzz::finite(out[i].elevation) && fuzz::finite(out[i].landing) &&
                       fuzz::finite(out[i].range),
                   "reach_footprint point %zu not finite", i);
      break;
    }
  }
}

// The total step budget of one solver call, where the library has it (a template, so
// that the member is looked up only when instantiated).
template <class Options>
void set_total_steps(Options& o, std::int64_t steps) {
  if constexpr (requires { o.max_total_steps; }) o.max_total_steps = steps;
  else (void)steps;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  fuzz::input in(data, size);
  const int model = in.pick(5);
  const lob::medium<double> air = fuzz::medium(in);
  lob::solve_options<double> o;
  o.flight = fuzz::flight_options(in);
  o.max_iterations = 8 + in.pick(40);
  o.max_azimuth_iterations = 1 + in.pick(6);
  if (in.pick(8) == 0) o.tolerance = in.real();
  if (in.pick(8) == 0) o.reference = in.vec(-1, 1);
  set_total_steps(o, 2000 + 100 * in.pick(100));
  const double a = in.maybe(0, 0.1);
  fuzz::describe(
      "model %d, parameter %.17g; gravity (%.17g, %.17g, %.17g), wind (%.17g, %.17g, %.17g); method %d, rtol %.17g, "
      "max_steps %lld, fixed_step %.17g, max_time %.17g, fast %d; max_iterations %d, azimuth iterations %d, tolerance %.17g",
      model, a, air.gravity.x(), air.gravity.y(), air.gravity.z(), air.wind.x(), air.wind.y(), air.wind.z(),
      static_cast<int>(o.flight.method), o.flight.relative_tolerance, static_cast<long long>(o.flight.max_steps),
      o.flight.fixed_step, o.flight.max_time, o.flight.use_fast_paths ? 1 : 0, static_cast<int>(o.max_iterations),
      o.max_azimuth_iterations, o.tolerance);
  switch (model) {
    case 0: solve_all(lob::vacuum<double>{}, air, o, in); break;
    case 1: solve_all(lob::linear_drag<double>{a}, air, o, in); break;
    case 2: solve_all(lob::quadratic_drag<double>{a}, air, o, in); break;
    case 3: {
      const double k = in.maybe(0, 1);
      solve_all(lob::linear_quadratic_drag<double>{k, a}, air, o, in);
      break;
    }
    default: {
      const double power = in.maybe(0, 2);
      char text[64];
      std::snprintf(text, sizeof text, "; power %.17g", power);
      fuzz::describe_more(text);
      solve_all(fuzz::power_drag{a, power}, air, o, in);
      break;
    }
  }
  return 0;
}
