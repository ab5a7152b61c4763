#pragma once
/// \file lob/core/flight_types.hpp
/// The aggregates a flight is described by: `shot` (launch), `medium` (gravity, wind),
/// `state` (a point of the flight), `side` (rising or falling branch).

#include "lob/core/real.hpp"
#include "lob/core/result.hpp"
#include "lob/core/units.hpp"
#include "lob/core/vec.hpp"

namespace lob {

/// The launch: position [m] and velocity [m/s] at time 0, in the world frame.
template <Real T>
struct shot {
  vec3<T> position = vec3<T>::Zero();
  vec3<T> velocity = vec3<T>::Zero();
};

/// What the body flies through: gravity [m/s^2] and a constant wind [m/s]. "Up" is minus
/// the direction of gravity; engines with y up pass gravity (0, -g, 0).
template <Real T>
struct medium {
  vec3<T> gravity{T(0), T(0), -standard_gravity<T>()};
  vec3<T> wind = vec3<T>::Zero();
};

/// A point of a flight: time since launch [s], position [m], velocity [m/s].
template <Real T>
struct state {
  T time{};
  vec3<T> position = vec3<T>::Zero();
  vec3<T> velocity = vec3<T>::Zero();
};

/// Which branch of the path a height is crossed on.
enum class side { rising, falling };

/// The unit "up" vector of a medium (minus gravity's direction); gravity must be non-zero.
template <Real T>
[[nodiscard]] vec3<T> up(const medium<T>& air) {
  using std::sqrt;
  const T g = sqrt(T(air.gravity.squaredNorm()));
  return vec3<T>(-air.gravity / g);
}

/// Height of a point: its coordinate along "up", measured from the world origin [m].
template <Real T>
[[nodiscard]] T height(const vec3<T>& position, const medium<T>& air) {
  return T(up(air).dot(position));
}

/// Speed of a state [m/s], without overflow of the squares (finite for a finite velocity).
template <Real T>
[[nodiscard]] T speed(const state<T>& s) {
  return scaled_norm(s.velocity);
}

/// The horizontal part of a vector (its component along "up" removed).
template <Real T>
[[nodiscard]] vec3<T> horizontal(const vec3<T>& v, const medium<T>& air) {
  const vec3<T> u = up(air);
  return vec3<T>(v - T(u.dot(v)) * u);
}

/// Angle of the path below the horizon [rad]: positive while descending, in [-pi/2, pi/2].
/// At landing this is the impact angle.
template <Real T>
[[nodiscard]] T path_angle_below_horizon(const state<T>& s, const medium<T>& air) {
  using std::atan2;
  using std::sqrt;
  const T vertical = up(air).dot(s.velocity);
  const T level = scaled_norm(horizontal(s.velocity, air));
  return atan2(-vertical, level);
}

/// Horizontal distance of a state from the launch point [m]: the range at landing.
template <Real T>
[[nodiscard]] T horizontal_distance(const state<T>& s, const shot<T>& launch, const medium<T>& air) {
  return scaled_norm(horizontal(vec3<T>(s.position - launch.position), air));
}

namespace detail {
/// The checks every flight makes of its air and launch, once, when it is built:
/// `invalid_argument` for a non-finite gravity, wind, launch position or velocity, or when
/// a squared length that flights form (gravity, wind, launch velocity, launch velocity
/// relative to the air) overflows T, so that every query may use |v|^2. The message of
/// an overflow gives the length itself.
template <Real T>
[[nodiscard]] status check_air_and_launch(const medium<T>& air, const shot<T>& launch) {
  if (!is_finite(air.gravity)) return fail(errc::invalid_argument, "gravity must be finite");
  if (!is_finite(air.wind)) return fail(errc::invalid_argument, "wind must be finite");
  if (!is_finite(launch.position)) return fail(errc::invalid_argument, "launch position must be finite");
  if (!is_finite(launch.velocity)) return fail(errc::invalid_argument, "launch velocity must be finite");
  if (!square_is_finite(air.gravity))
    return fail(errc::invalid_argument, "gravity is too large: its square overflows T; |g|",
                scaled_norm(air.gravity));
  if (!square_is_finite(air.wind))
    return fail(errc::invalid_argument, "wind is too fast: its square overflows T; |wind|",
                scaled_norm(air.wind));
  if (!square_is_finite(launch.velocity))
    return fail(errc::invalid_argument, "launch speed is too large: its square overflows T; speed",
                scaled_norm(launch.velocity));
  const vec3<T> air_velocity = launch.velocity - air.wind;
  if (!square_is_finite(air_velocity))
    return fail(errc::invalid_argument, "launch air speed is too large: its square overflows T; air speed",
                scaled_norm(air_velocity));
  return {};
}
}  // namespace detail

/// A launch velocity from speed [m/s], elevation above the horizon [rad] and azimuth [rad]
/// measured from +x towards +y, for the default z-up medium.
template <Real T>
[[nodiscard]] vec3<T> launch_velocity(const T& speed, const T& elevation, const T& azimuth = T(0)) {
  using std::cos;
  using std::sin;
  return vec3<T>(speed * cos(elevation) * cos(azimuth), speed * cos(elevation) * sin(azimuth),
                 speed * sin(elevation));
}

}  // namespace lob
