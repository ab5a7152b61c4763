#pragma once
/// \file lob/core/result.hpp
/// `lob::result<T>`: a value or a `lob::error`. It is `std::expected<T, lob::error>` where
/// the standard library has it (C++23), otherwise a small type with the same member names.

#include <type_traits>
#include <utility>
#if __has_include(<version>)
#include <version>
#endif

#include "lob/core/error.hpp"

#if defined(__cpp_lib_expected) && __cpp_lib_expected >= 202202L
#include <expected>
#define LOB_HAS_STD_EXPECTED 1
#else
#include <cstdlib>
#include <new>
#define LOB_HAS_STD_EXPECTED 0
#endif

namespace lob {

#if LOB_HAS_STD_EXPECTED

template <class T>
using result = std::expected<T, error>;
using std::unexpected;

#else

/// Wraps an error on its way into a `result` (the shape of `std::unexpected`).
template <class E>
class unexpected {
 public:
  constexpr explicit unexpected(E e) noexcept : error_(std::move(e)) {}
  [[nodiscard]] constexpr const E& error() const& noexcept { return error_; }

 private:
  E error_;
};
template <class E>
unexpected(E) -> unexpected<E>;

namespace detail {
// Misuse (reading the value of an error) cannot throw here; stop at once instead of UB.
[[noreturn]] inline void bad_result_access() noexcept { std::abort(); }
}  // namespace detail

/// A value of type `T` or an `error`; the subset of `std::expected<T, error>` lob uses.
template <class T>
class [[nodiscard]] result {
 public:
  using value_type = T;
  using error_type = lob::error;

  constexpr result(const T& v) : ok_(true), value_(v) {}  // NOLINT: implicit like expected
  constexpr result(T&& v) : ok_(true), value_(std::move(v)) {}  // NOLINT
  template <class U>
    requires std::is_convertible_v<const U&, T> && (!std::is_same_v<std::remove_cvref_t<U>, T>)
  constexpr result(const U& v) : ok_(true), value_(v) {}  // NOLINT
  constexpr result(const unexpected<error>& e) : ok_(false), error_(e.error()) {}  // NOLINT

  result(const result& o) : ok_(o.ok_) {
    if (ok_) ::new (&value_) T(o.value_);
    else ::new (&error_) lob::error(o.error_);
  }
  result& operator=(const result& o) {
    if (this != &o) {
      destroy();
      ok_ = o.ok_;
      if (ok_) ::new (&value_) T(o.value_);
      else ::new (&error_) lob::error(o.error_);
    }
    return *this;
  }
  ~result() { destroy(); }

  [[nodiscard]] constexpr bool has_value() const noexcept { return ok_; }
  constexpr explicit operator bool() const noexcept { return ok_; }

  [[nodiscard]] constexpr const T& value() const& {
    if (!ok_) detail::bad_result_access();
    return value_;
  }
  [[nodiscard]] constexpr T& value() & {
    if (!ok_) detail::bad_result_access();
    return value_;
  }
  [[nodiscard]] constexpr const lob::error& error() const& noexcept { return error_; }
  constexpr const T& operator*() const& noexcept { return value_; }
  constexpr T& operator*() & noexcept { return value_; }
  constexpr const T* operator->() const noexcept { return &value_; }
  constexpr T* operator->() noexcept { return &value_; }
  template <class U>
  [[nodiscard]] constexpr T value_or(U&& fallback) const& {
    return ok_ ? value_ : static_cast<T>(std::forward<U>(fallback));
  }

 private:
  void destroy() noexcept {
    if (ok_) value_.~T();
    else error_.~error();
  }
  bool ok_;
  union {
    T value_;
    lob::error error_;
  };
};

/// `result<void>`: success or an error.
template <>
class [[nodiscard]] result<void> {
 public:
  using value_type = void;
  using error_type = lob::error;
  constexpr result() noexcept = default;
  constexpr result(const unexpected<lob::error>& e) noexcept : ok_(false), error_(e.error()) {}  // NOLINT
  [[nodiscard]] constexpr bool has_value() const noexcept { return ok_; }
  constexpr explicit operator bool() const noexcept { return ok_; }
  [[nodiscard]] constexpr const lob::error& error() const& noexcept { return error_; }

 private:
  bool ok_ = true;
  lob::error error_{};
};

#endif

/// Success or an error, for checks that produce no value.
using status = result<void>;

/// Shorthand for `unexpected(error(code, message))`.
[[nodiscard]] inline unexpected<error> fail(errc code, std::string_view message) noexcept {
  return unexpected<error>(error(code, message));
}
/// Shorthand for `unexpected(error(code, message, value))`: the message names the value.
template <class V>
[[nodiscard]] unexpected<error> fail(errc code, std::string_view message, const V& value) noexcept {
  return unexpected<error>(error(code, message, static_cast<long double>(value)));
}

}  // namespace lob
