#pragma once
/// \file lob/flight.hpp
/// `lob::fly()`: the one entry point. Picks the exact closed forms when the model's traits
/// offer them, numerical flight otherwise.

#include "lob/core/flight_types.hpp"
#include "lob/core/options.hpp"
#include "lob/core/result.hpp"
#include "lob/exact/linear_flight.hpp"
#include "lob/integrate/integrated_flight.hpp"
#include "lob/models/linear_drag.hpp"
#include "lob/models/linear_quadratic_drag.hpp"
#include "lob/models/quadratic_drag.hpp"
#include "lob/models/traits.hpp"
#include "lob/models/vacuum.hpp"

namespace lob {

/// Flies `model` through `air` from `launch`. Returns a trajectory value whose queries
/// (`at`, `apex`, `crossing`, `landing`, `range`) are `const` and allocation-free.
/// Closed-form models (vacuum, linear drag) give a `linear_flight<T>`, which honours
/// `options.max_time` (the rest of `options` only matters for integrated models). Every other model
/// (quadratic_drag, linear_quadratic_drag, any user type satisfying `DragModel`) gives a
/// `result<integrated_flight<M>>` with the same queries plus `sample()`
/// (lob/integrate/integrated_flight.hpp).
template <DragModel M>
[[nodiscard]] auto fly(const M& model, const medium<scalar_of<M>>& air,
                       const shot<scalar_of<M>>& launch,
                       const flight_options<scalar_of<M>>& options = {}) {
  using T = scalar_of<M>;
  if constexpr (model_traits<M>::closed_form) {
    using trajectory = linear_flight<T>;
    const status ok = check_model(model);
    if (!ok) return result<trajectory>(unexpected<error>(ok.error()));
    return trajectory::make(model_traits<M>::linear_rate(model), air, launch, options.max_time);
  } else {
    return integrated_flight<M>::make(model, air, launch, options);
  }
}

}  // namespace lob
