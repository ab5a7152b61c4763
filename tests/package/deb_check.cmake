# The Debian package works: dpkg installs it into an empty root of its own (no lob
# anywhere else), its fields are right, and a consumer finds and uses it there with
# find_package. Called by CTest with -DPACKAGE_DIR -DROOT -DCONSUMER -DWORK -DCXX.
file(GLOB debs "${PACKAGE_DIR}/liblob-dev_*_all.deb")
list(LENGTH debs count)
if(NOT count EQUAL 1)
  message(FATAL_ERROR "expected one liblob-dev .deb in ${PACKAGE_DIR} (run cpack first), found ${count}")
endif()

function(run)
  execute_process(COMMAND ${ARGN} RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err)
  if(NOT rc EQUAL 0)
    message(FATAL_ERROR "failed (${rc}): ${ARGN}\n${out}\n${err}")
  endif()
  set(out "${out}" PARENT_SCOPE)
endfunction()

run(dpkg-deb --field "${debs}" Package Architecture Depends)
foreach(want "Package: liblob-dev" "Architecture: all" "libeigen3-dev (>= 3.4)" "libboost-dev (>= 1.74)")
  string(FIND "${out}" "${want}" at)
  if(at EQUAL -1)
    message(FATAL_ERROR "the package's fields lack '${want}':\n${out}")
  endif()
endforeach()

# An empty root with just dpkg's database; the dependencies live on the host, so they are
# not installed into the root (--force-depends).
file(REMOVE_RECURSE "${ROOT}" "${WORK}")
file(MAKE_DIRECTORY "${ROOT}/var/lib/dpkg/info" "${ROOT}/var/lib/dpkg/updates" "${WORK}")
file(TOUCH "${ROOT}/var/lib/dpkg/status")
run(dpkg --root=${ROOT} --force-not-root --force-depends --force-script-chrootless
    --log=${WORK}/dpkg.log -i "${debs}")
run(dpkg --root=${ROOT} -L liblob-dev)
foreach(want "/usr/include/lob/lob.hpp" "/usr/share/cmake/lob/lobConfig.cmake" "/usr/share/pkgconfig/lob.pc")
  string(FIND "${out}" "${want}" at)
  if(at EQUAL -1)
    message(FATAL_ERROR "dpkg did not install ${want}")
  endif()
endforeach()

run(${CMAKE_CTEST_COMMAND} --build-and-test "${CONSUMER}" "${WORK}/consumer"
    --build-generator "Unix Makefiles"
    --build-options "-DCMAKE_CXX_COMPILER=${CXX}" "-DCMAKE_PREFIX_PATH=${ROOT}/usr"
                    "-DCMAKE_FIND_USE_PACKAGE_REGISTRY=OFF"
    --test-command consumer)
message(STATUS "${debs} installs into ${ROOT} and builds a consumer:\n${out}")
