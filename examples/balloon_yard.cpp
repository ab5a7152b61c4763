// Balloon yard: a made-up party game in a 60 Hz engine. 400 helper bots stand around a yard
// and lob water balloons at 400 paper boats drifting across a pond; the engine steps every
// balloon with semi-implicit Euler in float and damps velocity by v *= 1/(1 + dt d). Each
// frame a bot needs a launch that its engine will really fly onto its boat, and a preview
// arc of where that balloon will be, step by step.
//
// lob's stepped aim solves it on the engine's own step, so the balloon flown by the engine
// meets the boat; lob's continuous aim (linear drag of the same rate) is shown beside it,
// with the miss the engine makes of it. Run: balloon_yard
//
// Thrown bodies can hurt: this is a game. For real launchers keep people out of the
// reachable zone and follow local codes and licensed practice.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <random>
#include <algorithm>
#include <vector>

#include "lob/lob.hpp"

namespace {

struct bot {
  lob::vec3<float> hand;    // launch point [m]
  lob::vec3<float> boat;    // the boat now [m]
  lob::vec3<float> drift;   // the boat's velocity [m/s]
};

// The engine's loop for one balloon, to check where it really goes (what the game runs).
lob::vec3<float> engine_position(const lob::engine_step<float>& step, const lob::vec3<float>& from,
                                 const lob::vec3<float>& velocity, float t) {
  const lob::medium<float> air{};
  const auto flight = lob::fly(step, air, lob::shot<float>{from, velocity});
  const auto at = flight ? flight->at(t) : lob::result<lob::state<float>>(lob::fail(lob::errc::invalid_argument, ""));
  return at ? at->position : lob::vec3<float>::Zero();
}

}  // namespace

int main() {
  lob::engine_step<float> step;  // 60 Hz, velocity first, gravity before damping
  step.rule = lob::damping_rule::rational;
  step.damping = 0.15f;  // [1/s]
  const lob::medium<float> air{};

  std::mt19937 rng(7);
  std::uniform_real_distribution<float> u(0, 1);
  std::vector<bot> bots(400);
  for (bot& b : bots) {
    const float a = 6.2832f * u(rng);
    b.hand = lob::vec3<float>(14 * std::cos(a), 14 * std::sin(a), 1.1f);
    b.boat = lob::vec3<float>(4 * (u(rng) - 0.5f), 4 * (u(rng) - 0.5f), 0.0f);
    b.drift = lob::vec3<float>(0.6f * (u(rng) - 0.5f), 0.6f * (u(rng) - 0.5f), 0.0f);
  }

  // One frame's aims: every bot throws at 14.5 m/s, flat if it can.
  const auto start = std::chrono::steady_clock::now();
  std::vector<lob::stepped_aims<float>> aims(bots.size());
  int missing = 0;
  for (std::size_t i = 0; i < bots.size(); ++i) {
    const auto s = lob::aim(step, air, lob::stepped_aim_request<float>{bots[i].hand, bots[i].boat, 14.5f, bots[i].drift});
    if (s) aims[i] = *s;
    else ++missing;
  }
  const double frame_us =
      std::chrono::duration<double, std::micro>(std::chrono::steady_clock::now() - start).count();

  // Check them the way the game does: fly each launch with the engine, compare with the boat.
  float worst_stepped = 0, worst_continuous = 0;
  for (std::size_t i = 0; i < bots.size(); ++i) {
    if (!aims[i].flat) continue;
    const auto& s = aims[i].flat->solution;
    const lob::vec3<float> boat_then = bots[i].boat + bots[i].drift * s.time_of_flight;
    worst_stepped = std::max(worst_stepped, (engine_position(step, bots[i].hand, s.velocity, s.time_of_flight) - boat_then).norm());
  }
  // The continuous aim, for fixed boats (the boat where it is now).
  for (std::size_t i = 0; i < bots.size(); ++i) {
    const auto c = lob::aim(lob::linear_drag<float>{step.damping}, air,
                            lob::aim_request<float>{bots[i].hand, bots[i].boat, 14.5f});
    if (!c || !c->flat) continue;
    worst_continuous = std::max(
        worst_continuous,
        (engine_position(step, bots[i].hand, c->flat->velocity, c->flat->time_of_flight) - bots[i].boat).norm());
  }

  std::printf("balloon yard: %zu bots, 60 Hz float engine, rational damping %.2f /s\n", bots.size(), double(step.damping));
  std::printf("  stepped aims for one frame: %.0f us (%.2f us a bot), %d out of reach\n", frame_us,
              frame_us / double(bots.size()), missing);
  std::printf("  flown by the engine, stepped aims meet their moving boats within %.2g m\n", double(worst_stepped));
  std::printf("  the continuous aim (linear drag 0.15 /s), flown by the engine, misses fixed boats by up to %.2f m\n",
              double(worst_continuous));

  // A preview arc for bot 0: the engine's own positions every 6 steps (0.1 s), in closed form.
  if (aims[0].flat) {
    const auto flight = lob::fly(step, air, lob::shot<float>{bots[0].hand, aims[0].flat->solution.velocity});
    if (!flight) return 1;
    std::printf("  preview of bot 0 (step: x y z):");
    for (std::int64_t n = 0; n <= aims[0].flat->step; n += 6) {
      const auto p = flight->at_step(n);
      if (p) std::printf(" %lld: %.2f %.2f %.2f;", static_cast<long long>(n), double(p->position.x()),
                         double(p->position.y()), double(p->position.z()));
    }
    std::printf("\n");
  }
  return worst_stepped < 0.01f ? 0 : 1;
}
