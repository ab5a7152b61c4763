#include <lob/lob.hpp>
#include <cstdio>

int main() {
  using namespace lob;
  const medium<double> air{};                       // standard gravity along -z, no wind
  const shot<double> launch{vec3<double>(0, 0, 1.5),                  // 1.5 m above ground
                            launch_velocity(25.0, deg(38.0))};        // 25 m/s at 38 deg
  const auto drag = linear_drag<double>::from_terminal_speed(20.0);   // k = g / 20 m/s
  const auto flight = fly(*drag, air, launch);     // exact closed forms (Lambert W)
  if (!flight) return std::puts(flight.error().message()), 1;

  const auto top = flight->apex();                 // result<state<double>>
  const auto land = flight->landing(0.0);          // where it comes down through z = 0
  if (!top || !land) return 1;
  std::printf("apex %.3f m at %.3f s\n", top->position.z(), top->time);
  std::printf("lands after %.3f s, %.3f m away, at %.2f m/s, %.1f deg below horizon\n",
              land->time, horizontal_distance(*land, launch, air), speed(*land),
              to_degrees(path_angle_below_horizon(*land, air)));
}
