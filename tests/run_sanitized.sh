#!/usr/bin/env bash
# ctest "sanitized_unit_tests": builds the unit tests with AddressSanitizer and
# UndefinedBehaviorSanitizer in <build>/sanitize and runs them, with a longer run of the
# random-argument robustness test (a memory error inside Calc would lose the user's work).
#   run_sanitized.sh <source dir> <build dir>
set -euo pipefail
src=$1
out=$2/sanitize
# -O0 -g1: unoptimised (-O1 ran the tests four times faster but built slower on two busy
# cores: the whole test command took two minutes longer); -g1 keeps file and line in the
# sanitizers' stack traces at less cost than full debug info.
cmake -S "$src" -B "$out" -DCMAKE_BUILD_TYPE=None -DLINTEL_BUILD_ADDIN=ON \
      -DCMAKE_CXX_FLAGS="-O0 -g1 -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined" >/dev/null
cmake --build "$out" -j 2 --target lintel_core_tests >/dev/null
LINTEL_FUZZ_ROUNDS=${LINTEL_FUZZ_ROUNDS:-2000} "$out/tests/lintel_core_tests"
