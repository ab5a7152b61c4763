// Uses lob in a program built with -fno-exceptions -fno-rtti: every query path must
// compile, link and run without them. Returns non-zero on a wrong answer.
#include <cmath>
#include <cstdio>

#include <lob/lob.hpp>

namespace {
int failures = 0;
void expect(bool ok, const char* what) {
  if (!ok) {
    std::printf("FAILED: %s\n", what);
    ++failures;
  }
}
}  // namespace

int main() {
  const lob::medium<double> air{};
  const lob::shot<double> launch{lob::vec3<double>::Zero(), lob::launch_velocity(20.0, lob::deg(30.0))};

  // Vacuum flight time on level ground, 2 v sin(theta) / g (any mechanics textbook).
  const auto vacuum = lob::fly(lob::vacuum<double>{}, air, launch);
  expect(vacuum.has_value(), "vacuum flight builds");
  if (vacuum) {
    const auto land = vacuum->landing(0.0);
    expect(land.has_value(), "vacuum landing exists");
    if (land)
      expect(std::abs(land->time - 20.0 / lob::standard_gravity<double>()) < 1e-12, "vacuum flight time");
  }

  const auto drag = lob::fly(lob::linear_drag<double>{0.3}, air, launch);
  expect(drag.has_value(), "linear-drag flight builds");
  if (drag) {
    expect(drag->apex().has_value(), "linear-drag apex exists");
    expect(drag->range(0.0).has_value(), "linear-drag range exists");
    const auto above = drag->crossing(1000.0, lob::side::falling);
    expect(!above && above.error() == lob::errc::never_reaches, "a height above the apex is never reached");
  }

  const auto bad = lob::fly(lob::linear_drag<double>{-1.0}, air, launch);
  expect(!bad && bad.error() == lob::errc::invalid_argument, "a negative rate is rejected");

  std::printf("%s\n", failures == 0 ? "ok" : "failures");
  return failures == 0 ? 0 : 1;
}
