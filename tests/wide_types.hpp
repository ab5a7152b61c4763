#pragma once
// The 50-digit instantiations are the costliest part of the test build. The ordinary build
// runs them (LOB_TEST_WIDE=1); the sanitizer build, which runs the same float, double and
// long double bodies under address and undefined-behaviour checks, leaves them out.
//   TEST_CASE_TEMPLATE("...", T, float, double LOB_AND_WIDE(mp50)) { ... }
#ifndef LOB_TEST_WIDE
#define LOB_TEST_WIDE 1
#endif
#if LOB_TEST_WIDE
#define LOB_AND_WIDE(...) , __VA_ARGS__
#else
#define LOB_AND_WIDE(...)
#endif
