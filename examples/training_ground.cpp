// Demo: a practice-ball machine on a training ground.
//
// The machine stands on a low platform and throws light foam training balls (our own
// invented scenario; the numbers are made up for the demo). For several elevations it
// prints flight time, apex height and range in vacuum and with linear drag, marks the
// farthest elevation it finds, and draws the paths into an SVG picture.
//
// Usage: training_ground [picture.svg]
#include <array>
#include <cmath>
#include <cstdio>

#include <lob/lob.hpp>

namespace {

// The scenario (invented): launch 1.2 m above the grass at 22 m/s; the foam ball falls at
// no more than 14 m/s, which fixes its linear drag rate k = g / 14 m/s.
constexpr double launch_height = 1.2;  // m
constexpr double launch_speed = 22.0;  // m/s
constexpr double ball_fall_speed = 14.0;  // m/s, terminal speed of the foam ball

struct flight_summary {
  double time = 0, apex = 0, range = 0;
  bool ok = false;
};

template <class Model>
flight_summary summarise(const Model& model, double elevation) {
  const lob::shot<double> launch{lob::vec3<double>(0, 0, launch_height),
                                 lob::launch_velocity(launch_speed, lob::deg(elevation))};
  const auto flight = lob::fly(model, lob::medium<double>{}, launch);
  if (!flight) return {};
  const auto land = flight->landing(0.0);
  const auto top = flight->apex();
  if (!land || !top) return {};
  return {land->time, top->position.z(), lob::horizontal_distance(*land, launch, flight->air()), true};
}

// Farthest elevation by a fine scan (0.1 degree), then a golden-section refinement.
template <class Model>
double farthest_elevation(const Model& model) {
  double best = 0, best_range = -1;
  for (int i = 0; i <= 900; ++i) {
    const double e = 0.1 * i;
    const flight_summary s = summarise(model, e);
    if (s.ok && s.range > best_range) best_range = s.range, best = e;
  }
  double lo = best - 0.1, hi = best + 0.1;
  const double r = (std::sqrt(5.0) - 1) / 2;
  for (int i = 0; i < 60; ++i) {
    const double a = hi - r * (hi - lo), b = lo + r * (hi - lo);
    if (summarise(model, a).range > summarise(model, b).range) hi = b;
    else lo = a;
  }
  return (lo + hi) / 2;
}

// A hand-written SVG: one polyline per path, metres scaled to pixels.
template <class Model>
void draw_path(std::FILE* svg, const Model& model, double elevation, const char* colour) {
  const lob::shot<double> launch{lob::vec3<double>(0, 0, launch_height),
                                 lob::launch_velocity(launch_speed, lob::deg(elevation))};
  const auto flight = lob::fly(model, lob::medium<double>{}, launch);
  if (!flight) return;
  const auto land = flight->landing(0.0);
  if (!land) return;
  std::fprintf(svg, "<polyline fill=\"none\" stroke=\"%s\" stroke-width=\"1.5\" points=\"", colour);
  constexpr int points = 120;
  for (int i = 0; i <= points; ++i) {
    const auto s = flight->at(land->time * i / points);
    if (s) std::fprintf(svg, "%.2f,%.2f ", 40 + 14 * s->position.x(), 380 - 14 * s->position.z());
  }
  std::fprintf(svg, "\"/>\n");
}

}  // namespace

int main(int argc, char** argv) {
  const lob::vacuum<double> vacuum{};
  const auto foam = lob::linear_drag<double>::from_terminal_speed(ball_fall_speed);
  if (!foam) {
    std::printf("cannot build the drag model: %s\n", foam.error().message());
    return 1;
  }

  std::printf("Practice-ball machine: launch %.1f m/s from %.1f m, foam ball (terminal speed %.0f m/s, "
              "linear drag rate %.3f 1/s)\n\n",
              launch_speed, launch_height, ball_fall_speed, foam->rate);
  std::printf("%9s | %26s | %26s\n", "", "vacuum", "linear drag");
  std::printf("%9s | %8s %8s %8s | %8s %8s %8s\n", "elevation", "time s", "apex m", "range m",
              "time s", "apex m", "range m");
  const double best_vacuum = farthest_elevation(vacuum);
  const double best_drag = farthest_elevation(*foam);
  constexpr std::array<double, 9> elevations{10, 20, 30, 35, 40, 45, 50, 60, 70};
  for (const double e : elevations) {
    const flight_summary v = summarise(vacuum, e);
    const flight_summary d = summarise(*foam, e);
    std::printf("%5.0f deg | %8.3f %8.3f %8.3f | %8.3f %8.3f %8.3f\n", e, v.time, v.apex, v.range,
                d.time, d.apex, d.range);
  }
  const flight_summary bv = summarise(vacuum, best_vacuum);
  const flight_summary bd = summarise(*foam, best_drag);
  std::printf("\nfarthest: vacuum %.2f deg -> %.3f m;  linear drag %.2f deg -> %.3f m\n", best_vacuum,
              bv.range, best_drag, bd.range);
  std::printf("drag shortens the best throw by %.1f%% and lowers its elevation by %.1f deg\n",
              100 * (1 - bd.range / bv.range), best_vacuum - best_drag);

  const char* picture = argc > 1 ? argv[1] : "training_ground.svg";
  std::FILE* svg = std::fopen(picture, "w");
  if (!svg) {
    std::printf("cannot write %s\n", picture);
    return 1;
  }
  std::fprintf(svg, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"820\" height=\"400\">\n"
                    "<rect width=\"820\" height=\"400\" fill=\"white\"/>\n"
                    "<line x1=\"0\" y1=\"380\" x2=\"820\" y2=\"380\" stroke=\"#4a7\" stroke-width=\"2\"/>\n");
  for (const double e : {20.0, 35.0, 50.0, 70.0}) {
    draw_path(svg, vacuum, e, "#bbb");
    draw_path(svg, *foam, e, "#c33");
  }
  draw_path(svg, *foam, best_drag, "#22c");
  std::fprintf(svg, "<text x=\"50\" y=\"30\" font-family=\"sans-serif\" font-size=\"14\">grey: vacuum; "
                    "red: linear drag; blue: farthest with drag (%.1f deg)</text>\n</svg>\n", best_drag);
  std::fclose(svg);
  std::printf("paths drawn to %s\n", picture);
  return 0;
}
