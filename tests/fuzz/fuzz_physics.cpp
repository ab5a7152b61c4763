// Fuzz harness: the physics functions (include/lob/physics/: standard atmosphere, air,
// sphere drag correlations, Reynolds and Mach numbers, terminal speed, model choice, the
// from_* and make_* model factories) and calibration on small inputs. Promises checked:
// every success is finite, and the quantities that are positive by nature (density,
// viscosity, speed of sound, pressure, temperature, drag coefficient, terminal speed,
// model coefficients within their domain) are > 0 or >= 0 as documented; a model a
// factory builds passes its own check(); no call takes longer than
// fuzz::call_budget_seconds.
#include <array>
#include <span>
#include <vector>

#include "fuzz_input.hpp"

namespace {

void check_air(const char* what, const lob::air_properties<double>& a) {
  FUZZ_CHECK(fuzz::finite(a.density) && a.density > 0, "%s: density %.17g", what, a.density);
  FUZZ_CHECK(fuzz::finite(a.dynamic_viscosity) && a.dynamic_viscosity > 0, "%s: viscosity %.17g", what,
             a.dynamic_viscosity);
  FUZZ_CHECK(fuzz::finite(a.speed_of_sound) && a.speed_of_sound > 0, "%s: speed of sound %.17g", what,
             a.speed_of_sound);
  FUZZ_CHECK(fuzz::finite(a.temperature) && a.temperature > 0, "%s: temperature %.17g", what, a.temperature);
  FUZZ_CHECK(fuzz::finite(a.pressure) && a.pressure > 0, "%s: pressure %.17g", what, a.pressure);
}

// Air either from the functions (usually sane) or made up (anything).
lob::air_properties<double> air_of(fuzz::input& in) {
  if (in.flag()) {
    const double temperature = in.maybe(200, 330), pressure = in.maybe(5e4, 1.1e5), humidity = in.maybe(0, 1);
    const auto a = lob::make_air(temperature, pressure, humidity);
    if (a) return *a;
  }
  return lob::air_properties<double>{in.maybe(0.5, 1.5), in.maybe(1e-5, 3e-5), in.maybe(300, 350),
                                     in.maybe(200, 330), in.maybe(5e4, 1.1e5)};
}

template <class M>
void check_model_made(const char* what, const lob::result<M>& m) {
  if (!m) return;
  const lob::status ok = lob::check_model(*m);
  FUZZ_CHECK(ok.has_value(), "%s built a model its own check() rejects: %s", what, ok.error().message());
}

// A noisy record of a short flight, fitted back.
void calibration(fuzz::input& in) {
  const lob::medium<double> air;
  const double truth = in.maybe(1e-4, 0.05);
  const double speed = in.maybe(5, 40), elevation = in.in(0.1, 1.4), azimuth = in.in(-1, 1);
  const lob::shot<double> launch{lob::vec3<double>::Zero(), lob::launch_velocity(speed, elevation, azimuth)};
  const int n = 2 + in.pick(5);
  std::array<lob::sample<double>, 6> samples{};
  const auto truth_flight = lob::fly(lob::quadratic_drag<double>{0.01}, air, launch);
  for (int i = 0; i < n; ++i) {
    const double t = in.flag() ? in.real() : 0.1 * (i + 1);
    lob::vec3<double> p = in.vec(-1, 1) * 1e-3;
    if (truth_flight && std::isfinite(t) && t >= 0) {
      const auto s = truth_flight->at(t);
      if (s) p += s->position;
    }
    samples[static_cast<std::size_t>(i)] = lob::sample<double>{t, p};
  }
  lob::fit_options<double> o;
  o.fit_speed = in.flag();
  o.fit_elevation = in.flag();
  o.loss = static_cast<lob::fit_loss>(in.pick(3));
  if (in.flag()) o.loss_scale = in.real();
  o.max_evaluations = 1 + in.pick(40);
  o.flight = fuzz::flight_options(in);
  const lob::measured_flight<double> flight{launch, std::span<const lob::sample<double>>(samples.data(),
                                                                                           static_cast<std::size_t>(n))};
  const double start = in.flag() ? in.real() : truth;
  const bool quadratic = in.flag();
  // Read last, so that the corpus recorded before it decodes as it did (the bytes past the
  // end read as zero: the smallest budget).
  o.max_total_steps = 2000 + 1000 * in.pick(20);
  char text[600];
  int used = std::snprintf(text, sizeof text,
                           "; calibrate %s from %.17g, launch velocity (%.17g, %.17g, %.17g), speed %d, elevation %d, "
                           "loss %d, scale %.17g, max_evaluations %lld, max_total_steps %lld; samples (t; x, y, z):",
                           quadratic ? "quadratic" : "linear", start, launch.velocity.x(), launch.velocity.y(),
                           launch.velocity.z(), o.fit_speed ? 1 : 0, o.fit_elevation ? 1 : 0,
                           static_cast<int>(o.loss), o.loss_scale, static_cast<long long>(o.max_evaluations),
                           static_cast<long long>(o.max_total_steps));
  for (int i = 0; i < n && used > 0 && used < static_cast<int>(sizeof text); ++i) {
    const auto& q = samples[static_cast<std::size_t>(i)];
    used += std::snprintf(text + used, sizeof text - static_cast<std::size_t>(used), " (%.9g; %.9g, %.9g, %.9g)",
                          q.time, q.position.x(), q.position.y(), q.position.z());
  }
  fuzz::describe_more(text);
  const auto make_q = [](double c) { return lob::quadratic_drag<double>{c}; };
  const auto make_l = [](double k) { return lob::linear_drag<double>{k}; };
  const auto r = fuzz::timed("calibrate", [&] {
    return quadratic ? lob::calibrate(make_q, start, flight, air, o) : lob::calibrate(make_l, start, flight, air, o);
  });
  if (!r) return;
  FUZZ_CHECK(fuzz::finite(r->parameter) && r->parameter > 0, "calibrate: parameter %.17g", r->parameter);
  FUZZ_CHECK(fuzz::finite(r->parameter_error) && r->parameter_error >= 0, "calibrate: parameter error %.17g",
             r->parameter_error);
  FUZZ_CHECK(fuzz::finite(r->rms) && fuzz::finite(r->noise_sigma), "calibrate: rms %.17g, sigma %.17g", r->rms,
             r->noise_sigma);
  FUZZ_CHECK(r->residuals.size() == static_cast<std::size_t>(n), "calibrate: %zu residuals for %d samples",
             r->residuals.size(), n);
  for (const auto& v : r->residuals) FUZZ_CHECK(fuzz::finite(v), "calibrate: a residual is not finite");
  for (const auto* list : {&r->speeds, &r->speed_errors, &r->elevations, &r->elevation_errors})
    for (double v : *list) FUZZ_CHECK(fuzz::finite(v), "calibrate: a per-flight value is %.17g", v);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  fuzz::input in(data, size);
  const int area = in.pick(12);
  const double x = in.real(), y = in.real(), z = in.real();
  fuzz::describe("area %d, values %.17g, %.17g, %.17g", area, x, y, z);
  switch (area) {
    case 0: {
      const auto h = fuzz::timed("geopotential_altitude", [&] { return lob::geopotential_altitude(x); });
      if (h) FUZZ_CHECK(fuzz::finite(*h), "geopotential_altitude(%.17g) = %.17g", x, *h);
      const auto zz = fuzz::timed("geometric_altitude", [&] { return lob::geometric_altitude(x); });
      if (zz) FUZZ_CHECK(fuzz::finite(*zz), "geometric_altitude(%.17g) = %.17g", x, *zz);
      const auto g = fuzz::timed("gravity_at_altitude", [&] { return lob::gravity_at_altitude(x); });
      if (g) FUZZ_CHECK(fuzz::finite(*g) && *g > 0, "gravity_at_altitude(%.17g) = %.17g", x, *g);
      break;
    }
    case 1: {
      const double alt = in.flag() ? x : in.in(-5000, 84852);
      const double off = in.flag() ? y : in.in(-100, 100);
      const auto s = fuzz::timed("standard_atmosphere", [&] { return lob::standard_atmosphere(alt, off); });
      if (s) {
        FUZZ_CHECK(fuzz::finite(s->temperature) && s->temperature > 0, "standard_atmosphere: T %.17g", s->temperature);
        FUZZ_CHECK(fuzz::finite(s->pressure) && s->pressure > 0, "standard_atmosphere: p %.17g", s->pressure);
        FUZZ_CHECK(fuzz::finite(s->density) && s->density > 0, "standard_atmosphere: rho %.17g", s->density);
        FUZZ_CHECK(fuzz::finite(s->speed_of_sound) && s->speed_of_sound > 0, "standard_atmosphere: a %.17g",
                   s->speed_of_sound);
        FUZZ_CHECK(fuzz::finite(s->dynamic_viscosity) && s->dynamic_viscosity > 0, "standard_atmosphere: mu %.17g",
                   s->dynamic_viscosity);
      }
      lob::site<double> where{in.flag() ? x : in.in(-5000, 80000), std::nullopt, in.maybe(0, 1)};
      if (in.flag()) where.temperature = in.maybe(230, 330);
      const auto a = fuzz::timed("site_air", [&] { return lob::site_air(where); });
      if (a) check_air("site_air", *a);
      break;
    }
    case 2: {
      const auto mu = fuzz::timed("sutherland_viscosity", [&] { return lob::sutherland_viscosity(x); });
      if (mu) FUZZ_CHECK(fuzz::finite(*mu) && *mu > 0, "sutherland_viscosity(%.17g) = %.17g", x, *mu);
      const auto a = fuzz::timed("speed_of_sound", [&] { return lob::speed_of_sound(x); });
      if (a) FUZZ_CHECK(fuzz::finite(*a) && *a > 0, "speed_of_sound(%.17g) = %.17g", x, *a);
      const auto e = fuzz::timed("saturation_vapour_pressure", [&] { return lob::saturation_vapour_pressure(x); });
      if (e) FUZZ_CHECK(fuzz::finite(*e) && *e > 0, "saturation_vapour_pressure(%.17g) = %.17g", x, *e);
      const auto v = fuzz::timed("vapour_pressure", [&] { return lob::vapour_pressure(x, y, z); });
      if (v) FUZZ_CHECK(fuzz::finite(*v) && *v >= 0, "vapour_pressure(%.17g, %.17g, %.17g) = %.17g", x, y, z, *v);
      const auto rho = fuzz::timed("humid_air_density", [&] { return lob::humid_air_density(x, y, z); });
      if (rho) FUZZ_CHECK(fuzz::finite(*rho) && *rho > 0, "humid_air_density(%.17g, %.17g, %.17g) = %.17g", x, y, z,
                          *rho);
      const auto air = fuzz::timed("make_air", [&] { return lob::make_air(x, y, z); });
      if (air) check_air("make_air", *air);
      break;
    }
    case 3: {
      const auto c = static_cast<lob::sphere_correlation>(in.pick(5));
      const auto cd = fuzz::timed("sphere_drag_coefficient", [&] { return lob::sphere_drag_coefficient(x, c); });
      if (cd) FUZZ_CHECK(fuzz::finite(*cd) && *cd > 0, "sphere_drag_coefficient(%.17g, %d) = %.17g", x,
                         static_cast<int>(c), *cd);
      const lob::air_properties<double> air = air_of(in);
      const auto re = fuzz::timed("reynolds_number", [&] { return lob::reynolds_number(y, z, air); });
      if (re) FUZZ_CHECK(fuzz::finite(*re), "reynolds_number(%.17g, %.17g) = %.17g", y, z, *re);
      const auto ma = fuzz::timed("mach_number", [&] { return lob::mach_number(y, air); });
      if (ma) FUZZ_CHECK(fuzz::finite(*ma), "mach_number(%.17g) = %.17g", y, *ma);
      break;
    }
    case 4: {
      const lob::sphere<double> ball{in.flag() ? x : in.in(1e-4, 1), in.flag() ? y : in.in(1e-4, 0.3)};
      const lob::air_properties<double> air = air_of(in);
      const auto c = static_cast<lob::sphere_correlation>(in.pick(5));
      const double g = in.flag() ? z : 9.80665;
      const auto v = fuzz::timed("terminal_speed(sphere)", [&] { return lob::terminal_speed(ball, air, c, g); });
      if (v) {
        FUZZ_CHECK(fuzz::finite(v->speed) && v->speed > 0, "terminal_speed(sphere) = %.17g", v->speed);
        FUZZ_CHECK(fuzz::finite(v->reynolds) && fuzz::finite(v->drag_coefficient) && fuzz::finite(v->mach),
                   "terminal_speed(sphere): Re %.17g, Cd %.17g, Ma %.17g", v->reynolds, v->drag_coefficient, v->mach);
      }
      const auto k = fuzz::timed("stokes_rate", [&] { return lob::stokes_rate(ball, air); });
      if (k) FUZZ_CHECK(fuzz::finite(*k) && *k > 0, "stokes_rate = %.17g", *k);
      break;
    }
    case 5: {
      const lob::body<double> thing{in.flag() ? x : in.in(1e-3, 10), in.flag() ? y : in.in(1e-4, 1),
                                    in.flag() ? z : in.in(0.05, 2), in.maybe(0, 1), in.maybe(0, 1e-3)};
      const lob::air_properties<double> air = air_of(in);
      const double g = in.flag() ? in.real() : 9.80665;
      const auto v = fuzz::timed("terminal_speed(body)", [&] { return lob::terminal_speed(thing, air, g); });
      if (v) {
        FUZZ_CHECK(fuzz::finite(v->speed) && v->speed > 0, "terminal_speed(body) = %.17g", v->speed);
        FUZZ_CHECK(fuzz::finite(v->reynolds) && fuzz::finite(v->mach), "terminal_speed(body): Re %.17g, Ma %.17g",
                   v->reynolds, v->mach);
      }
      const auto q = fuzz::timed("make_quadratic_drag(body)", [&] { return lob::make_quadratic_drag(thing, air); });
      check_model_made("make_quadratic_drag(body)", q);
      const lob::sphere<double> ball{thing.mass, in.maybe(1e-4, 0.3)};
      const lob::state<double> s{0, lob::vec3<double>::Zero(), in.vec(-100, 100)};
      const lob::medium<double> where{};
      const auto f1 = fuzz::timed("flow_at(sphere)", [&] { return lob::flow_at(ball, s, where, air); });
      if (f1) FUZZ_CHECK(fuzz::finite(f1->air_speed) && fuzz::finite(f1->reynolds) && fuzz::finite(f1->mach),
                         "flow_at(sphere): v %.17g, Re %.17g, Ma %.17g", f1->air_speed, f1->reynolds, f1->mach);
      const auto f2 = fuzz::timed("flow_at(body)", [&] { return lob::flow_at(thing, s, where, air); });
      if (f2) FUZZ_CHECK(fuzz::finite(f2->air_speed) && fuzz::finite(f2->reynolds) && fuzz::finite(f2->mach),
                         "flow_at(body): v %.17g, Re %.17g, Ma %.17g", f2->air_speed, f2->reynolds, f2->mach);
      break;
    }
    case 6: {
      const lob::sphere<double> ball{in.flag() ? x : in.in(1e-4, 1), in.flag() ? y : in.in(1e-4, 0.3)};
      const lob::air_properties<double> air = air_of(in);
      const auto c = static_cast<lob::sphere_correlation>(in.pick(5));
      const double cd = in.flag() ? z : in.in(0.1, 1);
      check_model_made("make_linear_drag", fuzz::timed("make_linear_drag", [&] { return lob::make_linear_drag(ball, air); }));
      check_model_made("make_quadratic_drag",
                       fuzz::timed("make_quadratic_drag", [&] { return lob::make_quadratic_drag(ball, air, cd); }));
      check_model_made("make_linear_quadratic_drag", fuzz::timed("make_linear_quadratic_drag", [&] {
                         return lob::make_linear_quadratic_drag(ball, air, cd);
                       }));
      check_model_made("make_correlated_drag",
                       fuzz::timed("make_correlated_drag", [&] { return lob::make_correlated_drag(ball, air, c); }));
      break;
    }
    case 7: {
      const lob::sphere<double> ball{in.flag() ? x : in.in(1e-4, 1), in.flag() ? y : in.in(1e-4, 0.3)};
      const lob::air_properties<double> air = air_of(in);
      lob::choice_options<double> o;
      o.correlation = static_cast<lob::sphere_correlation>(in.pick(5));
      if (in.flag()) o.tolerance = in.real();
      if (in.flag()) o.gravity = in.real();
      const double lo = in.flag() ? z : in.in(0, 10), hi = in.flag() ? in.real() : in.in(10, 100);
      const auto r = fuzz::timed("choose_drag_model", [&] { return lob::choose_drag_model(ball, air, lo, hi, o); });
      if (r) {
        for (double v : {r->reynolds_min, r->reynolds_max, r->mach_max, r->linear_error, r->quadratic_error,
                         r->linear_quadratic_error, r->speed_dependent_error, r->quadratic_cd, r->linear_quadratic_cd})
          FUZZ_CHECK(fuzz::finite(v), "choose_drag_model: a number of the advice is %.17g", v);
        FUZZ_CHECK(r->why()[0] != '\0', "choose_drag_model: no reason given");
      }
      break;
    }
    case 8: {
      const double g = in.flag() ? z : 9.80665;
      check_model_made("linear_drag::from_terminal_speed",
                       fuzz::timed("linear from_terminal_speed", [&] { return lob::linear_drag<double>::from_terminal_speed(x, g); }));
      check_model_made("quadratic_drag::from_terminal_speed", fuzz::timed("quadratic from_terminal_speed", [&] {
                         return lob::quadratic_drag<double>::from_terminal_speed(x, g);
                       }));
      check_model_made("quadratic_drag::from_body", fuzz::timed("quadratic from_body", [&] {
                         return lob::quadratic_drag<double>::from_body(x, y, z, in.real());
                       }));
      // Documented for a coefficient >= 0 and gravity > 0: sqrt(g / c), infinite for c = 0.
      if (std::isfinite(x) && std::isfinite(y) && y != 0) {
        const double t = lob::quadratic_drag<double>{std::abs(x)}.terminal_speed(std::abs(y));
        FUZZ_CHECK(!std::isnan(t) && t > 0, "quadratic_drag{%.17g}.terminal_speed(%.17g) = %.17g", std::abs(x),
                   std::abs(y), t);
      }
      break;
    }
    case 9: {
      const double w = in.real(), c = in.real();
      check_model_made("linear_quadratic_drag::from_sphere", fuzz::timed("from_sphere", [&] {
                         return lob::linear_quadratic_drag<double>::from_sphere(x, y, z, w, c);
                       }));
      check_model_made("linear_quadratic_drag::from_forces", fuzz::timed("from_forces", [&] {
                         return lob::linear_quadratic_drag<double>::from_forces(x, y, z);
                       }));
      break;
    }
    default: calibration(in); break;
  }
  return 0;
}
