// The landing as a user would find it with Boost.Odeint, the peer of several benchmarks:
// runge_kutta_dopri5 with dense output at rtol = atol = tolerance, stepped until the body has
// landed, then TOMS 748 on the dense output (calc_state) for the zero of the height between
// the last two steps.
#pragma once

#include <cstddef>
#include <cstdint>
#include <limits>
#include <utility>

#include <boost/math/tools/toms748_solve.hpp>
#include <boost/numeric/odeint.hpp>

namespace lob_bench {

template <class Real>
struct odeint_setup {
  Real tolerance;      // rtol = atol
  Real first_step;     // [s] odeint's first trial step
  int max_steps;       // cap on the steps taken
  std::size_t height;  // index of the height in the state
  boost::math::tools::eps_tolerance<Real> root_tolerance;
  std::uintmax_t root_iterations;  // TOMS 748 budget
};

template <class State, class Real>
struct odeint_touchdown {
  Real time;    // [s] NaN if the body had not landed after max_steps
  State state;  // at time
};

// Flies rhs(x, dxdt, t) from start at t = 0 until landed(state) holds after a step.
template <class State, class Real, class System, class Landed>
odeint_touchdown<State, Real> odeint_landing(System rhs, const State& start, const odeint_setup<Real>& setup,
                                             Landed landed) {
  namespace odeint = boost::numeric::odeint;
  auto stepper =
      odeint::make_dense_output(setup.tolerance, setup.tolerance, odeint::runge_kutta_dopri5<State, Real>());
  stepper.initialize(start, Real(0), setup.first_step);
  int steps = 0;
  while (steps < setup.max_steps) {
    stepper.do_step(rhs);
    ++steps;
    if (landed(stepper.current_state())) break;
  }
  State x = stepper.current_state();  // sized as the state is (a std::vector has no fixed size)
  if (!landed(x)) return {std::numeric_limits<Real>::quiet_NaN(), x};
  const auto height = [&](Real t) {
    stepper.calc_state(t, x);
    return x[setup.height];
  };
  std::uintmax_t iterations = setup.root_iterations;
  const std::pair<Real, Real> r = boost::math::tools::toms748_solve(
      height, stepper.previous_time(), stepper.current_time(), setup.root_tolerance, iterations);
  const Real t = (r.first + r.second) / 2;
  stepper.calc_state(t, x);
  return {t, x};
}

}  // namespace lob_bench
