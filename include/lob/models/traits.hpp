#pragma once
/// \file lob/models/traits.hpp
/// The drag-model interface: `model_traits<M>` and the `DragModel` concept.
///
/// A drag model is any type with traits whose `acceleration(v_air)` gives the drag
/// acceleration [m/s^2] for the velocity relative to the air [m/s]. The simplest way to
/// make one is a type with a nested `scalar_type`:
/// \code
///   struct my_drag { using scalar_type = double;
///                    lob::vec3<double> acceleration(const lob::vec3<double>& v) const; };
/// \endcode
/// Such a model gets integrated flight and every solver. Models with closed forms
/// specialise `model_traits` with `closed_form = true` and `linear_rate(m)`.

#include <concepts>

#include "lob/core/real.hpp"
#include "lob/core/result.hpp"
#include "lob/core/vec.hpp"

namespace lob {

/// Facts about a drag model. The primary template serves user types with a nested
/// `scalar_type`; lob's own models specialise it.
template <class M>
struct model_traits {};

template <class M>
  requires requires { typename M::scalar_type; }
struct model_traits<M> {
  using scalar = typename M::scalar_type;
  static constexpr bool closed_form = false;       ///< exact/ path (vacuum, linear drag)
  static constexpr bool quadratic_fast_path = false;  ///< hodograph path in still air
};

/// The scalar type of a model.
template <class M>
using scalar_of = typename model_traits<M>::scalar;

/// A drag model: traits with a `Real` scalar, and a drag acceleration for an air velocity.
template <class M>
concept DragModel = requires { typename model_traits<M>::scalar; } && Real<scalar_of<M>> &&
                    requires(const M& m, const vec3<scalar_of<M>>& v_air) {
                      { m.acceleration(v_air) } -> std::convertible_to<vec3<scalar_of<M>>>;
                    };

/// Checks a model's parameters: calls `m.check()` where the model has one.
template <DragModel M>
[[nodiscard]] status check_model(const M& m) {
  if constexpr (requires { { m.check() } -> std::convertible_to<status>; }) {
    return m.check();
  } else {
    return {};
  }
}

}  // namespace lob
