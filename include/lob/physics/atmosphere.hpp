#pragma once
/// \file lob/physics/atmosphere.hpp
/// The U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562; identical to ISO 2533:1975 up to
/// 32 km) from -5 km to 84.852 km geopotential altitude: temperature, pressure, density,
/// speed of sound and viscosity, optionally on a hot or cold day (a temperature offset),
/// conversions between geometric and geopotential altitude, gravity versus altitude, and
/// the air at a site from its altitude, temperature and humidity.

#include <limits>
#include <optional>

#include "lob/core/checks.hpp"
#include "lob/core/units.hpp"
#include "lob/physics/air.hpp"

namespace lob {

/// The standard atmosphere at one geopotential altitude.
template <Real T>
struct atmosphere_state {
  T geopotential_altitude{};  ///< H [m']
  T temperature{};            ///< [K]; the molecular-scale temperature (see standard_atmosphere)
  T pressure{};               ///< [Pa]
  T density{};                ///< [kg/m^3]
  T speed_of_sound{};         ///< [m/s]
  T dynamic_viscosity{};      ///< [Pa s], Sutherland's law
};

namespace detail {
// The seven layers of the 1976 standard below 84.852 km' (its Table 4): base geopotential
// altitude [m'] and molecular-scale temperature gradient [K/km'] (integers, exact).
inline constexpr int atmosphere_layer_count = 7;
inline constexpr int atmosphere_base_height[atmosphere_layer_count + 1] = {0,     11000, 20000, 32000,
                                                                          47000, 51000, 71000, 84852};
inline constexpr int atmosphere_lapse_tenths[atmosphere_layer_count] = {-65, 0, 10, 28, 0, -28, -20};

// Earth radius r0 of the 1976 standard for the geopotential conversion, 6356766 m.
template <Real T>
[[nodiscard]] T earth_radius() {
  return T(6356766);
}
}  // namespace detail

/// Lowest and highest geopotential altitude [m'] the standard atmosphere here covers.
template <Real T>
[[nodiscard]] T atmosphere_min_altitude() {
  return T(-5000);
}
template <Real T>
[[nodiscard]] T atmosphere_max_altitude() {
  return T(84852);
}

/// Geopotential altitude H [m'] of a geometric altitude z [m]: H = r0 z / (r0 + z),
/// r0 = 6356766 m (U.S. Standard Atmosphere 1976, eq. 18). z must exceed -r0 / 2.
template <Real T>
[[nodiscard]] result<T> geopotential_altitude(const T& geometric) {
  const T r0 = detail::earth_radius<T>();
  if (!is_finite(geometric) || !(geometric > -r0 / 2))
    return fail(errc::invalid_argument, "geometric altitude must be finite and > -r0/2 [m]", geometric);
  // r0 / (r0/z + 1) above r0, where r0 z would overflow for z near the top of T's range.
  if (geometric > r0) return T(r0 / (r0 / geometric + T(1)));
  return T(r0 * geometric / (r0 + geometric));
}

/// Geometric altitude z [m] of a geopotential altitude H [m']: z = r0 H / (r0 - H).
/// H must lie below r0 / 2.
template <Real T>
[[nodiscard]] result<T> geometric_altitude(const T& geopotential) {
  const T r0 = detail::earth_radius<T>();
  if (!is_finite(geopotential) || !(geopotential < r0 / 2) || !(geopotential > -r0))
    return fail(errc::invalid_argument, "geopotential altitude must be finite and in (-r0, r0/2) [m']",
                geopotential);
  return T(r0 * geopotential / (r0 - geopotential));
}

/// Acceleration of gravity [m/s^2] at geometric altitude z [m]: g0 (r0 / (r0 + z))^2, the
/// inverse-square law of the 1976 standard (eq. 17), g0 = 9.80665 m/s^2. Errors:
/// `invalid_argument` for z not finite or <= -r0/2, or so high that g underflows T.
template <Real T>
[[nodiscard]] result<T> gravity_at_altitude(const T& geometric) {
  const T r0 = detail::earth_radius<T>();
  if (!is_finite(geometric) || !(geometric > -r0 / 2))
    return fail(errc::invalid_argument, "geometric altitude must be finite and > -r0/2 [m]", geometric);
  const T ratio = r0 / (r0 + geometric);
  const T g = standard_gravity<T>() * ratio * ratio;
  // Far enough out (about 1e150 m in double) the square underflows: an error, not g = 0.
  if (!(g >= std::numeric_limits<T>::min()))
    return fail(errc::invalid_argument, "gravity underflows T at geometric altitude [m]", geometric);
  return g;
}

/// The U.S. Standard Atmosphere 1976 at geopotential altitude `altitude` [m'], in
/// [-5000, 84852], by the standard's own layer formulas: in each layer the molecular-scale
/// temperature is linear in H, T = Tb + L (H - Hb), and the pressure follows hydrostatic
/// balance, P = Pb (Tb / T)^(g0 M0 / (R* L)) or, where L = 0, P = Pb exp(-g0 M0 (H - Hb) /
/// (R* Tb)); base pressures chain from 101325 Pa at H = 0 (so the layer boundaries agree
/// with the standard's Table 4 to its printed digits). Density rho = P M0 / (R* T), speed of
/// sound sqrt(gamma R* T / M0), viscosity by Sutherland's law.
///
/// `temperature_offset` [K], in [-100, 100], gives a hot or cold day: the temperature at
/// every altitude is the standard one plus the offset, the sea-level pressure stays
/// 101325 Pa, and pressure is integrated hydrostatically through the shifted temperatures
/// (the layer formulas with every Tb replaced by Tb + offset). With offset 0 this is the
/// standard.
///
/// Above 80 km geometric the standard's kinetic temperature differs from the molecular-scale
/// temperature returned here by the molar-mass ratio M/M0 (at most 0.04%); below 80 km they
/// are equal. Errors: `invalid_argument` for an altitude outside the range or an offset
/// outside [-100, 100] K.
template <Real T>
[[nodiscard]] result<atmosphere_state<T>> standard_atmosphere(const T& altitude,
                                                              const T& temperature_offset = T(0)) {
  using std::exp;
  using std::pow;
  using c = air_constants<T>;
  if (!is_finite(altitude) || altitude < atmosphere_min_altitude<T>() ||
      altitude > atmosphere_max_altitude<T>())
    return fail(errc::invalid_argument,
                "standard atmosphere covers geopotential altitude -5000..84852 m', got [m']", altitude);
  if (!is_finite(temperature_offset) || temperature_offset < T(-100) || temperature_offset > T(100))
    return fail(errc::invalid_argument, "temperature offset must be in [-100, 100] K", temperature_offset);

  const T g0m0_over_r = standard_gravity<T>() * c::molar_mass() / c::gas_constant();  // [K/m]
  T base_temperature = c::sea_level_temperature() + temperature_offset;
  T base_pressure = c::sea_level_pressure();
  int layer = 0;
  // Walk up the layers (at most seven), carrying the base pressure; below 0 m' the first
  // layer's gradient is extended down, as the standard does to -5 km.
  for (; layer < detail::atmosphere_layer_count - 1; ++layer) {
    if (altitude < T(detail::atmosphere_base_height[layer + 1])) break;
    const T lapse = T(detail::atmosphere_lapse_tenths[layer]) / T(10000);  // [K/m']
    const T depth = T(detail::atmosphere_base_height[layer + 1] - detail::atmosphere_base_height[layer]);
    const T top_temperature = base_temperature + lapse * depth;
    if (lapse == T(0)) base_pressure *= exp(T(-g0m0_over_r * depth / base_temperature));
    else base_pressure *= pow(T(base_temperature / top_temperature), T(g0m0_over_r / lapse));
    base_temperature = top_temperature;
  }
  const T lapse = T(detail::atmosphere_lapse_tenths[layer]) / T(10000);
  const T dh = altitude - T(detail::atmosphere_base_height[layer]);
  const T temperature = base_temperature + lapse * dh;
  const T pressure = lapse == T(0) ? T(base_pressure * exp(T(-g0m0_over_r * dh / base_temperature)))
                                   : T(base_pressure * pow(T(base_temperature / temperature),
                                                           T(g0m0_over_r / lapse)));
  const result<T> mu = sutherland_viscosity(temperature);
  if (!mu) return unexpected<error>(mu.error());
  const result<T> a = speed_of_sound(temperature);
  if (!a) return unexpected<error>(a.error());
  return atmosphere_state<T>{altitude, temperature,
                             pressure, T(pressure * c::molar_mass() / (c::gas_constant() * temperature)),
                             *a,       *mu};
}

/// Where a body flies: the site's geometric altitude above mean sea level [m], its air
/// temperature [K] if measured (the standard atmosphere's otherwise), and the relative
/// humidity (a fraction, 0..1).
template <Real T>
struct site {
  T altitude{};
  std::optional<T> temperature{};
  T relative_humidity{};
};

/// The air at a site: pressure from the standard atmosphere at the site's geopotential
/// altitude on a day whose temperature offset makes the site temperature the measured one
/// (see `standard_atmosphere`), density of humid air at that temperature and pressure
/// (Buck 1981 vapour pressure), Sutherland viscosity and the speed of sound. Errors:
/// `invalid_argument` for an altitude outside -5 km..84.852 km', a humidity outside 0..1, a
/// temperature more than 100 K from the standard one or outside -40..50 C when humid.
template <Real T>
[[nodiscard]] result<air_properties<T>> site_air(const site<T>& where) {
  const result<T> h = geopotential_altitude(where.altitude);
  if (!h) return unexpected<error>(h.error());
  const result<atmosphere_state<T>> standard = standard_atmosphere(*h);
  if (!standard) return unexpected<error>(standard.error());
  T offset = T(0);
  if (where.temperature) {
    if (const status ok = require_positive(*where.temperature, "site temperature must be finite and > 0 [K]");
        !ok)
      return unexpected<error>(ok.error());
    offset = *where.temperature - standard->temperature;
  }
  const result<atmosphere_state<T>> day = standard_atmosphere(*h, offset);
  if (!day) return unexpected<error>(day.error());
  return make_air(day->temperature, day->pressure, where.relative_humidity);
}

}  // namespace lob
