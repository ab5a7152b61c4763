#pragma once
/// \file lob/physics/air.hpp
/// Properties of air at a given temperature, pressure and humidity: dynamic viscosity by
/// Sutherland's law, the speed of sound of dry air, the saturation pressure of water vapour
/// (Buck 1981) and the density of humid air. The constants are those of the U.S. Standard
/// Atmosphere 1976 (NOAA-S/T 76-1562), which ISO 2533:1975 shares below 32 km.
///
/// All functions are templates on the scalar, allocation-free, and return `lob::result`:
/// a temperature, pressure or humidity outside the stated domain is an error value.

#include "lob/core/real.hpp"
#include "lob/core/result.hpp"

namespace lob {

/// Constants of the U.S. Standard Atmosphere 1976, built from integers so that every digit
/// of `T` is right. Units: SI (the standard's kmol-based values divided by 1000).
template <Real T>
struct air_constants {
  /// Universal gas constant R* as the 1976 standard fixes it, 8.31432 J/(mol K).
  static T gas_constant() { return T(831432) / T(100000); }
  /// Mean molar mass of sea-level dry air M0, 28.9644e-3 kg/mol.
  static T molar_mass() { return T(289644) / T(10000000); }
  /// Ratio of specific heats of air, 1.4.
  static T heat_capacity_ratio() { return T(14) / T(10); }
  /// Sutherland's beta, 1.458e-6 kg/(m s K^1/2).
  static T sutherland_beta() { return T(1458) / T(1000000000); }
  /// Sutherland's constant S, 110.4 K.
  static T sutherland_temperature() { return T(1104) / T(10); }
  /// Sea-level standard temperature, 288.15 K.
  static T sea_level_temperature() { return T(28815) / T(100); }
  /// Sea-level standard pressure, 101325 Pa.
  static T sea_level_pressure() { return T(101325); }
  /// Molar mass of water, 18.01528e-3 kg/mol (IUPAC atomic weights; common practice).
  static T water_molar_mass() { return T(1801528) / T(100000000); }
  /// 0 degrees Celsius, 273.15 K.
  static T celsius_zero() { return T(27315) / T(100); }
};

/// The state of the air a body flies through, as the physics/ functions need it.
template <Real T>
struct air_properties {
  T density{};            ///< [kg/m^3]
  T dynamic_viscosity{};  ///< [Pa s]
  T speed_of_sound{};     ///< [m/s]
  T temperature{};        ///< [K]
  T pressure{};           ///< [Pa]
};

namespace detail {
template <Real T>
[[nodiscard]] status check_temperature(const T& temperature) {
  // 1 K .. 2000 K: Sutherland's law and the ideal gas are used far inside this.
  // Below 1 K, T^(3/2) of Sutherland's law underflows for tiny inputs (1e-300 K gave 0).
  if (!is_finite(temperature) || !(temperature >= T(1)) || temperature > T(2000))
    return fail(errc::invalid_argument, "air temperature must be in [1, 2000] K", temperature);
  return {};
}
template <Real T>
[[nodiscard]] status check_pressure(const T& pressure) {
  if (!is_finite(pressure) || !(pressure > T(0)) || pressure > T(10000000))
    return fail(errc::invalid_argument, "air pressure must be in (0, 1e7] Pa", pressure);
  return {};
}
}  // namespace detail

/// Dynamic viscosity of air [Pa s] at `temperature` [K] by Sutherland's law,
/// mu = beta T^(3/2) / (T + S), with the constants of the U.S. Standard Atmosphere 1976
/// (beta = 1.458e-6 kg/(m s K^1/2), S = 110.4 K): 1.7894e-5 Pa s at 288.15 K. The standard
/// uses it from 86 km down; it is good to about 2% from 100 K to 1900 K (from memory).
template <Real T>
[[nodiscard]] result<T> sutherland_viscosity(const T& temperature) {
  using std::sqrt;
  if (const status ok = detail::check_temperature(temperature); !ok)
    return unexpected<error>(ok.error());
  using c = air_constants<T>;
  return T(c::sutherland_beta() * temperature * sqrt(temperature) /
           (temperature + c::sutherland_temperature()));
}

/// Speed of sound in dry air [m/s] at `temperature` [K]: a = sqrt(gamma R* T / M0), the
/// ideal-gas form of the 1976 standard (340.294 m/s at 288.15 K). Humidity raises it by
/// under 0.4% at 30 C and full saturation; that is neglected here.
template <Real T>
[[nodiscard]] result<T> speed_of_sound(const T& temperature) {
  using std::sqrt;
  if (const status ok = detail::check_temperature(temperature); !ok)
    return unexpected<error>(ok.error());
  using c = air_constants<T>;
  return T(sqrt(T(c::heat_capacity_ratio() * c::gas_constant() * temperature / c::molar_mass())));
}

/// Saturation pressure of water vapour over a plane surface of pure water [Pa] at
/// `temperature` [K], by Buck (1981), "New equations for computing vapor pressure and
/// enhancement factor", J. Appl. Meteorol. 20, 1527-1532, eq. (8) without its enhancement
/// factor: e_w = 611.21 exp(17.502 t / (240.97 + t)) Pa, t in degrees Celsius. Buck states
/// it within 0.2% from -20 C to +50 C (from memory); it is accepted from -40 C to +50 C
/// (supercooled water below 0 C), outside that an error.
template <Real T>
[[nodiscard]] result<T> saturation_vapour_pressure(const T& temperature) {
  using std::exp;
  using c = air_constants<T>;
  if (!is_finite(temperature))
    return fail(errc::invalid_argument, "temperature must be finite", temperature);
  const T t = temperature - c::celsius_zero();
  if (t < T(-40) || t > T(50))
    return fail(errc::invalid_argument, "saturation pressure formula (Buck 1981) needs -40..50 C, got [K]",
                temperature);
  return T(T(61121) / T(100) * exp(T(T(17502) / T(1000) * t / (T(24097) / T(100) + t))));
}

/// Partial pressure of water vapour [Pa] in moist air of `relative_humidity` (0..1, a
/// fraction, not percent) at `temperature` [K] and total `pressure` [Pa]: the relative
/// humidity times the saturation pressure of Buck (1981) eq. (8) including his enhancement
/// factor for moist air, f = 1.0007 + 3.46e-6 P/hPa.
template <Real T>
[[nodiscard]] result<T> vapour_pressure(const T& temperature, const T& pressure,
                                        const T& relative_humidity) {
  if (!is_finite(relative_humidity) || relative_humidity < T(0) || relative_humidity > T(1))
    return fail(errc::invalid_argument, "relative humidity must be a fraction in [0, 1]", relative_humidity);
  if (const status ok = detail::check_pressure(pressure); !ok) return unexpected<error>(ok.error());
  if (relative_humidity == T(0)) return T(0);
  const result<T> e_w = saturation_vapour_pressure(temperature);
  if (!e_w) return e_w;
  const T enhancement = T(10007) / T(10000) + T(346) / T(100000000) * (pressure / T(100));
  const T e = relative_humidity * enhancement * *e_w;
  if (!(e < pressure))
    return fail(errc::invalid_argument, "vapour pressure would exceed the total pressure [Pa]", pressure);
  return e;
}

/// Density of moist air [kg/m^3] as an ideal mixture of dry air (molar mass M0 of the 1976
/// standard) and water vapour: rho = ((p - e) M0 + e Mv) / (R* T), e from
/// `vapour_pressure`. Dry air at 288.15 K and 101325 Pa gives 1.2250 kg/m^3. The
/// compressibility factor of air (about 0.9996 near sea level) is neglected, a 0.05% effect.
/// Errors: those of `check_temperature` and `vapour_pressure`, and `invalid_argument` naming
/// the pressure when the density would round to zero (a denormal pressure, about 1e-318 Pa
/// or less).
template <Real T>
[[nodiscard]] result<T> humid_air_density(const T& temperature, const T& pressure,
                                          const T& relative_humidity = T(0)) {
  if (const status ok = detail::check_temperature(temperature); !ok)
    return unexpected<error>(ok.error());
  const result<T> e = vapour_pressure(temperature, pressure, relative_humidity);
  if (!e) return e;
  using c = air_constants<T>;
  const T rho =
      ((pressure - *e) * c::molar_mass() + *e * c::water_molar_mass()) / (c::gas_constant() * temperature);
  // A denormal pressure (8.09e-320 Pa at 320.2 K, a fuzz_physics finding) gives a density
  // below the least T > 0: an error naming the pressure, never 0 as a density.
  if (!(rho > T(0)))
    return fail(errc::invalid_argument, "the air density underflows T (rounds to 0) at this pressure [Pa]",
                pressure);
  return rho;
}

/// Everything physics/ needs about the air at `temperature` [K], `pressure` [Pa] and
/// `relative_humidity` (0..1): humid-air density, Sutherland viscosity and the speed of
/// sound of dry air (humidity's effect on viscosity and sound speed, under 1%, neglected).
template <Real T>
[[nodiscard]] result<air_properties<T>> make_air(const T& temperature, const T& pressure,
                                                 const T& relative_humidity = T(0)) {
  const result<T> rho = humid_air_density(temperature, pressure, relative_humidity);
  if (!rho) return unexpected<error>(rho.error());
  const result<T> mu = sutherland_viscosity(temperature);
  if (!mu) return unexpected<error>(mu.error());
  const result<T> a = speed_of_sound(temperature);
  if (!a) return unexpected<error>(a.error());
  return air_properties<T>{*rho, *mu, *a, temperature, pressure};
}

}  // namespace lob
