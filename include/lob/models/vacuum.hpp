#pragma once
/// \file lob/models/vacuum.hpp
/// `vacuum`: no drag at all; the textbook parabola (closed form).

#include "lob/models/traits.hpp"

namespace lob {

/// No air resistance.
template <Real T>
struct vacuum {
  [[nodiscard]] vec3<T> acceleration(const vec3<T>&) const { return vec3<T>::Zero(); }
};

template <Real T>
struct model_traits<vacuum<T>> {
  using scalar = T;
  static constexpr bool closed_form = true;
  static constexpr bool quadratic_fast_path = false;
  static T linear_rate(const vacuum<T>&) { return T(0); }
};

}  // namespace lob
