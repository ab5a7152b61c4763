// Consumer check: lob::lob is usable from outside; a vacuum flight lands where the
// textbook range v^2 sin(2 theta) / g says (any mechanics textbook).
#include <cmath>
#include <cstdio>

#include <lob/lob.hpp>

int main() {
  const double v = 12.0;
  const double theta = lob::deg(40.0);
  const auto flight = lob::fly(lob::vacuum<double>{}, lob::medium<double>{},
                               lob::shot<double>{lob::vec3<double>::Zero(), lob::launch_velocity(v, theta)});
  if (!flight) return 1;
  const auto range = flight->range(0.0);
  if (!range) return 1;
  const double expected = v * v * std::sin(2 * theta) / lob::standard_gravity<double>();
  std::printf("lob %d: range %.12f m (expected %.12f m)\n", lob::version, *range, expected);
  return std::abs(*range - expected) < 1e-12 * expected ? 0 : 1;
}
