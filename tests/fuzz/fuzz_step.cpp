// Fuzz harness: lob/step, an engine's stepped body. fly(engine_step, ...) with any step,
// damping, order and gravity, then at_step, replay, at, apex, crossing, landing, range,
// velocity_to_meet and the stepped aim. Promises checked: every success value is finite;
// the closed form agrees with the engine's own loop (replay) to its roundings; the apex
// is not below its neighbouring steps; a crossing lies between its two steps at the asked
// height; an aim and a velocity_to_meet, flown by replay, meet the target; the aim flies at
// the asked speed; no call takes longer than fuzz::call_budget_seconds.
#include <algorithm>

#include "fuzz_input.hpp"

namespace {

// Replays of at most this many steps: bounds every check's cost.
constexpr std::int64_t replay_cap = 3000;

// Agreement of two computations of one stepped position: relative to the size of the
// flight up to step n (1 m + |x0| + n dt |v0| + n^2 dt^2 |g|), 1e-12 per step leaves the
// loop's rounding (about an ulp per step) a wide margin.
double size_at(const lob::shot<double>& launch, const lob::medium<double>& air, double dt, double n) {
  const double t = n * dt;
  return 1.0 + launch.position.norm() + t * launch.velocity.norm() + t * t * air.gravity.norm();
}
double tolerance(double n) { return 1e-12 * (n + 10); }

void query(const lob::stepped_flight<double>& f, const lob::engine_step<double>& rule,
           const lob::medium<double>& air, const lob::shot<double>& launch, fuzz::input& in) {
  const bool linear = f.closed_form();
  const auto n = static_cast<std::int64_t>(in.bits(2) % replay_cap);
  const auto at = fuzz::timed("at_step", [&] { return f.at_step(n); });
  if (at) {
    FUZZ_CHECK(fuzz::finite(at->position) && fuzz::finite(at->velocity), "at_step(%lld) not finite",
               static_cast<long long>(n));
    const auto loop = fuzz::timed("replay", [&] { return f.replay(n); });
    FUZZ_CHECK(loop.has_value(), "at_step(%lld) succeeds, replay fails: %s", static_cast<long long>(n),
               loop ? "" : loop.error().message());
    const double size = size_at(launch, air, rule.dt, double(n));
    if (std::isfinite(size) && linear)
      FUZZ_CHECK(lob::scaled_norm(lob::vec3<double>(at->position - loop->position)) <= tolerance(double(n)) * size,
                 "closed form and replay differ at step %lld by %.17g (size %.17g)", static_cast<long long>(n),
                 lob::scaled_norm(lob::vec3<double>(at->position - loop->position)), size);
  }
  const double t = in.maybe(0, 30);
  const auto at_t = fuzz::timed("at", [&] { return f.at(t); });
  if (at_t) FUZZ_CHECK(fuzz::finite(*at_t), "at(%.17g) not finite", t);

  const double g = air.gravity.norm();
  if (!(g > 0)) return;
  const auto apex = fuzz::timed("apex", [&] { return f.apex(); });
  const double h0 = lob::height(launch.position, air);
  if (apex) {
    FUZZ_CHECK(fuzz::finite(apex->position) && fuzz::finite(apex->velocity), "apex not finite");
    const double top = lob::height(apex->position, air);
    const double size = size_at(launch, air, rule.dt, double(apex->step + 1));
    if (apex->step + 1 <= replay_cap && std::isfinite(size)) {
      const auto next = f.replay(apex->step + 1);
      if (next)
        FUZZ_CHECK(lob::height(next->position, air) <= top + tolerance(double(apex->step)) * size,
                   "the step after the apex (%lld) is higher", static_cast<long long>(apex->step));
    }
    if (std::isfinite(h0) && std::isfinite(size))  // at 1e308 the height itself can overflow
      FUZZ_CHECK(top >= h0 - tolerance(double(apex->step)) * size, "apex below the launch");
  }
  double h = in.maybe(-50, 50);
  if (in.flag()) h += h0;
  const lob::side branch = in.flag() ? lob::side::rising : lob::side::falling;
  const auto c = fuzz::timed("crossing", [&] { return f.crossing(h, branch); });
  if (c) {
    FUZZ_CHECK(fuzz::finite(c->point), "crossing not finite");
    FUZZ_CHECK(c->fraction >= 0 && c->fraction <= 1, "crossing fraction %.17g", c->fraction);
    const double size = size_at(launch, air, rule.dt, double(c->step));
    // The point lies on the segment between two steps: its height is exact to the rounding
    // of their heights (an unstable quadratic step throws the body out to 1e306 m).
    const auto end_a = f.at_step(c->step > 0 ? c->step - 1 : 0);
    const auto end_b = f.at_step(c->step);
    const double ends = end_a && end_b ? std::max(std::abs(lob::height(end_a->position, air)),
                                                  std::abs(lob::height(end_b->position, air)))
                                       : 0.0;
    if (std::isfinite(size)) {
      FUZZ_CHECK(std::abs(lob::height(c->point.position, air) - h) <=
                     tolerance(double(c->step)) * size + 1e-9 * std::abs(h) + 8 * 2.3e-16 * ends,
                 "crossing(%.17g) at height %.17g", h, lob::height(c->point.position, air));
      if (c->step >= 1 && c->step <= replay_cap) {
        const auto a = f.replay(c->step - 1);
        const auto b = f.replay(c->step);
        if (a && b) {
          const double ha = lob::height(a->position, air), hb = lob::height(b->position, air);
          const double slack = tolerance(double(c->step)) * size;
          FUZZ_CHECK(std::min(ha, hb) <= h + slack && std::max(ha, hb) >= h - slack,
                     "crossing(%.17g) at step %lld is not between the heights %.17g and %.17g", h,
                     static_cast<long long>(c->step), ha, hb);
        }
      }
    }
  }
  const auto r = fuzz::timed("range", [&] { return f.range(h); });
  if (r) FUZZ_CHECK(std::isfinite(*r) && *r >= 0, "range %.17g", *r);
}

// The engine body at step - 1 + fraction, by replay.
lob::vec3<double> replayed(const lob::engine_step<double>& rule, const lob::medium<double>& air,
                           const lob::vec3<double>& from, const lob::vec3<double>& v, std::int64_t step,
                           double fraction, bool& ok) {
  const auto f = lob::fly(rule, air, lob::shot<double>{from, v});
  ok = false;
  if (!f) return {};
  const auto b = f->replay(step);
  if (!b) return {};
  if (step == 0) {
    ok = true;
    return b->position;
  }
  const auto a = f->replay(step - 1);
  if (!a) return {};
  ok = true;
  return a->position + (b->position - a->position) * fraction;
}

void aims(const lob::engine_step<double>& rule, const lob::medium<double>& air, const lob::shot<double>& launch,
          fuzz::input& in) {
  const lob::vec3<double> target = launch.position + in.vec(-100, 100);
  const lob::vec3<double> moving = in.flag() ? in.vec(-10, 10) : lob::vec3<double>::Zero();
  const double steps = in.maybe(0, 400);
  const auto v = fuzz::timed("velocity_to_meet",
                             [&] { return lob::velocity_to_meet(rule, air, launch.position, target, steps, moving); });
  if (v) {
    FUZZ_CHECK(fuzz::finite(*v), "velocity_to_meet not finite");
    const double fl = std::floor(steps);
    bool ok = false;
    if (fl + 1 <= double(replay_cap)) {
      const lob::vec3<double> at = replayed(rule, air, launch.position, *v, std::int64_t(fl) + 1, steps - fl, ok);
      const double t = steps * rule.dt;
      const lob::vec3<double> goal = target + moving * t;
      // The weights are computed for whole steps and interpolated: the size is that of
      // the step reached.
      const double ts = (fl + 1) * rule.dt;
      const double size = 1 + launch.position.norm() + target.norm() + ts * (v->norm() + moving.norm()) + ts * ts * air.gravity.norm();
      if (ok && std::isfinite(size))
        FUZZ_CHECK(lob::scaled_norm(lob::vec3<double>(at - goal)) <= tolerance(steps) * size, "velocity_to_meet(%.17g steps) misses by %.17g",
                   steps, lob::scaled_norm(lob::vec3<double>(at - goal)));
    }
  }
  lob::stepped_aim_request<double> req{launch.position, target, in.maybe(0.1, 200), moving};
  lob::stepped_aim_options<double> o;
  o.max_steps = 1 + std::int64_t(in.bits(2));
  const auto s = fuzz::timed("stepped aim", [&] { return lob::aim(rule, air, req, o); });
  if (!s) return;
  for (const auto& one : {s->flat, s->lofted}) {
    if (!one) continue;
    const lob::aim_solution<double>& a = one->solution;
    FUZZ_CHECK(fuzz::finite(a.velocity) && fuzz::finite(a.arrival) && std::isfinite(a.time_of_flight),
               "stepped aim not finite");
    FUZZ_CHECK(std::abs(a.speed - req.speed) <= 1e-9 * req.speed, "stepped aim speed %.17g, asked %.17g", a.speed,
               req.speed);
    FUZZ_CHECK(one->step >= 0 && one->step <= o.max_steps, "stepped aim at step %lld",
               static_cast<long long>(one->step));
    if (one->step > replay_cap) continue;
    bool ok = false;
    const lob::vec3<double> at = replayed(rule, air, launch.position, a.velocity, one->step, one->fraction, ok);
    const double t = a.time_of_flight;
    const lob::vec3<double> goal = target + moving * t;
    const double ts = double(one->step) * rule.dt;  // the size of the step reached, as above
    const double size = 1 + launch.position.norm() + target.norm() + ts * (req.speed + moving.norm()) + ts * ts * air.gravity.norm();
    if (ok && std::isfinite(size))
      FUZZ_CHECK(lob::scaled_norm(lob::vec3<double>(at - goal)) <= tolerance(double(one->step)) * size,
                 "stepped aim flown by replay misses by %.17g (size %.17g); speed %.17g, target (%.17g, %.17g, %.17g) "
                 "moving (%.17g, %.17g, %.17g), step %lld fraction %.17g, max_steps %lld",
                 lob::scaled_norm(lob::vec3<double>(at - goal)), size, req.speed, target.x(), target.y(), target.z(),
                 moving.x(), moving.y(), moving.z(), static_cast<long long>(one->step), one->fraction,
                 static_cast<long long>(o.max_steps));
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  fuzz::input in(data, size);
  lob::engine_step<double> rule;
  rule.dt = in.flag() ? in.real() : 1.0 / (15 + in.pick(226));
  rule.order = in.flag() ? lob::euler_order::velocity_first : lob::euler_order::position_first;
  rule.rule = static_cast<lob::damping_rule>(in.pick(4));
  rule.damping = in.maybe(0, 1);
  rule.gravity = in.flag() ? lob::gravity_timing::before_damping : lob::gravity_timing::after_damping;
  rule.quadratic = in.pick(3) == 0 ? in.maybe(0, 0.1) : 0.0;
  lob::medium<double> air;
  air.gravity = fuzz::gravity(in);
  if (in.pick(8) == 0) air.wind = in.vec(-10, 10);
  const lob::shot<double> launch{in.vec(-100, 100), in.vec(-60, 60)};
  const std::int64_t max_steps = in.flag() ? replay_cap : lob::stepped_flight<double>::default_max_steps;
  fuzz::describe(
      "dt %.17g, order %d, rule %d, damping %.17g, gravity timing %d, quadratic %.17g; gravity (%.17g, %.17g, %.17g), "
      "wind (%.17g, %.17g, %.17g); launch (%.17g, %.17g, %.17g) velocity (%.17g, %.17g, %.17g); max_steps %lld",
      rule.dt, int(rule.order), int(rule.rule), rule.damping, int(rule.gravity), rule.quadratic, air.gravity.x(),
      air.gravity.y(), air.gravity.z(), air.wind.x(), air.wind.y(), air.wind.z(), launch.position.x(),
      launch.position.y(), launch.position.z(), launch.velocity.x(), launch.velocity.y(), launch.velocity.z(),
      static_cast<long long>(max_steps));
  // The stepping queries of a quadratic rule are O(n): keep them to the replay cap.
  const auto f = fuzz::timed("fly", [&] {
    return lob::fly(rule, air, launch, rule.quadratic != 0 ? replay_cap : max_steps);
  });
  if (f) query(*f, rule, air, launch, in);
  aims(rule, air, launch, in);
  return 0;
}
