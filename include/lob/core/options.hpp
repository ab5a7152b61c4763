#pragma once
/// \file lob/core/options.hpp
/// `flight_options`: how a numerically integrated flight is computed. Closed-form models
/// ignore everything here but `max_time`.

#include <cstdint>

#include "lob/core/real.hpp"

namespace lob {

/// The stepping method of an integrated flight.
enum class stepper {
  adaptive,             ///< Dormand–Prince 5(4), error-controlled, dense output
  rk4,                  ///< classical Runge–Kutta 4, fixed step, bit-for-bit reproducible
  semi_implicit_euler,  ///< velocity first, then position, fixed step (as engines step)
};

/// Settings of an integrated flight. Every loop is capped: reaching `max_steps` is
/// `errc::step_limit`, passing `max_time` without the event is `errc::time_limit`.
template <Real T>
struct flight_options {
  stepper method = stepper::adaptive;
  /// Adaptive only, in [1e-15, 1e-2]. Each Dormand–Prince step keeps the error estimate of
  /// every position [m] and velocity [m/s] component below
  /// absolute_tolerance + relative_tolerance * max(|start|, |end|) of that component
  /// (positions relative to the launch point); measured result: landing time, range and
  /// apex within relative_tolerance of a high-precision reference when both are equal.
  T relative_tolerance = T(1) / T(1000000000);
  T absolute_tolerance = T(1) / T(1000000000);  ///< adaptive only, > 0; see relative_tolerance
  T initial_step = T(0);                        ///< [s]; 0 picks one automatically
  T fixed_step = T(1) / T(60);                  ///< [s]; fixed-step methods only
  std::int64_t max_steps = 1000000;             ///< per query
  T max_time = T(100000);                       ///< [s] of flight time searched for an event
  /// Let models with a special method use it (quadratic drag in still air: the hodograph
  /// quadrature) for apex, crossings, landing and range; false forces the integration.
  bool use_fast_paths = true;
};

}  // namespace lob
