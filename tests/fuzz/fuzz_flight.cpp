// Fuzz harness: lob::fly() for every model, with wind and any gravity, and every
// trajectory query on the result. Promises checked: every success value is finite; at(t)
// is at t; a crossing or landing at height h is at height h; at_distance(d) is at distance
// d; sample() fills what it says; drag never lands farther than vacuum in still air; no
// call takes longer than fuzz::call_budget_seconds.
#include <array>
#include <optional>
#include <span>
#include <type_traits>

#include "fuzz_input.hpp"

namespace {

// Relative tolerance of a located height or distance, against the size of the problem
// (1 m + the target value + the distance flown): event location runs to the full
// precision of double on the flight's own interpolant, so 1e-8 leaves the ulps of the
// interpolation and of the frame's rounding a wide margin.
constexpr double event_rtol = 1e-8;

double size_of(const lob::state<double>& s, const lob::shot<double>& launch, double target) {
  return 1.0 + std::abs(target) + (s.position - launch.position).norm();
}

template <class Flight>
void check_state(const char* what, const lob::result<lob::state<double>>& s) {
  (void)sizeof(Flight);
  if (s) FUZZ_CHECK(fuzz::finite(*s), "%s returned a non-finite state (t = %g)", what, s->time);
}

template <class Flight>
void query(const Flight& f, const lob::medium<double>& air, const lob::shot<double>& launch, fuzz::input& in) {
  const double g = air.gravity.norm();
  const double h0 = g > 0 ? lob::height(launch.position, air) : 0.0;

  const double t = in.maybe(0, 60);
  const auto at = fuzz::timed("at", [&] { return f.at(t); });
  check_state<Flight>("at", at);
  if (at) FUZZ_CHECK(at->time == t, "at(%.17g) returned time %.17g", t, at->time);

  const auto apex = fuzz::timed("apex", [&] { return f.apex(); });
  check_state<Flight>("apex", apex);
  if (apex) {
    const double top = lob::height(apex->position, air);
    FUZZ_CHECK(top >= h0 - event_rtol * size_of(*apex, launch, h0), "apex height %.17g below launch %.17g", top,
               h0);
  }

  // Heights near the launch and the apex, and any height.
  double h = in.maybe(-100, 100);
  switch (in.pick(4)) {
    case 0: h = h0 + in.in(-50, 50); break;
    case 1:
      if (apex) h = lob::height(apex->position, air) - in.in(0, 10);
      break;
    default: break;
  }
  const lob::side branch = in.flag() ? lob::side::rising : lob::side::falling;
  const auto cross = fuzz::timed("crossing", [&] { return f.crossing(h, branch); });
  check_state<Flight>("crossing", cross);
  if (cross) {
    const double got = lob::height(cross->position, air);
    FUZZ_CHECK(std::abs(got - h) <= event_rtol * size_of(*cross, launch, h),
               "crossing(%.17g, %s) is at height %.17g", h, branch == lob::side::rising ? "rising" : "falling", got);
  }

  const auto land = fuzz::timed("landing", [&] { return f.landing(h); });
  check_state<Flight>("landing", land);
  if (land) {
    const double got = lob::height(land->position, air);
    FUZZ_CHECK(std::abs(got - h) <= event_rtol * size_of(*land, launch, h), "landing(%.17g) is at height %.17g", h,
               got);
  }

  const auto range = fuzz::timed("range", [&] { return f.range(h); });
  if (range) FUZZ_CHECK(fuzz::finite(*range) && *range >= 0, "range(%.17g) = %.17g", h, *range);

  const double d = in.flag() ? in.maybe(0, 200) : (range ? *range * in.in(0, 1.2) : in.real());
  const auto far = fuzz::timed("at_distance", [&] { return f.at_distance(d); });
  check_state<Flight>("at_distance", far);
  if (far && g > 0) {
    const double got = lob::horizontal_distance(*far, launch, air);
    FUZZ_CHECK(std::abs(got - d) <= event_rtol * size_of(*far, launch, d), "at_distance(%.17g) is at %.17g", d,
               got);
  }

  std::array<lob::state<double>, 6> buffer{};
  const std::size_t n = static_cast<std::size_t>(in.pick(7));
  const double t_end = in.maybe(0, 30);
  const auto wrote = fuzz::timed(
      "sample", [&] { return f.sample(std::span<lob::state<double>>(buffer.data(), n), t_end); });
  if (wrote) {
    FUZZ_CHECK(*wrote == n, "sample wrote %zu of %zu", *wrote, n);
    for (std::size_t i = 0; i < n; ++i)
      FUZZ_CHECK(fuzz::finite(buffer[i]), "sample %zu of %zu (t_end %.17g) is not finite", i, n, t_end);
    if (n > 1) FUZZ_CHECK(buffer[n - 1].time == t_end, "last sample at %.17g, not %.17g", buffer[n - 1].time, t_end);
  }

}

// Drag never lands farther than vacuum from the same launch in still air, at any landing
// height. The adaptive method meets its relative tolerance on the range
// (lob/core/options.hpp), so the drag range may exceed the exact one by that much, with a
// factor 10 of margin; fixed steps promise no accuracy and are left out.
template <class M>
void no_farther_than_vacuum(const M& model, const lob::medium<double>& air, const lob::shot<double>& launch,
                            const lob::flight_options<double>& o, double h, double drag_range) {
  if (air.wind != lob::vec3<double>::Zero() || !(air.gravity.norm() > 0)) return;
  if (o.method != lob::stepper::adaptive) return;
  const auto vac = lob::fly(lob::vacuum<double>{}, air, launch);
  if (!vac) return;
  const auto vr = fuzz::timed("vacuum range", [&] { return vac->range(h); });
  if (!vr) return;
  const double rtol = lob::model_traits<M>::closed_form ? 1e-14 : 10 * o.relative_tolerance;
  FUZZ_CHECK(drag_range <= *vr * (1 + rtol) + 1e-12 * (1 + std::abs(h)),
             "drag range %.17g beyond vacuum range %.17g at landing height %.17g", drag_range, *vr, h);
  (void)model;
}

template <class M>
void fly_and_query(const M& model, const lob::medium<double>& air, const lob::shot<double>& launch,
                   const lob::flight_options<double>& o, fuzz::input& in) {
  const auto f = fuzz::timed("fly", [&] { return lob::fly(model, air, launch, o); });
  if (!f) return;
  const double h = in.maybe(-100, 100);
  const auto r = fuzz::timed("range", [&] { return f->range(h); });
  if (r) {
    FUZZ_CHECK(fuzz::finite(*r) && *r >= 0, "range(%.17g) = %.17g", h, *r);
    if constexpr (!std::is_same_v<M, lob::vacuum<double>>) no_farther_than_vacuum(model, air, launch, o, h, *r);
  }
  query(*f, air, launch, in);
}

lob::shot<double> launch_of(fuzz::input& in) {
  lob::shot<double> s;
  s.position = in.pick(3) == 0 ? in.vec(-1000, 1000) : lob::vec3<double>{in.in(-10, 10), in.in(-10, 10), in.in(-10, 10)};
  switch (in.pick(4)) {
    case 0: s.velocity = in.vec(-100, 100); break;
    case 1: s.velocity = lob::vec3<double>(0, 0, in.real()); break;  // vertical
    default: {
      const double speed = in.maybe(0, 300), elevation = in.in(-1.6, 1.6), azimuth = in.in(-3.2, 3.2);
      s.velocity = lob::launch_velocity(speed, elevation, azimuth);
      break;
    }
  }
  return s;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  fuzz::input in(data, size);
  const int model = in.pick(6);
  const lob::medium<double> air = fuzz::medium(in);
  const lob::shot<double> launch = launch_of(in);
  const lob::flight_options<double> o = fuzz::flight_options(in);
  const double a = in.maybe(0, 0.1);
  fuzz::describe(
      "model %d, parameter %.17g; gravity (%.17g, %.17g, %.17g), wind (%.17g, %.17g, %.17g); launch (%.17g, %.17g, "
      "%.17g) velocity (%.17g, %.17g, %.17g); method %d, rtol %.17g, fixed_step %.17g, max_steps %lld, max_time "
      "%.17g, fast %d",
      model, a, air.gravity.x(), air.gravity.y(), air.gravity.z(), air.wind.x(), air.wind.y(), air.wind.z(),
      launch.position.x(), launch.position.y(), launch.position.z(), launch.velocity.x(), launch.velocity.y(),
      launch.velocity.z(), static_cast<int>(o.method), o.relative_tolerance, o.fixed_step,
      static_cast<long long>(o.max_steps), o.max_time, o.use_fast_paths ? 1 : 0);
  switch (model) {
    case 0: fly_and_query(lob::vacuum<double>{}, air, launch, o, in); break;
    case 1: fly_and_query(lob::linear_drag<double>{a}, air, launch, o, in); break;
    case 2: fly_and_query(lob::quadratic_drag<double>{a}, air, launch, o, in); break;
    case 3: fly_and_query(lob::linear_quadratic_drag<double>{in.maybe(0, 1), a}, air, launch, o, in); break;
    case 4: {
      const auto c = static_cast<lob::sphere_correlation>(in.pick(5));
      fly_and_query(lob::correlated_drag<double>{in.maybe(0, 1e-3), in.maybe(0, 1e4), c}, air, launch, o, in);
      break;
    }
    default: fly_and_query(fuzz::power_drag{a, in.maybe(0, 2)}, air, launch, o, in); break;
  }
  return 0;
}
