#!/bin/sh
# lob quick start: installs what is missing (Debian 12, as root), builds, and runs
#   ./quickstart.sh demo   the demo (a practice-ball machine; writes training_ground.svg)
#   ./quickstart.sh test   the whole test suite (CTest)
#   ./quickstart.sh test --quick   the suite without the 50-digit instances and the long
#                          sweeps (CTest label long): about half the build time
set -eu
cd "$(dirname "$0")"

packages="cmake g++ make pkg-config libeigen3-dev libboost-dev doctest-dev"
install_line="apt-get update && apt-get install -y --no-install-recommends"

usage() {
  echo "usage: ./quickstart.sh demo | test [--quick]" >&2
  exit 2
}
case "$*" in demo | test | "test --quick") ;; *) usage ;; esac

if command -v dpkg-query >/dev/null 2>&1 && command -v apt-get >/dev/null 2>&1; then
  missing=""
  for p in $packages; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
  done
  if [ -n "$missing" ]; then
    if [ "$(id -u)" -ne 0 ]; then
      echo "lob: these Debian packages are missing:$missing" >&2
      echo "lob: install them as root, then run this again:" >&2
      echo "  $install_line$missing" >&2
      exit 1
    fi
    echo "lob: installing$missing"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq --no-install-recommends $missing
  fi
else
  # Not Debian: lob cannot install for you. Go on only if the tools are there; CMake
  # names any library that is still missing.
  if ! command -v cmake >/dev/null 2>&1 || ! command -v c++ >/dev/null 2>&1; then
    echo "lob: this is not a Debian system, so nothing was installed." >&2
    echo "lob: needed: a C++20 compiler, CMake >= 3.25, Eigen >= 3.4, Boost >= 1.74 (headers), doctest." >&2
    echo "lob: on Debian 12 that is (as root):  $install_line $packages" >&2
    exit 1
  fi
fi

# The build is most of the time: compile on every core.
CMAKE_BUILD_PARALLEL_LEVEL=${CMAKE_BUILD_PARALLEL_LEVEL:-$(nproc 2>/dev/null || echo 2)}
export CMAKE_BUILD_PARALLEL_LEVEL

case "$*" in
  demo)
    cmake --preset dev >/dev/null
    cmake --build --preset dev --target training_ground
    ./build/dev/examples/training_ground training_ground.svg
    ;;
  test)
    cmake --workflow --preset dev
    ;;
  "test --quick")
    cmake --workflow --preset quick
    ;;
esac
