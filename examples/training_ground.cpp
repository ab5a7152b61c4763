// Demo: a practice-ball machine on a training ground.
//
// The machine stands on a low platform and throws light foam training balls (our own
// invented scenario; the numbers are made up for the demo). For several elevations it
// prints flight time, apex height and range in vacuum, with linear and with quadratic
// drag, marks the farthest elevation of each, aims at a basket, and draws the paths into
// an SVG picture.
//
// Usage: training_ground [picture.svg]
#include <array>
#include <cmath>
#include <cstdio>

#include <lob/lob.hpp>

namespace {

// The scenario (invented): launch 1.2 m above the grass at 22 m/s; the foam ball falls at
// no more than 14 m/s, which fixes its drag for either model.
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

// The farthest-landing elevation from lob's solver (closed form for vacuum and linear
// drag, Brent's method on the integrated flight for quadratic drag).
template <class Model>
double farthest_elevation(const Model& model) {
  const lob::farthest_request<double> ask{lob::vec3<double>(0, 0, launch_height), launch_speed, 0.0, 0.0};
  const auto best = lob::farthest_elevation(model, lob::medium<double>{}, ask);
  return best ? lob::to_degrees(best->elevation) : 0.0;
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
  // The same fall speed read two ways: drag growing with speed (linear) or with its
  // square (quadratic, what a ball this size really feels at these speeds).
  const auto linear = lob::linear_drag<double>::from_terminal_speed(ball_fall_speed);
  const auto quadratic = lob::quadratic_drag<double>::from_terminal_speed(ball_fall_speed);
  if (!linear || !quadratic) {
    std::printf("cannot build the drag models\n");
    return 1;
  }

  std::printf("Practice-ball machine: launch %.1f m/s from %.1f m; foam ball with terminal speed %.0f m/s\n"
              "(linear drag rate %.3f 1/s, or quadratic drag coefficient %.4f 1/m)\n\n",
              launch_speed, launch_height, ball_fall_speed, linear->rate, quadratic->coefficient);
  std::printf("%9s | %26s | %26s | %26s\n", "", "vacuum", "linear drag", "quadratic drag");
  std::printf("%9s |", "elevation");
  for (int i = 0; i < 3; ++i) std::printf(" %8s %8s %8s |", "time s", "apex m", "range m");
  std::printf("\n");
  const double best[3] = {farthest_elevation(vacuum), farthest_elevation(*linear),
                          farthest_elevation(*quadratic)};
  constexpr std::array<double, 9> elevations{10, 20, 30, 35, 40, 45, 50, 60, 70};
  for (const double e : elevations) {
    const flight_summary f[3] = {summarise(vacuum, e), summarise(*linear, e), summarise(*quadratic, e)};
    std::printf("%5.0f deg |", e);
    for (const flight_summary& s : f) std::printf(" %8.3f %8.3f %8.3f |", s.time, s.apex, s.range);
    std::printf("\n");
  }
  const flight_summary far[3] = {summarise(vacuum, best[0]), summarise(*linear, best[1]),
                                 summarise(*quadratic, best[2])};
  std::printf("farthest  |");
  for (int i = 0; i < 3; ++i) std::printf(" %8.2f deg -> %8.3f m |", best[i], far[i].range);
  std::printf("\n\nWith quadratic drag the best throw is %.1f%% shorter than in vacuum, at %.1f deg "
              "instead of %.1f deg.\n", 100 * (1 - far[2].range / far[0].range), best[2], best[0]);

  // Aim: drop the ball into a collection basket 14 m away on the grass.
  const lob::aim_request<double> basket{lob::vec3<double>(0, 0, launch_height), lob::vec3<double>(14, 0, 0),
                                        launch_speed};
  const auto shots = lob::aim(*quadratic, lob::medium<double>{}, basket);
  if (shots && shots->flat && shots->lofted) {
    std::printf("To hit the basket at 14 m (quadratic drag): flat %.2f deg (%.2f s) or lofted %.2f deg "
                "(%.2f s).\n", lob::to_degrees(shots->flat->elevation), shots->flat->time_of_flight,
                lob::to_degrees(shots->lofted->elevation), shots->lofted->time_of_flight);
  }
  std::printf(
      "Keep people outside %.1f m of the machine while it runs (the farthest landing in vacuum,\n"
      "wider than any of the drag models reaches in still air); follow your site's own safety rules.\n",
      far[0].range);

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
    draw_path(svg, *linear, e, "#e90");
    draw_path(svg, *quadratic, e, "#c33");
  }
  draw_path(svg, *quadratic, best[2], "#22c");
  std::fprintf(svg, "<text x=\"50\" y=\"30\" font-family=\"sans-serif\" font-size=\"14\">grey: vacuum; "
                    "orange: linear drag; red: quadratic drag; blue: farthest with quadratic drag "
                    "(%.1f deg)</text>\n</svg>\n", best[2]);
  std::fclose(svg);
  std::printf("Paths drawn to %s\n", picture);
  return 0;
}
