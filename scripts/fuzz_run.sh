#!/bin/sh
# Builds lob's libFuzzer harnesses (tests/fuzz) with clang++ in BUILD_DIR and runs each
# for SECONDS seconds on a copy of its committed corpus, one fuzzer process at a time.
# Prints the executions of each harness; fails on a finding (the reproducer is written
# to BUILD_DIR/findings/), or with --report only prints it (CI: new findings of a random
# search are reported for the issue list, while the committed reproducers, replayed by the
# sanitizer build's tests, are what must pass).
#   scripts/fuzz_run.sh <seconds-per-harness> [build-dir] [--report]   (default build-dir: build/fuzz)
set -eu
seconds=${1:?usage: scripts/fuzz_run.sh <seconds-per-harness> [build-dir] [--report]}
source_dir=$(cd "$(dirname "$0")/.." && pwd)
build_dir=${2:-"$source_dir/build/fuzz"}
report_only=${3:-}
harnesses="fuzz_flight fuzz_solve fuzz_physics fuzz_step"

# -O1 with line tables only: full debug info costs more compile time than the short CI
# run spends fuzzing, and the sanitizers' reports still name file and line.
cmake -S "$source_dir" -B "$build_dir" -DCMAKE_CXX_COMPILER=clang++ -DCMAKE_BUILD_TYPE=Release \
  "-DCMAKE_CXX_FLAGS_RELEASE=-O1 -gline-tables-only" \
  -DLOB_BUILD_FUZZERS=ON -DLOB_BUILD_EXAMPLES=OFF -DLOB_INSTALL=OFF -DLOB_TEST_WIDE_TYPES=OFF \
  "-DCMAKE_CXX_FLAGS=-Wall -Wextra -Wpedantic -Werror" >/dev/null
# shellcheck disable=SC2086
cmake --build "$build_dir" --parallel "$(nproc)" --target $harnesses

mkdir -p "$build_dir/findings"
status=0
for h in $harnesses; do
  work="$build_dir/corpus-run/$h"
  rm -rf "$work" && mkdir -p "$work"
  cp "$source_dir/tests/fuzz/corpus/$h/"* "$work/"
  log="$build_dir/$h.log"
  # -timeout: a single input over 10 s is a finding too (the harness itself stops any
  # library call over 2 s).
  if "$build_dir/tests/fuzz/$h" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
      -print_final_stats=1 -artifact_prefix="$build_dir/findings/$h-" "$work" >"$log" 2>&1; then
    result=ok
  else
    result=FINDING
    status=1
    grep -a -m2 -A1 "broken promise\|ERROR:\|runtime error" "$log" || true
  fi
  runs=$(grep -a "stat::number_of_executed_units" "$log" | awk '{print $2}')
  # A run stopped by a finding prints no final stats: its last status line counts.
  [ -n "$runs" ] || runs=$(grep -a -o "^#[0-9]*" "$log" | tail -1 | tr -d '#')
  echo "$h: ${runs:-?} executions in ${seconds} s: $result"
done
if [ "$status" -ne 0 ] && [ "$report_only" = "--report" ]; then
  echo "fuzz: findings reported above, reproducers in $build_dir/findings/ (--report: not a failure)"
  exit 0
fi
exit $status
