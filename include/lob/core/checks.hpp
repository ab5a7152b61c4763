#pragma once
/// \file lob/core/checks.hpp
/// The input checks every factory and entry point shares: one place for "finite and > 0",
/// "finite and >= 0", and for a derived value that left the range of T.

#include <string_view>

#include "lob/core/real.hpp"
#include "lob/core/result.hpp"

namespace lob {

/// `invalid_argument` with `message` (which names the value) unless `x` is finite and > 0.
template <Real T>
[[nodiscard]] status require_positive(const T& x, std::string_view message) {
  if (!is_finite(x) || !(x > T(0))) return fail(errc::invalid_argument, message, x);
  return {};
}

/// `invalid_argument` with `message` unless `x` is finite and >= 0.
template <Real T>
[[nodiscard]] status require_non_negative(const T& x, std::string_view message) {
  if (!is_finite(x) || !(x >= T(0))) return fail(errc::invalid_argument, message, x);
  return {};
}

/// `invalid_argument` with `message` unless a value computed from valid inputs is finite,
/// and, where `positive_expected` (the inputs make it > 0), not rounded to zero: an
/// overflow or underflow of T is an error, never an infinite or vanished answer.
template <Real T>
[[nodiscard]] status require_representable(const T& x, std::string_view message,
                                           bool positive_expected = false) {
  if (!is_finite(x) || (positive_expected && !(x > T(0)))) return fail(errc::invalid_argument, message, x);
  return {};
}

/// The first failed check of several (all are evaluated; they are cheap), or success.
template <class... S>
[[nodiscard]] status first_failure(const S&... checks) {
  status out{};
  ((out = out ? status(checks) : out), ...);
  return out;
}

}  // namespace lob
