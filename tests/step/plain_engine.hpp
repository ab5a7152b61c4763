#pragma once
// The engine loop of the step tests, written without lob's stepping code: x, v as plain
// arrays, one component at a time, in the order engine_step documents.
#include <cmath>
#include <vector>

#include "lob/step/engine_step.hpp"

namespace step_test {
using namespace lob;

// The engine loop, written without lob: x, v as plain arrays, one component at a time.
template <class T, class R>
struct plain_engine {
  R x[3], v[3];
  R g[3];
  R dt, f, c;
  bool velocity_first, gravity_before;

  void step() {
    using std::sqrt;
    R a[3] = {g[0], g[1], g[2]};
    if (c != R(0)) {
      const R s = sqrt(R(R(R(v[0] * v[0]) + R(v[1] * v[1])) + R(v[2] * v[2])));
      const R cs = R(c * s);
      for (int i = 0; i < 3; ++i) a[i] = R(g[i] - R(cs * v[i]));
    }
    if (!velocity_first)
      for (int i = 0; i < 3; ++i) x[i] = R(x[i] + R(dt * v[i]));
    for (int i = 0; i < 3; ++i) v[i] = gravity_before ? R(R(v[i] + R(dt * a[i])) * f) : R(R(v[i] * f) + R(dt * a[i]));
    if (velocity_first)
      for (int i = 0; i < 3; ++i) x[i] = R(x[i] + R(dt * v[i]));
  }
};

template <class R, class T>
plain_engine<T, R> engine_of(const engine_step<T>& rule, const medium<T>& air, const shot<T>& launch) {
  plain_engine<T, R> e;
  for (int i = 0; i < 3; ++i) {
    e.x[i] = R(launch.position[i]);
    e.v[i] = R(launch.velocity[i]);
    e.g[i] = R(air.gravity[i]);
  }
  e.dt = R(rule.dt);
  e.f = R(rule.factor());  // the factor as the engine rounds it: exact in R
  e.c = R(rule.quadratic);
  e.velocity_first = rule.order == euler_order::velocity_first;
  e.gravity_before = rule.gravity == gravity_timing::before_damping;
  return e;
}

template <class T>
std::vector<engine_step<T>> every_rule(T dt, T d, T c) {
  std::vector<engine_step<T>> out;
  for (euler_order o : {euler_order::velocity_first, euler_order::position_first})
    for (damping_rule r : {damping_rule::power, damping_rule::rational, damping_rule::linear, damping_rule::factor})
      for (gravity_timing g : {gravity_timing::before_damping, gravity_timing::after_damping}) {
        engine_step<T> s;
        s.dt = dt;
        s.order = o;
        s.rule = r;
        s.damping = r == damping_rule::factor ? T(T(1) - d * dt) : (r == damping_rule::power ? T(d / (T(1) + d)) : d);
        s.gravity = g;
        s.quadratic = c;
        out.push_back(s);
      }
  return out;
}

}  // namespace step_test
