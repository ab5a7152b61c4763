#pragma once
/// \file lob/version.hpp
/// The single source of lob's version; CMake reads the three numbers from here.

#define LOB_VERSION_MAJOR 0
#define LOB_VERSION_MINOR 1
#define LOB_VERSION_PATCH 0

namespace lob {
/// The library version as major * 10000 + minor * 100 + patch.
inline constexpr int version = LOB_VERSION_MAJOR * 10000 + LOB_VERSION_MINOR * 100 + LOB_VERSION_PATCH;
}  // namespace lob
