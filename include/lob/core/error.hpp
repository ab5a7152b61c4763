#pragma once
/// \file lob/core/error.hpp
/// `lob::error`: the one error type of the library (an enum code and a short message).

#include <array>
#include <cstdio>
#include <string_view>

namespace lob {

/// What went wrong. One enum serves the whole library so that codes read the same
/// everywhere; new codes are added here, never per header.
enum class errc {
  invalid_argument,  ///< an input is non-finite, negative where it must not be, or zero
  never_reaches,     ///< the body never reaches the asked height, distance or event
  out_of_reach,      ///< no launch with the given constraints reaches the target
  step_limit,        ///< an integration used its whole step budget
  time_limit,        ///< an integration reached its maximum flight time
  no_convergence,    ///< an iteration used its whole budget without converging
  too_few_samples,   ///< a fit was given fewer samples than it has unknowns
};

/// A short, stable name for an error code ("invalid_argument", ...).
[[nodiscard]] constexpr std::string_view to_string(errc code) noexcept {
  switch (code) {
    case errc::invalid_argument: return "invalid_argument";
    case errc::never_reaches: return "never_reaches";
    case errc::out_of_reach: return "out_of_reach";
    case errc::step_limit: return "step_limit";
    case errc::time_limit: return "time_limit";
    case errc::no_convergence: return "no_convergence";
    case errc::too_few_samples: return "too_few_samples";
  }
  return "unknown";
}

/// An error value: a code, a message naming the offending input, and an optional
/// number that some errors carry (for `out_of_reach`, the farthest reachable distance).
/// Fixed-size storage: creating or copying an error never allocates.
class error {
 public:
  static constexpr std::size_t capacity = 120;

  constexpr error() noexcept = default;

  /// An error with a plain message (truncated to `capacity - 1` characters).
  error(errc code, std::string_view message) noexcept : code_(code) {
    const std::size_t n = message.size() < capacity - 1 ? message.size() : capacity - 1;
    for (std::size_t i = 0; i < n; ++i) text_[i] = message[i];
    text_[n] = '\0';
  }

  /// An error whose message ends with the offending value: "<message>, got <value>".
  error(errc code, std::string_view message, long double value) noexcept : error(code, message) {
    std::size_t n = 0;
    while (n < capacity && text_[n] != '\0') ++n;
    std::snprintf(text_.data() + n, capacity - n, ", got %.17Lg", value);
  }

  [[nodiscard]] constexpr errc code() const noexcept { return code_; }
  [[nodiscard]] const char* message() const noexcept { return text_.data(); }

  /// A number the error carries, such as the farthest reach for `out_of_reach`; 0 if none.
  [[nodiscard]] constexpr long double detail_value() const noexcept { return value_; }
  constexpr error& with_detail_value(long double v) noexcept {
    value_ = v;
    return *this;
  }

  friend constexpr bool operator==(const error& e, errc c) noexcept { return e.code_ == c; }

 private:
  errc code_ = errc::invalid_argument;
  long double value_ = 0;
  std::array<char, capacity> text_{};
};

}  // namespace lob
