#pragma once
// What the fuzz harnesses share: a decoder from fuzz bytes to doubles biased towards the
// values that break numerical code, checks that stop the process on a broken promise, and
// a clock on every library call.

#include <chrono>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <limits>

#include "lob/lob.hpp"

namespace fuzz {

// Reads the fuzz bytes front to back; past the end every read gives zero bytes, so any
// input decodes to a complete case.
class input {
 public:
  input(const std::uint8_t* data, std::size_t size) : data_(data), size_(size) {}

  std::uint8_t byte() { return pos_ < size_ ? data_[pos_++] : std::uint8_t{0}; }

  std::uint64_t bits(int bytes) {
    std::uint64_t v = 0;
    for (int i = 0; i < bytes; ++i) v = (v << 8) | byte();
    return v;
  }

  // One of n choices.
  int pick(int n) { return static_cast<int>(byte() % static_cast<unsigned>(n)); }
  bool flag() { return (byte() & 1u) != 0; }

  // Any double, half of the time one of the values that break numerical code: NaN, +-inf,
  // denormals, +-0, huge (1e300, and 1e154 whose square overflows), tiny (1e-300, 1e-154
  // whose square underflows), the extremes of double; else an ordinary value of any
  // magnitude from 1e-12 to 1e12, or any bit pattern.
  double real() {
    const double v = any_real();
    if (std::isfinite(v) && v != 0 && (std::abs(v) > 1e150 || std::abs(v) < 1e-150)) extreme_ = true;
    return v;
  }

  // True once real() has given a finite value whose square or reciprocal leaves the range
  // of double (above 1e150 or below 1e-150 in magnitude).
  bool saw_extreme() const { return extreme_; }

 private:
  double any_real() {
    const std::uint8_t kind = byte();
    constexpr double inf = std::numeric_limits<double>::infinity();
    const double sign = (kind & 0x80u) ? -1.0 : 1.0;
    switch (kind & 0x7fu) {
      case 0: return std::numeric_limits<double>::quiet_NaN();
      case 1: return sign * inf;
      case 2: return sign * std::numeric_limits<double>::denorm_min();
      case 3: return sign * 0x1p-1060 * static_cast<double>(bits(2) + 1);  // a denormal
      case 4: return sign * 0.0;
      case 5: return sign * 1e300;
      case 6: return sign * 1e154;
      case 7: return sign * 1e-300;
      case 8: return sign * 1e-154;
      case 9: return sign * std::numeric_limits<double>::max();
      case 10: return sign * std::numeric_limits<double>::min();
      case 11: return sign * 1e6;
      case 12: return sign * 1e-9;
      case 13: {  // any bit pattern
        const std::uint64_t b = bits(8);
        double d;
        std::memcpy(&d, &b, sizeof d);
        return d;
      }
      default:
        if ((kind & 0x7fu) < 64) return sign * ordinary();
        return sign * modest();
    }
  }

 public:
  // A value of magnitude 1e-12 .. 1e12, spread evenly in log.
  double ordinary() {
    const double u = static_cast<double>(bits(2)) / 65535.0;
    return std::pow(10.0, -12.0 + 24.0 * u);
  }

  // A value like those of everyday use: 0 .. 1000 with three decimals.
  double modest() { return static_cast<double>(bits(3) % 1000001u) / 1000.0; }

  // A double in [lo, hi].
  double in(double lo, double hi) { return lo + (hi - lo) * static_cast<double>(bits(2)) / 65535.0; }

  // Either real() (when `wild`) or a value in [lo, hi]: lets a harness keep most inputs
  // sane so that the deep paths are reached, with any value possible.
  double maybe(double lo, double hi) { return flag() ? real() : in(lo, hi); }

  lob::vec3<double> vec(double lo, double hi) {
    const double x = maybe(lo, hi), y = maybe(lo, hi), z = maybe(lo, hi);
    return lob::vec3<double>(x, y, z);
  }

 private:
  const std::uint8_t* data_;
  std::size_t size_;
  std::size_t pos_ = 0;
  bool extreme_ = false;
};

// Gravity: the default, a sideways or tilted direction, a tiny or huge magnitude, or wild.
inline lob::vec3<double> gravity(input& in) {
  switch (in.pick(6)) {
    case 0: return lob::vec3<double>(0, 0, -9.80665);
    case 1: return lob::vec3<double>(0, -9.80665, 0);  // y up, as engines have it
    case 2: {
      lob::vec3<double> d{in.in(-1, 1), in.in(-1, 1), in.in(-1, 1)};
      return d * in.real();  // any direction, any magnitude
    }
    case 3: return lob::vec3<double>(0, 0, -in.real());
    case 4: {
      const lob::vec3<double> d{in.in(-1, 1), in.in(-1, 1), -1.0};
      return d * in.in(0.1, 30);
    }
    default: return in.vec(-20, 20);
  }
}

inline lob::medium<double> medium(input& in) {
  lob::medium<double> air;
  air.gravity = gravity(in);
  switch (in.pick(3)) {
    case 0: break;  // still air
    case 1: air.wind = lob::vec3<double>{in.in(-30, 30), in.in(-30, 30), in.in(-5, 5)}; break;
    default: air.wind = in.vec(-50, 50); break;
  }
  return air;
}

// Flight options that keep every query bounded: few steps, and sometimes a fixed-step
// method or no fast path.
inline lob::flight_options<double> flight_options(input& in) {
  lob::flight_options<double> o;
  switch (in.pick(8)) {
    case 0: o.method = lob::stepper::rk4; break;
    case 1: o.method = lob::stepper::semi_implicit_euler; break;
    default: break;
  }
  o.max_steps = 20 + static_cast<std::int64_t>(in.bits(1)) * 2;
  if (in.pick(4) == 0) o.relative_tolerance = in.maybe(1e-12, 1e-3);
  if (in.pick(4) == 0) o.fixed_step = in.maybe(1e-3, 1);
  if (in.pick(4) == 0) o.max_time = in.maybe(0.1, 1e4);
  if (in.pick(8) == 0) o.use_fast_paths = false;
  return o;
}

// The case being run, in words, printed with a broken promise (harness state, not library).
inline char case_text[1024] = "";
template <class... A>
void describe(const char* format, A... args) {
  std::snprintf(case_text, sizeof case_text, format, args...);
}
inline void describe_more(const char* text) {
  const std::size_t n = std::strlen(case_text);
  std::snprintf(case_text + n, sizeof case_text - n, "%s", text);
}

// A user model (lob/models/traits.hpp): drag a = -c |v|^p v with 0 <= p <= 2.
struct power_drag {
  using scalar_type = double;
  double coefficient = 0;
  double power = 1;
  [[nodiscard]] lob::vec3<double> acceleration(const lob::vec3<double>& v) const {
    const double speed = v.norm();
    const double scale = speed > 0 ? coefficient * std::pow(speed, power) : 0.0;
    return -scale * v;
  }
  [[nodiscard]] lob::status check() const {
    if (!std::isfinite(coefficient) || coefficient < 0)
      return lob::fail(lob::errc::invalid_argument, "power drag coefficient must be finite and >= 0", coefficient);
    if (!(power >= 0 && power <= 2))
      return lob::fail(lob::errc::invalid_argument, "power drag exponent must be in [0, 2]", power);
    return {};
  }
};

[[noreturn]] inline void violated(const char* file, int line, const char* what, const char* detail) {
  std::fprintf(stderr, "%s:%d: broken promise: %s%s%s\n", file, line, what, detail[0] ? ": " : "", detail);
  std::fprintf(stderr, "case: %s\n", case_text);
  std::fflush(stderr);
  std::abort();
}

// Wall-clock bound of one library call [s]. ASan and UBSan slow calls down several
// times and the fuzzing machine is shared: the slowest solver call of an unloaded run
// took 0.3 s with the small budgets the harnesses pass, so a call that takes 2 s has no
// cap that works.
inline constexpr double call_budget_seconds = 2.0;

// Runs `f` and, under libFuzzer, stops the process when it takes longer than the budget.
// The replay tests (LOB_FUZZ_REPLAY) do not time: a loaded CI machine must not fail them.
template <class F>
auto timed(const char* what, F&& f) {
  const auto start = std::chrono::steady_clock::now();
  auto r = f();
  const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
#ifdef LOB_FUZZ_REPLAY
  constexpr bool timing = false;
#else
  constexpr bool timing = true;
#endif
  if (timing && s > call_budget_seconds) {
    char msg[64];
    std::snprintf(msg, sizeof msg, "took %.3f s", s);
    violated(__FILE__, __LINE__, what, msg);
  }
  return r;
}

inline bool finite(double x) { return std::isfinite(x); }
inline bool finite(const lob::vec3<double>& v) { return lob::is_finite(v); }
inline bool finite(const lob::state<double>& s) { return finite(s.time) && finite(s.position) && finite(s.velocity); }

}  // namespace fuzz

// A promise of the library; stops the process with the condition and a detail line
// (a printf format and its arguments, at least the format).
#define FUZZ_CHECK(cond, ...)                                         \
  do {                                                                \
    if (!(cond)) {                                                    \
      char fuzz_detail_[512];                                         \
      std::snprintf(fuzz_detail_, sizeof fuzz_detail_, __VA_ARGS__); \
      ::fuzz::violated(__FILE__, __LINE__, #cond, fuzz_detail_);      \
    }                                                                 \
  } while (0)
