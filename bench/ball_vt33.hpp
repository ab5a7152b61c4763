// The ball of the quadratic-drag range benchmarks (hodograph_bench.cpp, integrate_bench.cpp):
// terminal speed 33 m/s (c = g / 33^2, g = 9.80665), launched at 40 m/s and 35 degrees over
// level ground in still air, and its range from the mpmath references.
#pragma once

#include <cmath>

namespace lob_bench {

// Read through volatile so that the optimiser cannot fold the computation.
inline volatile double ball_speed = 40.0;           // [m/s]
inline volatile double ball_elevation_deg = 35.0;   // [degree]
inline volatile double ball_terminal_speed = 33.0;  // [m/s]

// Range [m] of row ball_vt33 of tests/data/integrate_quadratic_reference.csv
// (scripts/integrate_reference.py: mpmath odefun at 40 digits, checked at 50); the same digits
// as scripts/hodograph_reference.py's Taylor-series integration at 30 and 36 digits.
inline constexpr long double ball_reference_range = 82.10497222416477104478283L;

template <class T>
double ball_range_rel_err(T range) {
  return static_cast<double>(std::fabs(static_cast<long double>(range) - ball_reference_range) /
                             ball_reference_range);
}

}  // namespace lob_bench
