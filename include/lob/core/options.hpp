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

/// A number of integration steps that several flights draw from: the total budget of one
/// solver call (`solve_options::max_total_steps`). Each step of a query of a flight whose
/// options point to a pool takes one from it (a hodograph-path query takes
/// `step_pool::fast_query_cost` at c v0^2/g <= 1, more as its graded quadrature panels
/// grow with c v0^2/g: `detail::hodograph_query_cost`); a query that finds it empty fails with `step_limit` and sets
/// `exhausted`. A solver call given a pool (in `solve_options::flight`) that ends with it
/// exhausted is `step_limit`, whatever its search concluded. Not synchronised: one pool
/// per thread.
struct step_pool {
  std::int64_t left = 0;
  bool exhausted = false;
  /// Steps charged for one query on the hodograph path at c v0^2/g <= 1 (about its cost).
  static constexpr std::int64_t fast_query_cost = 32;
  /// Takes `n` steps; false (and `exhausted`) when fewer are left.
  [[nodiscard]] bool draw(std::int64_t n = 1) noexcept {
    if (left < n) {
      exhausted = true;
      left = 0;
      return false;
    }
    left -= n;
    return true;
  }
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
  /// Where set, every query also draws its steps from this pool (see `step_pool`; the
  /// solvers set it). Not owned.
  step_pool* shared_steps = nullptr;
};

}  // namespace lob
