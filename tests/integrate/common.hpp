// Shared helpers of the integrate tests: the 50-digit type, parsing at full precision,
// and the mpmath reference flights of tests/data/integrate_quadratic_reference.csv
// (written by scripts/integrate_reference.py).
#pragma once

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/eigen.hpp>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <type_traits>
#include <vector>

#include "lob/lob.hpp"

namespace lob_test {

using mp50 = boost::multiprecision::cpp_bin_float_50;

/// A decimal string at the full precision of T.
template <class T>
T parse(const std::string& text) {
  if constexpr (std::is_floating_point_v<T>) {
    return static_cast<T>(std::strtold(text.c_str(), nullptr));
  } else {
    return T(text);
  }
}

template <class T>
T rel_err(const T& value, const T& reference) {
  using std::abs;
  return T(abs(T(value - reference)) / abs(reference));
}

/// One row of the mpmath reference: inputs and the 25-digit answers.
template <class T>
struct reference_flight {
  std::string name;
  T k, c;
  lob::shot<T> launch;
  lob::medium<T> air;
  T landing_height;
  T apex_time, apex_height, landing_time, range;
  lob::vec3<T> landing_position, landing_velocity;
};

template <class T>
std::vector<reference_flight<T>> load_reference() {
  std::ifstream in(LOB_TEST_DATA_DIR "/integrate_quadratic_reference.csv");
  std::vector<reference_flight<T>> rows;
  std::string line;
  bool header = true;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    if (header) {  // the column names
      header = false;
      continue;
    }
    std::vector<std::string> f;
    std::stringstream ss(line);
    std::string cell;
    while (std::getline(ss, cell, ',')) f.push_back(cell);
    if (f.size() != 24) continue;
    reference_flight<T> r;
    r.name = f[0];
    r.launch.position = lob::vec3<T>(parse<T>(f[3]), parse<T>(f[4]), parse<T>(f[5]));
    r.launch.velocity =
        lob::launch_velocity(parse<T>(f[6]), lob::deg(parse<T>(f[7])), lob::deg(parse<T>(f[8])));
    r.air.wind = lob::vec3<T>(parse<T>(f[9]), parse<T>(f[10]), parse<T>(f[11]));
    r.landing_height = parse<T>(f[12]);
    r.k = parse<T>(f[13]);
    r.c = parse<T>(f[14]);
    r.apex_time = parse<T>(f[15]);
    r.apex_height = parse<T>(f[16]);
    r.landing_time = parse<T>(f[17]);
    r.landing_position = lob::vec3<T>(parse<T>(f[18]), parse<T>(f[19]), r.landing_height);
    r.landing_velocity = lob::vec3<T>(parse<T>(f[20]), parse<T>(f[21]), parse<T>(f[22]));
    r.range = parse<T>(f[23]);
    rows.push_back(r);
  }
  return rows;
}

/// Options for the integrated path at tolerance `tol` (relative and absolute).
template <class T>
lob::flight_options<T> integrated(const T& tol) {
  lob::flight_options<T> o;
  o.relative_tolerance = tol;
  o.absolute_tolerance = tol;
  o.use_fast_paths = false;
  return o;
}

}  // namespace lob_test
