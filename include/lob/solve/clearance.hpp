#pragma once
/// \file lob/solve/clearance.hpp
/// `aim_over()`: aim at a target so that the path clears an obstacle (a wall or net of
/// given top height at a given distance) on the way, and report by how much.

#include <optional>

#include "lob/solve/aim.hpp"

namespace lob {

/// A wall or net across the line of fire: its horizontal distance [m] from the launch
/// point (measured like the target's; it stands on the circle of that radius) and the
/// absolute height [m] of its top.
template <Real T>
struct obstacle {
  T distance{};
  T top_height{};
};

/// An aim past an obstacle: launch point and target [m], launch speed [m/s], obstacle.
template <Real T>
struct clearance_request {
  vec3<T> launch_point = vec3<T>::Zero();
  vec3<T> target = vec3<T>::Zero();
  T speed{};
  obstacle<T> wall{};
};

/// An aim solution that clears the obstacle, with `margin` [m]: the height of the path
/// above the obstacle's top where it passes the obstacle's distance.
template <Real T>
struct cleared_aim {
  aim_solution<T> aim{};
  T margin{};
};

/// The solutions of `aim_over()` that clear the obstacle: flat and/or lofted.
template <Real T>
struct clearance_solutions {
  std::optional<cleared_aim<T>> flat;
  std::optional<cleared_aim<T>> lofted;
  [[nodiscard]] int count() const noexcept { return (flat ? 1 : 0) + (lofted ? 1 : 0); }
};

namespace detail {

// Height of a solution's path [m] where it first reaches horizontal distance `d`.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<T> height_at_distance(const M& model, const medium<T>& air, const vec3<T>& launch,
                                           const vec3<T>& velocity, const T& d, const solve_options<T>& o) {
  const auto flight = fly(model, air, shot<T>{launch, velocity}, o.flight);
  if (!flight) return unexpected<error>(flight.error());
  const result<state<T>> s = flight->at_distance(d);
  if (!s) return unexpected<error>(s.error());
  return height(s->position, air);
}

}  // namespace detail

/// The aims at `req.speed` through `req.target` (see `aim()`) whose paths pass above the
/// obstacle, each with its margin. Errors: `invalid_argument` for bad input, an obstacle
/// at or behind the launcher (distance <= 0) or at or beyond the target; `out_of_reach`
/// when the target cannot be reached, when the obstacle is taller than any path at this
/// speed reaches at its distance (`detail_value()`: the highest reachable height there,
/// absolute), or when both aims pass below its top (`detail_value()`: the best margin,
/// negative).
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<clearance_solutions<T>> aim_over(const M& model, const medium<T>& air,
                                                      const clearance_request<T>& req,
                                                      const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<clearance_solutions<T>> {
    using std::sqrt;
    if (!is_finite(req.wall.distance))
      return fail(errc::invalid_argument, "obstacle distance must be finite", req.wall.distance);
    if (!is_finite(req.wall.top_height))
      return fail(errc::invalid_argument, "obstacle top height must be finite", req.wall.top_height);
    if (!(req.wall.distance > T(0)))
      return fail(errc::invalid_argument, "obstacle is behind the launcher or at it, distance",
                  req.wall.distance);
    const result<aim_solutions<T>> aims =
        aim(model, air, aim_request<T>{req.launch_point, req.target, req.speed}, o);
    if (!aims) return unexpected<error>(aims.error());
    const vec3<T> off = horizontal(vec3<T>(req.target - req.launch_point), air);
    const T target_distance = sqrt(T(off.squaredNorm()));
    if (!(req.wall.distance < target_distance))
      return fail(errc::invalid_argument, "obstacle is at or beyond the target, distance", req.wall.distance);

    clearance_solutions<T> out;
    T best = -std::numeric_limits<T>::max();
    for (int b = 0; b < 2; ++b) {
      const std::optional<aim_solution<T>>& s = b == 0 ? aims->flat : aims->lofted;
      if (!s) continue;
      const result<T> h =
          detail::height_at_distance(model, air, req.launch_point, s->velocity, req.wall.distance, o);
      if (!h) return unexpected<error>(h.error());
      const T margin = *h - req.wall.top_height;
      if (margin > best) best = margin;
      if (margin >= T(0)) (b == 0 ? out.flat : out.lofted) = cleared_aim<T>{*s, margin};
    }
    if (out.count() > 0) return out;

    // Neither clears: is the obstacle taller than every path at its distance? Highest
    // height there over the elevation, at the target's bearing (Brent's method).
    const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.reference);
    if (!frame) return unexpected<error>(frame.error());
    const T bearing = frame->azimuth_of(off);
    const T top = detail::half_pi<T>() * (T(1) - T(1) / T(1 << 20));
    const T low = -std::numeric_limits<T>::max() / T(16);
    auto neg_height = [&](const T& e) {
      const result<T> h =
          detail::height_at_distance(model, air, req.launch_point,
                                     vec3<T>(req.speed * frame->direction(e, bearing)), req.wall.distance, o);
      return h ? T(-*h) : T(-low * (T(4) + e));
    };
    const result<std::pair<T, T>> m =
        detail::brent_min(neg_height, T(-top), top, o.max_iterations, std::numeric_limits<T>::digits / 2,
                          "obstacle: highest path search did not converge");
    if (!m) return unexpected<error>(m.error());
    const T highest = -m->second;
    if (highest < req.wall.top_height) {
      error e(errc::out_of_reach, "obstacle is taller than any path at this speed reaches there; highest",
              static_cast<long double>(highest));
      e.with_detail_value(static_cast<long double>(highest));
      return unexpected<error>(e);
    }
    error e(errc::out_of_reach, "both aims pass below the obstacle's top; best margin [m]",
            static_cast<long double>(best));
    e.with_detail_value(static_cast<long double>(best));
    return unexpected<error>(e);
  });
}

}  // namespace lob
