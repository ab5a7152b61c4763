# Builds tests/consumer/main.cpp with nothing but `pkg-config --cflags lob` against an
# installed copy, then runs it. Called by CTest with -DPREFIX, -DCXX, -DSOURCE, -DWORK.
set(ENV{PKG_CONFIG_PATH} "${PREFIX}/share/pkgconfig")
execute_process(COMMAND pkg-config --cflags lob OUTPUT_VARIABLE flags RESULT_VARIABLE rc
                OUTPUT_STRIP_TRAILING_WHITESPACE)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "pkg-config --cflags lob failed (${rc})")
endif()
separate_arguments(flags UNIX_COMMAND "${flags}")
file(MAKE_DIRECTORY "${WORK}")
execute_process(COMMAND "${CXX}" ${flags} "${SOURCE}" -o "${WORK}/consumer_pc" RESULT_VARIABLE rc)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "compiling with pkg-config flags (${flags}) failed")
endif()
execute_process(COMMAND "${WORK}/consumer_pc" RESULT_VARIABLE rc)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "the pkg-config consumer returned ${rc}")
endif()
