#pragma once
/// \file lob/solve/reach_zone.hpp
/// The reachable zone of a launcher at a given speed: `reach_boundary()` (the boundary of
/// all points reachable in the vertical plane of an azimuth) and `reach_footprint()` (the
/// farthest landing on a ground plane in every azimuth, under wind), so that a user can
/// mark the zone where nobody may stand. Keep people out of the whole zone; this library
/// is not certified for safety-critical use.

#include <cstddef>
#include <span>

#include "lob/solve/farthest.hpp"

namespace lob {

/// A reach question: launch point [m], launch speed [m/s], azimuth [rad] (see
/// `aim_frame`; unused by `reach_footprint`) and the absolute height [m] of the ground
/// plane the zone ends on.
template <Real T>
struct reach_request {
  vec3<T> launch_point = vec3<T>::Zero();
  T speed{};
  T azimuth{};
  T floor_height{};
};

/// A boundary point: horizontal distance [m] from the launch point and the highest
/// absolute height [m] any flight at that speed and azimuth reaches at that distance.
template <Real T>
struct boundary_point {
  T distance{};
  T height{};
};

/// A footprint point: launch azimuth [rad], the elevation [rad] that lands farthest on
/// the ground plane for it, that landing point [m] and its distance [m] from the launch.
template <Real T>
struct footprint_point {
  T azimuth{};
  T elevation{};
  vec3<T> landing = vec3<T>::Zero();
  T range{};
};

namespace detail {

template <Real T>
[[nodiscard]] status check_reach(const reach_request<T>& req) {
  if (const status ok = check_speed(req.speed); !ok) return ok;
  if (!is_finite(req.launch_point)) return fail(errc::invalid_argument, "launch point must be finite");
  if (!is_finite(req.azimuth)) return fail(errc::invalid_argument, "azimuth must be finite", req.azimuth);
  if (!is_finite(req.floor_height))
    return fail(errc::invalid_argument, "floor height must be finite", req.floor_height);
  return {};
}

}  // namespace detail

/// Fills `out` with the boundary of the points reachable at `req.speed` by flights
/// launched at `req.azimuth`: `out.size()` points at distances evenly spaced from 0 (the
/// top of a vertical shot) to the farthest landing on the floor plane, each the highest
/// height reached there over every elevation (Brent's method on the height at that
/// distance, `at_distance`; the height is a maximum, so it is found to nearly all digits
/// of T though the elevation is found to half: 1e-9 relative and better in double).
/// Under a crosswind the flights leave the plane; distances are then horizontal distances
/// from the launch point along each path. Returns the number of points written.
/// Errors: `invalid_argument` for bad input or fewer than 2 points; `out_of_reach` if
/// the floor is above every reachable point.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<std::size_t> reach_boundary(const M& model, const medium<T>& air,
                                                 const reach_request<T>& req,
                                                 std::span<boundary_point<T>> out,
                                                 const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<std::size_t> {
    if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_reach(req); !ok) return unexpected<error>(ok.error());
    if (out.size() < 2)
      return fail(errc::invalid_argument, "the boundary needs at least 2 points, got", out.size());
    const result<aim_frame<T>> frame = aim_frame<T>::make(air, o.reference);
    if (!frame) return unexpected<error>(frame.error());
    const result<farthest_shot<T>> far = farthest_elevation(
        model, air, farthest_request<T>{req.launch_point, req.speed, req.azimuth, req.floor_height}, o);
    if (!far) return unexpected<error>(far.error());
    const auto vertical =
        fly(model, air, shot<T>{req.launch_point, vec3<T>(req.speed * frame->up)}, o.flight);
    if (!vertical) return unexpected<error>(vertical.error());
    const result<state<T>> apex = vertical->apex();
    if (!apex) return unexpected<error>(apex.error());
    const T top = detail::half_pi<T>() * (T(1) - T(1) / T(1 << 20));
    const T low = std::numeric_limits<T>::max() / T(16);
    const std::size_t n = out.size();
    out[0] = boundary_point<T>{T(0), height(apex->position, air)};
    out[n - 1] = boundary_point<T>{far->range, req.floor_height};
    for (std::size_t i = 1; i + 1 < n; ++i) {
      const T d = far->range * T(static_cast<long long>(i)) / T(static_cast<long long>(n - 1));
      auto neg_height = [&](const T& e) {
        const auto f =
            fly(model, air, shot<T>{req.launch_point, vec3<T>(req.speed * frame->direction(e, req.azimuth))},
                o.flight);
        if (!f) return T(low * (T(4) + e));
        const result<state<T>> s = f->at_distance(d);
        return s ? T(-height(s->position, air)) : T(low * (T(4) + e));
      };
      const result<std::pair<T, T>> m =
          detail::brent_min(neg_height, T(0), top, o.max_iterations, std::numeric_limits<T>::digits / 2,
                            "reach boundary: highest-point search did not converge");
      if (!m) return unexpected<error>(m.error());
      out[i] = boundary_point<T>{d, T(-m->second)};
    }
    return n;
  });
}

/// Fills `out` with the farthest landing on the floor plane for launch azimuths evenly
/// spaced over a full turn (azimuth 2 pi i / n), wind included: the outline of the ground
/// zone a shot at `req.speed` can reach (`req.azimuth` is ignored). Returns the number of
/// points written. Errors as for `farthest_elevation()`, and `invalid_argument` for an
/// empty span.
template <DragModel M, Real T = scalar_of<M>>
[[nodiscard]] result<std::size_t> reach_footprint(const M& model, const medium<T>& air,
                                                  const reach_request<T>& req,
                                                  std::span<footprint_point<T>> out,
                                                  const solve_options<T>& opts = {}) {
  return detail::within_budget(opts, [&](const solve_options<T>& o) -> result<std::size_t> {
    if (const status ok = check_model(model); !ok) return unexpected<error>(ok.error());
    if (const status ok = detail::check_reach(req); !ok) return unexpected<error>(ok.error());
    if (out.empty()) return fail(errc::invalid_argument, "the footprint needs at least 1 point");
    const std::size_t n = out.size();
    for (std::size_t i = 0; i < n; ++i) {
      const T az = T(2) * detail::pi<T>() * T(static_cast<long long>(i)) / T(static_cast<long long>(n));
      const result<farthest_shot<T>> f = farthest_elevation(
          model, air, farthest_request<T>{req.launch_point, req.speed, az, req.floor_height}, o);
      if (!f) return unexpected<error>(f.error());
      out[i] = footprint_point<T>{az, f->elevation, f->landing.position, f->range};
    }
    return n;
  });
}

}  // namespace lob
