// Air: the standard atmosphere, altitude conversions, Sutherland viscosity, vapour
// pressure and humid-air density.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <limits>
#include <sstream>
#include <string>
#include <type_traits>
#include <vector>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

namespace {
// A decimal string as T, with every digit T can hold.
template <class T>
T num(const char* text) {
  if constexpr (std::is_floating_point_v<T>) {
    return static_cast<T>(std::strtold(text, nullptr));
  } else {
    return T(text);
  }
}
template <class T>
T rel(const T& got, const T& want) {
  using std::abs;
  return T(abs(T(got - want)) / abs(want));
}
template <class T>
T tolerance(double at_least) {
  const T eps = std::numeric_limits<T>::epsilon();
  return T(at_least) > T(1000) * eps ? T(at_least) : T(1000) * eps;
}
}  // namespace

// U.S. Standard Atmosphere 1976 (NOAA-S/T 76-1562), Table 4, the defining base values of
// the layers by geopotential altitude (from memory): H [m'], T [K], P [Pa] as printed
// there to 7 significant digits.
TEST_CASE_TEMPLATE("the standard atmosphere reproduces the layer bases of the 1976 standard", T, float,
                   double, long double LOB_AND_WIDE(mp50)) {
  struct row {
    int h;
    const char* temperature;
    const char* pressure;
  };
  const row table[] = {{0, "288.15", "101325"},      {11000, "216.65", "22632.06"},
                       {20000, "216.65", "5474.889"}, {32000, "228.65", "868.0187"},
                       {47000, "270.65", "110.9063"}, {51000, "270.65", "66.93887"},
                       {71000, "214.65", "3.956420"}, {84852, "186.946", "0.3733836"}};
  for (const row& r : table) {
    const lob::result<lob::atmosphere_state<T>> s = lob::standard_atmosphere(T(r.h));
    REQUIRE(s.has_value());
    CAPTURE(r.h);
    CHECK(rel(s->temperature, num<T>(r.temperature)) <= tolerance<T>(1e-9));
    // 7 printed digits: half a unit in the last one is at most 5e-7 relative.
    CHECK(rel(s->pressure, num<T>(r.pressure)) <= tolerance<T>(5e-7));
  }
}

// Sea level, U.S. Standard Atmosphere 1976 Table I and ISO 2533: 288.15 K, 101325 Pa,
// 1.2250 kg/m^3, 340.294 m/s, 1.7894e-5 Pa s (from memory).
TEST_CASE_TEMPLATE("sea level has the standard's values", T, float, double, long double LOB_AND_WIDE(mp50)) {
  const lob::result<lob::atmosphere_state<T>> s = lob::standard_atmosphere(T(0));
  REQUIRE(s.has_value());
  CHECK(s->temperature == T(28815) / T(100));
  CHECK(s->pressure == T(101325));
  CHECK(rel(s->density, num<T>("1.2250")) <= T(5e-5));
  CHECK(rel(s->speed_of_sound, num<T>("340.294")) <= T(2e-6));
  CHECK(rel(s->dynamic_viscosity, num<T>("1.7894e-5")) <= T(3e-5));
}

// U.S. Standard Atmosphere 1976, Table I (by geometric altitude; from memory): z [m],
// T [K] to 3 decimals, P [Pa], rho [kg/m^3] and mu [Pa s] to the 5 significant digits the
// table prints, a [m/s] to 5 significant digits. The tolerances are half a unit in the last
// digit.
TEST_CASE_TEMPLATE("geometric altitudes match Table I of the 1976 standard", T, float, double, long double
                   LOB_AND_WIDE(mp50)) {
  struct row {
    int z;
    double temperature, pressure, density, sound, viscosity;
  };
  const row table[] = {
      {1000, 281.651, 8.9876e4, 1.1117, 336.435, 1.7579e-5},
      {5000, 255.676, 5.4048e4, 0.73643, 320.545, 1.6282e-5},
      {10000, 223.252, 2.6500e4, 0.41351, 299.532, 1.4577e-5},
      {20000, 216.650, 5.5293e3, 8.8910e-2, 295.07, 1.4216e-5},
      {30000, 226.509, 1.1970e3, 1.8410e-2, 301.709, 1.4753e-5},
  };
  const auto half_unit = [](double printed, double unit) { return 0.5 * unit / printed + 1e-7; };
  for (const row& r : table) {
    CAPTURE(r.z);
    const lob::result<T> h = lob::geopotential_altitude(T(r.z));
    REQUIRE(h.has_value());
    const lob::result<lob::atmosphere_state<T>> s = lob::standard_atmosphere(*h);
    REQUIRE(s.has_value());
    const auto digit5 = [](double v) { return std::pow(10.0, std::floor(std::log10(v)) - 4); };
    CHECK(static_cast<double>(rel(s->temperature, T(r.temperature))) <= half_unit(r.temperature, 1e-3));
    CHECK(static_cast<double>(rel(s->pressure, T(r.pressure))) <= half_unit(r.pressure, digit5(r.pressure)));
    CHECK(static_cast<double>(rel(s->density, T(r.density))) <= half_unit(r.density, digit5(r.density)));
    CHECK(static_cast<double>(rel(s->speed_of_sound, T(r.sound))) <= half_unit(r.sound, digit5(r.sound)));
    CHECK(static_cast<double>(rel(s->dynamic_viscosity, T(r.viscosity))) <=
          half_unit(r.viscosity, digit5(r.viscosity)));
  }
}

// The tropopause: 11 km geopotential, 216.65 K (1976 standard, Table 4), is 11019 m
// geometric (Table I lists 11019.1 m for 11000 m'; from memory).
TEST_CASE_TEMPLATE("geopotential and geometric altitude convert both ways", T, double, long double LOB_AND_WIDE(mp50)) {
  const lob::result<T> z = lob::geometric_altitude(T(11000));
  REQUIRE(z.has_value());
  CHECK(rel(*z, num<T>("11019.07")) <= T(1e-6));
  for (int k = -5; k <= 86; k += 7) {
    const T zk = T(k * 1000);
    const lob::result<T> h = lob::geopotential_altitude(zk);
    REQUIRE(h.has_value());
    const lob::result<T> back = lob::geometric_altitude(*h);
    REQUIRE(back.has_value());
    using std::abs;
    CHECK(abs(T(*back - zk)) <= T(1000) * std::numeric_limits<T>::epsilon() * T(86000));
  }
  const lob::result<T> g = lob::gravity_at_altitude(T(0));
  REQUIRE(g.has_value());
  CHECK(*g == lob::standard_gravity<T>());
}

namespace {
struct reference_row {
  std::string h, offset, temperature, pressure, density;
};
std::vector<reference_row> read_reference() {
  std::vector<reference_row> rows;
  std::ifstream in(LOB_TEST_DATA_DIR "/physics_atmosphere_reference.csv");
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    std::stringstream ss(line);
    reference_row r;
    std::getline(ss, r.h, ',');
    std::getline(ss, r.offset, ',');
    std::getline(ss, r.temperature, ',');
    std::getline(ss, r.pressure, ',');
    std::getline(ss, r.density, ',');
    rows.push_back(r);
  }
  return rows;
}
}  // namespace

// Independent reference: scripts/physics_atmosphere_reference.py integrates the hydrostatic
// equation numerically with mpmath at 40 digits (a different formulation from the layer
// formulas), for the standard day and hot and cold days.
TEST_CASE_TEMPLATE("the layer formulas agree with a numerically integrated hydrostatic atmosphere", T, float,
                   double, long double LOB_AND_WIDE(mp50)) {
  const std::vector<reference_row> rows = read_reference();
  REQUIRE(rows.size() == 72);
  T worst = T(0);
  for (const reference_row& r : rows) {
    const lob::result<lob::atmosphere_state<T>> s =
        lob::standard_atmosphere(num<T>(r.h.c_str()), num<T>(r.offset.c_str()));
    REQUIRE(s.has_value());
    const T e = rel(s->pressure, num<T>(r.pressure.c_str()));
    const T d = rel(s->density, num<T>(r.density.c_str()));
    CHECK(rel(s->temperature, num<T>(r.temperature.c_str())) <= T(8) * std::numeric_limits<T>::epsilon());
    worst = e > worst ? e : worst;
    worst = d > worst ? d : worst;
  }
  // A chain of at most seven pow/exp evaluations: a few hundred ulps at most (measured: see
  // the message).
  MESSAGE("worst relative error of pressure and density: " << static_cast<double>(worst));
  // The file holds 30 significant digits, which bounds what the 50-digit type can show.
  const T floor = T(400) * std::numeric_limits<T>::epsilon() > T(1e-28)
                      ? T(T(400) * std::numeric_limits<T>::epsilon()) : T(1e-28);
  CHECK(worst <= floor);
}

TEST_CASE("a hot day is less dense than a standard day at the same altitude") {
  const auto standard = lob::standard_atmosphere(2000.0);
  const auto hot = lob::standard_atmosphere(2000.0, 20.0);
  REQUIRE(standard.has_value());
  REQUIRE(hot.has_value());
  CHECK(hot->temperature == doctest::Approx(standard->temperature + 20.0));
  CHECK(hot->density < standard->density);
  // Warmer air column: the pressure falls off more slowly with height.
  CHECK(hot->pressure > standard->pressure);
}

TEST_CASE_TEMPLATE("altitudes and offsets outside the model's range are errors", T, float, double LOB_AND_WIDE(mp50)) {
  const lob::result<lob::atmosphere_state<T>> high = lob::standard_atmosphere(T(90000));
  REQUIRE_FALSE(high);
  CHECK(high.error() == lob::errc::invalid_argument);
  CHECK(std::strstr(high.error().message(), "-5000..84852") != nullptr);
  CHECK_FALSE(lob::standard_atmosphere(T(-6000)));
  CHECK_FALSE(lob::standard_atmosphere(std::numeric_limits<T>::quiet_NaN()));
  CHECK_FALSE(lob::standard_atmosphere(T(0), T(150)));
  CHECK_FALSE(lob::geopotential_altitude(T(-4000000)));
  CHECK_FALSE(lob::geometric_altitude(T(4000000)));
}

// Sutherland's law with the 1976 standard's constants: 1.7894e-5 Pa s at 288.15 K and
// 1.4216e-5 Pa s at 216.65 K (Table I; from memory).
TEST_CASE_TEMPLATE("Sutherland's law gives the standard's viscosities", T, float, double, long double LOB_AND_WIDE(mp50)) {
  const lob::result<T> sea = lob::sutherland_viscosity(T(28815) / T(100));
  const lob::result<T> tropopause = lob::sutherland_viscosity(T(21665) / T(100));
  REQUIRE(sea.has_value());
  REQUIRE(tropopause.has_value());
  CHECK(rel(*sea, num<T>("1.7894e-5")) <= T(3e-5));
  CHECK(rel(*tropopause, num<T>("1.4216e-5")) <= T(4e-5));
  // The law itself, against the same formula in 50 digits from decimal strings.
  const mp50 t("288.15");
  const mp50 want = mp50("1.458e-6") * t * sqrt(t) / (t + mp50("110.4"));
  CHECK(rel(mp50(*sea), want) <= mp50(8 * std::numeric_limits<T>::epsilon()));
  CHECK_FALSE(lob::sutherland_viscosity(T(0)));
  CHECK_FALSE(lob::sutherland_viscosity(T(-3)));
}

// Saturation pressure of water: IAPWS-95 values (Wagner & Pruss 2002, J. Phys. Chem. Ref.
// Data 31, 387; from memory): 611.657 Pa at the triple point 273.16 K, 2339.2 Pa at 20 C,
// 4246.9 Pa at 30 C, 7384.9 Pa at 40 C. Buck (1981) claims 0.2% in this range.
TEST_CASE_TEMPLATE("Buck's vapour pressure is within its stated 0.2% of IAPWS values", T, float, double,
                   long double) {
  struct row {
    double kelvin, pascal;
  };
  const row table[] = {{273.16, 611.657}, {293.15, 2339.2}, {303.15, 4246.9}, {313.15, 7384.9}};
  for (const row& r : table) {
    const lob::result<T> e = lob::saturation_vapour_pressure(T(r.kelvin));
    REQUIRE(e.has_value());
    CAPTURE(r.kelvin);
    CHECK(static_cast<double>(rel(*e, T(r.pascal))) <= 0.002);
  }
  CHECK_FALSE(lob::saturation_vapour_pressure(T(340)));
  CHECK_FALSE(lob::saturation_vapour_pressure(T(200)));
}

TEST_CASE_TEMPLATE("humid air is lighter than dry air and humidity must be a fraction", T, float, double,
                   long double LOB_AND_WIDE(mp50)) {
  const T t = T(29315) / T(100);
  const T p = T(101325);
  const lob::result<T> dry = lob::humid_air_density(t, p, T(0));
  const lob::result<T> half = lob::humid_air_density(t, p, T(1) / T(2));
  const lob::result<T> wet = lob::humid_air_density(t, p, T(1));
  REQUIRE(dry.has_value());
  REQUIRE(half.has_value());
  REQUIRE(wet.has_value());
  // Dry air at 20 C and 101325 Pa: 1.2041 kg/m^3 (common practice).
  CHECK(rel(*dry, num<T>("1.2041")) <= T(1e-4));
  CHECK(*half < *dry);
  CHECK(*wet < *half);
  // 1.0 -> 1.0%: saturated air at 20 C is about 1% lighter (ideal mixture, e = 2.35 kPa).
  CHECK(static_cast<double>(rel(*wet, *dry)) == doctest::Approx(0.0088).epsilon(0.1));
  const lob::result<T> over = lob::humid_air_density(t, p, T(1.5));
  REQUIRE_FALSE(over);
  CHECK(std::strstr(over.error().message(), "relative humidity") != nullptr);
  CHECK_FALSE(lob::humid_air_density(t, p, T(-0.1)));
  CHECK_FALSE(lob::humid_air_density(t, T(-1), T(0)));
}

TEST_CASE("the air at a site follows its altitude, temperature and humidity") {
  lob::site<double> standard_site{};
  const auto sea = lob::site_air(standard_site);
  REQUIRE(sea.has_value());
  CHECK(sea->density == doctest::Approx(1.2250).epsilon(1e-4));

  // A warm, humid upland site of our own: 1450 m, 31 C, 60% humidity.
  const lob::site<double> upland{1450.0, 304.15, 0.6};
  const auto air = lob::site_air(upland);
  REQUIRE(air.has_value());
  CHECK(air->temperature == doctest::Approx(304.15));
  CHECK(air->density < sea->density);
  CHECK(air->pressure < sea->pressure);
  const lob::site<double> soaked{1450.0, 304.15, 1.2};
  const auto bad = lob::site_air(soaked);
  REQUIRE_FALSE(bad);
  CHECK(bad.error() == lob::errc::invalid_argument);
  const lob::site<double> space{120000.0, std::nullopt, 0.0};
  CHECK_FALSE(lob::site_air(space));
}
