# Install rules: headers, an exported lob::lob target with lobConfig.cmake and a version
# file, a build-tree export, and a pkg-config file.
include(GNUInstallDirs)
include(CMakePackageConfigHelpers)

set(LOB_INSTALL_CMAKEDIR "${CMAKE_INSTALL_DATADIR}/cmake/lob" CACHE STRING
    "Where lobConfig.cmake is installed")

install(TARGETS lob EXPORT lobTargets FILE_SET HEADERS)
install(EXPORT lobTargets NAMESPACE lob:: DESTINATION "${LOB_INSTALL_CMAKEDIR}")

configure_package_config_file(cmake/lobConfig.cmake.in
  "${PROJECT_BINARY_DIR}/lobConfig.cmake"
  INSTALL_DESTINATION "${LOB_INSTALL_CMAKEDIR}")
# Header-only and architecture-independent: any 32- or 64-bit consumer may use it.
write_basic_package_version_file("${PROJECT_BINARY_DIR}/lobConfigVersion.cmake"
  COMPATIBILITY SameMinorVersion ARCH_INDEPENDENT)
install(FILES "${PROJECT_BINARY_DIR}/lobConfig.cmake" "${PROJECT_BINARY_DIR}/lobConfigVersion.cmake"
  DESTINATION "${LOB_INSTALL_CMAKEDIR}")

# Build-tree export: find_package(lob) works against a build directory too.
export(EXPORT lobTargets NAMESPACE lob:: FILE "${PROJECT_BINARY_DIR}/lobTargets.cmake")

configure_file(cmake/lob.pc.in "${PROJECT_BINARY_DIR}/lob.pc" @ONLY)
install(FILES "${PROJECT_BINARY_DIR}/lob.pc" DESTINATION "${CMAKE_INSTALL_DATADIR}/pkgconfig")
