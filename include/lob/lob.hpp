#pragma once
/// \file lob/lob.hpp
/// Umbrella header: includes every public header of lob. Everything is in namespace `lob`;
/// `lob::detail` may change at any time; macros start with `LOB_`.

#include "lob/version.hpp"
#include "lob/core/real.hpp"
#include "lob/core/vec.hpp"
#include "lob/core/error.hpp"
#include "lob/core/result.hpp"
#include "lob/core/units.hpp"
#include "lob/core/flight_types.hpp"
#include "lob/core/options.hpp"
#include "lob/models/traits.hpp"
#include "lob/models/vacuum.hpp"
#include "lob/models/linear_drag.hpp"
#include "lob/exact/linear_flight.hpp"
#include "lob/flight.hpp"
#include "lob/physics/air.hpp"
#include "lob/physics/atmosphere.hpp"
#include "lob/physics/body.hpp"
#include "lob/physics/sphere_drag.hpp"
#include "lob/physics/terminal_speed.hpp"
#include "lob/models/quadratic_drag.hpp"
#include "lob/models/linear_quadratic_drag.hpp"
#include "lob/integrate/dormand_prince.hpp"
#include "lob/integrate/fixed_step.hpp"
#include "lob/integrate/integrated_flight.hpp"
