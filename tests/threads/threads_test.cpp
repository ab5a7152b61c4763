// Many threads share const trajectories (exact and integrated) and call their queries and
// the solvers at once; every result must equal the one computed on a single thread first.
// The queries and solvers are documented as const, allocation-free and safe to call from
// many threads (lob/integrate/integrated_flight.hpp); built with -fsanitize=thread
// (`cmake --workflow --preset threads`) this test also shows that no call races.
#include <doctest/doctest.h>

#include <array>
#include <atomic>
#include <cstring>
#include <span>
#include <thread>
#include <vector>

#include "lob/lob.hpp"

namespace {

constexpr int thread_count = 8;
constexpr int rounds = 3;

// Everything the queries and solvers answer for one flight, as plain doubles, so that two
// runs compare bit for bit (errors as their code).
struct answers {
  std::vector<double> values;
  void add(double v) { values.push_back(v); }
  void add(const lob::vec3<double>& v) {
    add(v.x());
    add(v.y());
    add(v.z());
  }
  void add(const lob::state<double>& s) {
    add(s.time);
    add(s.position);
    add(s.velocity);
  }
  template <class T>
  void add_result(const lob::result<T>& r) {
    if (!r) {
      add(-1000.0 - static_cast<double>(r.error().code()));
      return;
    }
    add(*r);
  }
  void add(const lob::aim_solution<double>& s) {
    add(s.elevation);
    add(s.azimuth);
    add(s.time_of_flight);
    add(s.velocity);
    add(s.arrival);
  }
  void add(const lob::aim_solutions<double>& s) {
    if (s.flat) add(*s.flat);
    if (s.lofted) add(*s.lofted);
    add(static_cast<double>(s.count()));
  }
  void add(const lob::farthest_shot<double>& s) {
    add(s.elevation);
    add(s.range);
    add(s.time_of_flight);
    add(s.landing);
  }
  bool operator==(const answers& o) const {
    return values.size() == o.values.size() &&
           std::memcmp(values.data(), o.values.data(), values.size() * sizeof(double)) == 0;
  }
};

template <class Model, class Flight>
answers ask(const Model& model, const Flight& f, const lob::medium<double>& air) {
  answers a;
  for (double t : {0.0, 0.4, 1.3, 2.9}) a.add_result(f.at(t));
  a.add_result(f.apex());
  for (double h : {-1.0, 0.0, 2.5}) {
    a.add_result(f.crossing(h, lob::side::rising));
    a.add_result(f.landing(h));
    a.add_result(f.range(h));
  }
  for (double d : {1.0, 10.0, 25.0}) a.add_result(f.at_distance(d));
  std::array<lob::state<double>, 5> out{};
  const auto n = f.sample(std::span<lob::state<double>>(out), 2.0);
  a.add(n ? static_cast<double>(*n) : -1.0);
  for (const auto& s : out) a.add(s);

  const lob::vec3<double> from(0, 0, 1), to(30, 4, 2);
  a.add_result(lob::aim(model, air, {from, to, 28.0}));
  a.add_result(lob::speed_for_elevation(model, air, {from, to, 0.5}));
  a.add_result(lob::farthest_elevation(model, air, {from, 28.0, 0.1, 0.0}));
  return a;
}

template <class Model>
void shared_from_threads(const Model& model, const lob::medium<double>& air) {
  const lob::shot<double> launch{lob::vec3<double>(0, 0, 1), lob::launch_velocity(24.0, 0.7, 0.1)};
  const auto flight = lob::fly(model, air, launch);
  REQUIRE(flight.has_value());
  const auto& f = *flight;  // one const trajectory, shared by every thread
  const answers expected = ask(model, f, air);
  REQUIRE(expected.values.size() > 20);

  std::atomic<int> mismatches{0};
  std::atomic<bool> go{false};
  std::vector<std::thread> threads;
  for (int i = 0; i < thread_count; ++i)
    threads.emplace_back([&] {
      while (!go.load()) std::this_thread::yield();  // start together, to overlap the calls
      for (int r = 0; r < rounds; ++r)
        if (!(ask(model, f, air) == expected)) mismatches.fetch_add(1);
    });
  go.store(true);
  for (auto& t : threads) t.join();
  CHECK(mismatches.load() == 0);
}

}  // namespace

TEST_CASE("threads: a shared exact (linear drag) flight answers as on one thread") {
  lob::medium<double> air;
  air.wind = lob::vec3<double>(3, -1, 0);
  shared_from_threads(lob::linear_drag<double>{0.08}, air);
}

TEST_CASE("threads: a shared integrated flight on the fast path (quadratic, still air) answers as on one thread") {
  shared_from_threads(lob::quadratic_drag<double>{0.01}, lob::medium<double>{});
}

TEST_CASE("threads: a shared integrated flight (linear + quadratic, wind) answers as on one thread") {
  lob::medium<double> air;
  air.wind = lob::vec3<double>(-4, 2, 0);
  shared_from_threads(lob::linear_quadratic_drag<double>{0.02, 0.008}, air);
}
