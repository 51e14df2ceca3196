#!/usr/bin/env bash
# ctest "sanitized_unit_tests": builds the unit tests with AddressSanitizer and
# UndefinedBehaviorSanitizer in <build>/sanitize and runs them, with a longer run of the
# random-argument robustness test (a memory error inside Calc would lose the user's work).
#   run_sanitized.sh <source dir> <build dir>
set -euo pipefail
src=$1
out=$2/sanitize
# -O1 -g1: the sanitizers see the same code; at -O0 the Eigen-heavy tests ran four times
# longer and full debug info slowed the build (stack traces still name files and lines).
cmake -S "$src" -B "$out" -DCMAKE_BUILD_TYPE=None -DLINTEL_BUILD_ADDIN=ON \
      -DCMAKE_CXX_FLAGS="-O1 -g1 -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined" >/dev/null
cmake --build "$out" -j 2 --target lintel_core_tests >/dev/null
LINTEL_FUZZ_ROUNDS=${LINTEL_FUZZ_ROUNDS:-2000} "$out/tests/lintel_core_tests"
