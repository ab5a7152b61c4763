// Queries of an integrated flight allocate nothing: this test program replaces the global
// operator new and delete with counting versions and checks that none is called while the
// queries run.
#include <doctest/doctest.h>

#include <array>
#include <atomic>
#include <cstdlib>
#include <new>

#include "lob/lob.hpp"

namespace {
std::atomic<long> allocations{0};
}  // namespace

// The replacements pair malloc with free. g++ (12, with the sanitizers' inlining) sees
// the free inlined after a call of operator new and takes it for a mismatched pair; with
// both operators replaced here it is the matching pair.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic ignored "-Wmismatched-new-delete"
#endif
void* operator new(std::size_t n) {
  allocations.fetch_add(1, std::memory_order_relaxed);
  if (void* p = std::malloc(n == 0 ? 1 : n)) return p;
  throw std::bad_alloc();
}
void* operator new[](std::size_t n) { return ::operator new(n); }
void operator delete(void* p) noexcept { std::free(p); }
void operator delete[](void* p) noexcept { std::free(p); }
void operator delete(void* p, std::size_t) noexcept { std::free(p); }
void operator delete[](void* p, std::size_t) noexcept { std::free(p); }

TEST_CASE("integrated flight queries do not allocate") {
  lob::medium<double> air;
  air.wind = lob::vec3<double>(2, -1, 0);
  lob::shot<double> s;
  s.velocity = lob::launch_velocity(40.0, lob::deg(35.0));
  std::array<lob::state<double>, 64> path;
  for (const auto method : {lob::stepper::adaptive, lob::stepper::rk4, lob::stepper::semi_implicit_euler}) {
    for (const bool still : {false, true}) {
      lob::flight_options<double> o;
      o.method = method;
      const long before = allocations.load();
      const auto f = lob::fly(lob::quadratic_drag<double>{.coefficient = 0.009},
                              still ? lob::medium<double>{} : air, s, o);
      const auto g =
          lob::fly(lob::linear_quadratic_drag<double>{.rate = 0.1, .coefficient = 0.004}, air, s, o);
      double sum = 0;
      sum += f->at(1.5)->position.x() + f->apex()->time + f->landing()->time + *f->range();
      sum += f->crossing(5.0, lob::side::rising)->time + f->at_distance(20.0)->time;
      sum += static_cast<double>(f->sample(path, 3.0).value_or(0));
      sum += g->landing()->time + f->landing(-100.0).has_value() +
             f->crossing(1e4, lob::side::falling).has_value();
      const long after = allocations.load();
      CHECK(sum > 0);
      CHECK(after == before);
    }
  }
}

TEST_CASE("the counting operator new does count") {
  const long before = allocations.load();
  auto* p = new int(3);
  const long after = allocations.load();
  delete p;
  CHECK(after == before + 1);
}
