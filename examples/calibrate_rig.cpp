// Calibrating a launcher on a test bench from camera samples (a scenario of our own).
//
// A bench at an upland site (1200 m, 24 C, 40% humidity) throws 18 mm clay pellets of 6.1 g.
// The nominal launcher setting is 21 m/s at 35 degrees, but the real launches differ a
// little from shot to shot. A camera samples each flight at 20 Hz with 4 mm of noise, and
// the tracker loses the pellet on a few frames. From the pellet and the air, lob picks a
// drag model; from the samples it fits the drag coefficient and each flight's launch speed
// and elevation, robustly, and the program prints them against the true values.
#include <cmath>
#include <cstdio>
#include <random>
#include <vector>

#include <lob/lob.hpp>

int main() {
  // The air at the bench and the pellet.
  const lob::result<lob::air_properties<double>> air = lob::site_air(lob::site<double>{1200.0, 297.15, 0.4});
  if (!air) {
    std::printf("air: %s\n", air.error().message());
    return 1;
  }
  const lob::sphere<double> pellet{0.0061, 0.018};
  std::printf("air at the bench: %.4f kg/m^3, %.4g Pa s, %.1f Pa\n", air->density, air->dynamic_viscosity,
              air->pressure);

  // Which model for speeds up to 25 m/s?
  const lob::result<lob::model_advice<double>> advice = lob::choose_drag_model(pellet, *air, 1.0, 25.0);
  if (!advice) {
    std::printf("advice: %s\n", advice.error().message());
    return 1;
  }
  std::printf("advice: %s\n", advice->why());
  const lob::result<lob::terminal_state<double>> fall = lob::terminal_speed(pellet, *air);
  if (fall) std::printf("terminal speed: %.2f m/s at Re %.3g\n", fall->speed, fall->reynolds);

  // The truth the bench does not know: a drag coefficient of 0.51 (a slightly rough
  // pellet) and three launches near the nominal setting.
  const lob::result<lob::quadratic_drag<double>> truth = lob::make_quadratic_drag(pellet, *air, 0.51);
  if (!truth) return 1;
  const double true_speed[] = {21.6, 20.7, 21.2};
  const double true_elevation_deg[] = {35.8, 34.1, 36.4};
  const double azimuth_deg[] = {-4.0, 0.0, 5.0};
  const lob::medium<double> world{};
  const lob::vec3<double> muzzle(0.0, 0.0, 1.3);

  std::mt19937_64 rng(20260101);
  std::normal_distribution<double> noise(0.0, 0.004);
  std::vector<std::vector<lob::sample<double>>> frames(3);
  std::vector<lob::measured_flight<double>> flights;
  for (int f = 0; f < 3; ++f) {
    const lob::shot<double> real{muzzle, lob::launch_velocity(true_speed[f], lob::deg(true_elevation_deg[f]),
                                                              lob::deg(azimuth_deg[f]))};
    const auto path = lob::fly(*truth, world, real);
    if (!path) return 1;
    for (int i = 1; i <= 35; ++i) {
      const double t = i / 20.0;
      const lob::result<lob::state<double>> s = path->at(t);
      if (!s) return 1;
      lob::vec3<double> seen = s->position + lob::vec3<double>(noise(rng), noise(rng), noise(rng));
      if ((f == 1 && i == 12) || (f == 2 && i == 26)) seen.z() += 0.9;  // tracker jumped
      frames[f].push_back({t, seen});
    }
    // What the bench believes: the nominal setting.
    const lob::shot<double> nominal{muzzle,
                                    lob::launch_velocity(21.0, lob::deg(35.0), lob::deg(azimuth_deg[f]))};
    flights.push_back({nominal, frames[f]});
  }

  // Fit c of quadratic drag, started from the advised Cd, with each flight's speed and
  // elevation, under a Cauchy loss of scale 3 noise sigmas (it lets gross outliers go
  // entirely, where a Huber loss would still pull by its scale).
  const lob::result<lob::quadratic_drag<double>> start =
      lob::make_quadratic_drag(pellet, *air, advice->quadratic_cd);
  if (!start) return 1;
  lob::fit_options<double> options;
  options.fit_speed = true;
  options.fit_elevation = true;
  options.loss = lob::fit_loss::cauchy;
  options.loss_scale = 0.012;
  const auto family = [](double c) { return lob::quadratic_drag<double>{c}; };
  const lob::result<lob::fit_result<double>> fit = lob::calibrate(
      family, start->coefficient, std::span<const lob::measured_flight<double>>(flights), world, options);
  if (!fit) {
    std::printf("fit: %s\n", fit.error().message());
    return 1;
  }
  // Cd from c: Cd = 2 m c / (rho A).
  const double to_cd = 2 * pellet.mass / (air->density * pellet.area());
  // The last column: how many of its standard errors each estimate is off the truth.
  std::printf("\n%-26s %11s %26s %8s\n", "", "true", "fitted +- std. error", "off");
  const auto row = [](const char* what, double truth_value, double fitted, double error) {
    std::printf("%-26s %11.6g %13.6g +- %-10.2g %+7.2f\n", what, truth_value, fitted, error,
                (fitted - truth_value) / error);
  };
  row("drag coefficient c [1/m]", truth->coefficient, fit->parameter, fit->parameter_error);
  row("  as Cd", 0.51, fit->parameter * to_cd, fit->parameter_error * to_cd);
  for (int f = 0; f < 3; ++f) {
    char name[64];
    std::snprintf(name, sizeof name, "flight %d speed [m/s]", f + 1);
    row(name, true_speed[f], fit->speeds[f], fit->speed_errors[f]);
    std::snprintf(name, sizeof name, "flight %d elevation [deg]", f + 1);
    row(name, true_elevation_deg[f], lob::to_degrees(fit->elevations[f]),
        lob::to_degrees(fit->elevation_errors[f]));
  }
  std::printf("rms residual %.4f m, noise estimate %.4f m, %lld evaluations\n", fit->rms, fit->noise_sigma,
              static_cast<long long>(fit->evaluations));
  for (std::size_t i = 0; i < fit->residuals.size(); ++i)
    if (fit->residuals[i].norm() > 0.1)
      std::printf("sample %zu looks like a tracking error: residual %.3f m\n", i, fit->residuals[i].norm());
  return 0;
}
