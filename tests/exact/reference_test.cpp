// linear_flight against tests/data/exact_linear_reference.csv: 50-digit references from
// scripts/exact_reference.py (explicit z(t), roots by bisection in mpmath, no Lambert W),
// over k = 0 and 1e-12 .. 1e3 1/s, speeds 0.01 .. 2000 m/s, elevations -89 .. 90 degrees,
// landing below, level with and above the launch, with and without wind.
#include <doctest/doctest.h>
#include "wide_types.hpp"

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <sstream>
#include <string>
#include <type_traits>
#include <vector>

#include "lob/lob.hpp"

using mp50 = boost::multiprecision::cpp_bin_float_50;

namespace {

struct row {
  std::string id;
  double in[10];  // k g z0 vx vy vz wx wy wz h
  mp50 landing_time, range, apex_height, landing_speed;
  bool has_rising = false;
  mp50 rising_time;
};

std::vector<row> load() {
  std::ifstream file(LOB_TEST_DATA_DIR "/exact_linear_reference.csv");
  std::vector<row> rows;
  std::string line;
  bool header = true;
  while (std::getline(file, line)) {
    if (line.empty() || line[0] == '#') continue;
    if (header) {
      header = false;
      continue;
    }
    std::stringstream ss(line);
    std::string cell;
    row r;
    std::getline(ss, r.id, ',');
    for (double& x : r.in) {
      std::getline(ss, cell, ',');
      x = std::strtod(cell.c_str(), nullptr);  // repr of a double: parses back exactly
    }
    mp50* refs[4] = {&r.landing_time, &r.range, &r.apex_height, &r.landing_speed};
    for (mp50* x : refs) {
      std::getline(ss, cell, ',');
      *x = mp50(cell.c_str());
    }
    std::getline(ss, cell, ',');
    if (cell != "-") {
      r.has_rising = true;
      r.rising_time = mp50(cell.c_str());
    }
    rows.push_back(r);
  }
  return rows;
}

const std::vector<row>& rows() {
  static const std::vector<row> r = load();
  return r;
}

mp50 rel(const mp50& got, const mp50& ref) {
  using std::abs;
  return ref == 0 ? mp50(abs(got)) : mp50(abs(got - ref) / abs(ref));
}

struct worst {
  mp50 err = 0;
  std::string id;
  void see(const mp50& e, const std::string& where) {
    if (e > err) {
      err = e;
      id = where;
    }
  }
};

template <class T>
lob::linear_flight<T> flight_of(const row& r) {
  const double* x = r.in;
  lob::medium<T> air;
  air.gravity = lob::vec3<T>(T(0), T(0), T(-x[1]));
  air.wind = lob::vec3<T>(T(x[6]), T(x[7]), T(x[8]));
  const lob::shot<T> s{lob::vec3<T>(T(0), T(0), T(x[2])), lob::vec3<T>(T(x[3]), T(x[4]), T(x[5]))};
  return lob::linear_flight<T>::make(T(x[0]), air, s).value();
}

// The largest relative errors of T over the table, for time, range, apex height,
// landing speed and the rising crossing time.
template <class T>
void check_table(double tolerance) {
  worst time, range, apex, speed, rising;
  for (const row& r : rows()) {
    const lob::linear_flight<T> f = flight_of<T>(r);
    const T h = T(r.in[9]);
    const lob::result<lob::state<T>> land = f.landing(h);
    const lob::result<T> rg = f.range(h);
    const lob::result<T> top = f.max_height();
    REQUIRE_MESSAGE(land.has_value(), r.id);
    REQUIRE_MESSAGE(rg.has_value(), r.id);
    REQUIRE_MESSAGE(top.has_value(), r.id);
    time.see(rel(mp50(land->time), r.landing_time), r.id);
    range.see(rel(mp50(*rg), r.range), r.id);
    apex.see(rel(mp50(*top), r.apex_height), r.id);
    speed.see(rel(mp50(lob::speed(*land)), r.landing_speed), r.id);
    if (r.has_rising) {
      const lob::result<lob::state<T>> up = f.crossing(h, lob::side::rising);
      REQUIRE_MESSAGE(up.has_value(), r.id);
      rising.see(rel(mp50(up->time), r.rising_time), r.id);
    }
  }
  MESSAGE("max relative errors over "
          << rows().size() << " flights, digits " << std::numeric_limits<T>::digits << ": time " << time.err
          << " (" << time.id << "), range " << range.err << " (" << range.id << "), apex height " << apex.err
          << " (" << apex.id << "), landing speed " << speed.err << " (" << speed.id << "), rising time "
          << rising.err << " (" << rising.id << ")");
  const mp50 tol(tolerance);
  CHECK(time.err <= tol);
  CHECK(range.err <= tol);
  CHECK(apex.err <= tol);
  CHECK(speed.err <= tol);
  CHECK(rising.err <= tol);
}

}  // namespace

TEST_CASE("the reference table is present and covers the issue's ranges") {
  REQUIRE(rows().size() >= 500);
  double kmin = 1e300, kmax = 0, smin = 1e300, smax = 0;
  int vacuum = 0, windy = 0, above = 0, below = 0, vertical = 0;
  for (const row& r : rows()) {
    const double* x = r.in;
    if (x[0] == 0) ++vacuum;
    else {
      kmin = std::min(kmin, x[0]);
      kmax = std::max(kmax, x[0]);
    }
    const double s = std::sqrt(x[3] * x[3] + x[4] * x[4] + x[5] * x[5]);
    smin = std::min(smin, s);
    smax = std::max(smax, s);
    if (x[6] != 0 || x[7] != 0 || x[8] != 0) ++windy;
    if (x[9] > x[2]) ++above;
    if (x[9] < x[2]) ++below;
    if (x[3] == 0 && x[4] == 0) ++vertical;
  }
  CHECK(vacuum > 0);
  CHECK(kmin <= 1e-12);
  CHECK(kmax >= 1e3);
  CHECK(smin <= 0.01 * (1 + 1e-12));
  CHECK(smax >= 2000 * (1 - 1e-12));
  CHECK(windy > 0);
  CHECK(above > 0);
  CHECK(below > 0);
  CHECK(vertical > 0);
}

TEST_CASE("double landing time, range, apex height and landing speed hold 1e-14 against the table") {
  check_table<double>(1e-14);
}

TEST_CASE("long double holds 1e-17 against the table") { check_table<long double>(1e-17); }

#if LOB_TEST_WIDE
TEST_CASE("the 50-digit type holds 1e-38 against the table") { check_table<mp50>(1e-38); }
#endif
