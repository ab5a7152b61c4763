// A drag model of your own, flown by lob without touching lob's code.
//
// The scenario (invented): a foam practice disc-ball whose drag coefficient falls as it
// speeds up, described by a function the user supplies. Any type with a nested
// `scalar_type` and `acceleration(v_air)` satisfies lob::DragModel and gets integrated
// flight: apex, landing, range, crossings, sampling, in wind, with every stepper.
#include <array>
#include <cstdio>

#include "lob/lob.hpp"

namespace {

// The user's drag coefficient as a function of air speed [m/s]: 0.55 when slow, settling
// to 0.30 when fast (a made-up smooth curve for the demo, not a measurement).
double foam_drag_coefficient(double speed) {
  const double s = speed / 18.0;
  return 0.30 + 0.25 / (1.0 + s * s);
}

// a = -(rho A C_d(|v|) / 2m) |v| v, with C_d from the user's function.
struct foam_ball {
  using scalar_type = double;
  double mass;      // [kg]
  double area;      // frontal area [m^2]
  double density;   // air density [kg/m^3]
  double (*drag_coefficient)(double speed);

  [[nodiscard]] lob::vec3<double> acceleration(const lob::vec3<double>& v_air) const {
    const double speed = v_air.norm();
    return -(density * area * drag_coefficient(speed) / (2 * mass)) * speed * v_air;
  }
};

}  // namespace

int main() {
  static_assert(lob::DragModel<foam_ball>, "foam_ball satisfies the drag-model concept");
  const foam_ball ball{
      .mass = 0.045, .area = 0.0044, .density = 1.2, .drag_coefficient = &foam_drag_coefficient};

  lob::shot<double> launch;
  launch.position = lob::vec3<double>(0, 0, 1.2);
  launch.velocity = lob::launch_velocity(24.0, lob::deg(38.0));
  lob::medium<double> air;
  air.wind = lob::vec3<double>(0, 3.0, 0);  // a 3 m/s crosswind from the right

  const auto flight = lob::fly(ball, air, launch);
  if (!flight) {
    std::printf("error: %s\n", flight.error().message());
    return 1;
  }
  const auto top = flight->apex();
  const auto land = flight->landing();
  if (!top || !land) {
    std::printf("error: %s\n", (!top ? top.error() : land.error()).message());
    return 1;
  }
  std::printf("apex    %.3f s at height %.3f m\n", top->time, top->position.z());
  std::printf("landing %.3f s at (%.3f, %.3f) m, range %.3f m, %.2f m/s\n", land->time, land->position.x(),
              land->position.y(), flight->range().value_or(0), lob::speed(*land));

  std::array<lob::state<double>, 6> path;
  const auto n = flight->sample(path, land->time);
  for (std::size_t i = 0; i < n.value_or(0); ++i)
    std::printf("  t %.3f  x %.3f  y %.3f  z %.3f\n", path[i].time, path[i].position.x(),
                path[i].position.y(), path[i].position.z());
  return 0;
}
