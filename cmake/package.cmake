# A Debian package of the installed tree (`cpack -G DEB`): headers, CMake package files
# and the pkg-config file, architecture-independent, depending on the Debian packages of
# lob's two dependencies.
set(CPACK_GENERATOR DEB)
set(CPACK_PACKAGE_NAME liblob-dev)
set(CPACK_PACKAGE_VENDOR "lob developers")
set(CPACK_PACKAGE_CONTACT "lob developers <lob@example.invalid>")
set(CPACK_PACKAGE_DESCRIPTION_SUMMARY "${PROJECT_DESCRIPTION}")
set(CPACK_RESOURCE_FILE_LICENSE "${PROJECT_SOURCE_DIR}/LICENSE")
set(CPACK_PACKAGING_INSTALL_PREFIX /usr)
set(CPACK_DEBIAN_FILE_NAME DEB-DEFAULT)
set(CPACK_DEBIAN_PACKAGE_ARCHITECTURE all)
set(CPACK_DEBIAN_PACKAGE_SECTION libdevel)
set(CPACK_DEBIAN_PACKAGE_DEPENDS "libeigen3-dev (>= 3.4), libboost-dev (>= 1.74)")
set(CPACK_DEBIAN_PACKAGE_HOMEPAGE "${PROJECT_HOMEPAGE_URL}")
set(CPACK_PACKAGE_DIRECTORY "${PROJECT_BINARY_DIR}/package")
include(CPack)
