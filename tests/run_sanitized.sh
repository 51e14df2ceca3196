#!/usr/bin/env bash
# ctest "sanitized_unit_tests": runs the unit tests built with AddressSanitizer and
# UndefinedBehaviorSanitizer (clang, in <build>/fuzz, by the ctest "sanitized_build":
# tests/fuzz/run_fuzz.sh build), with a longer run of the random-argument robustness test (a
# memory error inside Calc would lose the user's work).
#   run_sanitized.sh <source dir> <build dir>
set -euo pipefail
exe=$2/fuzz/tests/lintel_core_tests
[ -x "$exe" ] || { echo "sanitized: $exe missing (the ctest sanitized_build builds it)" >&2; exit 1; }
export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1}
export UBSAN_OPTIONS=${UBSAN_OPTIONS:-print_stacktrace=1:halt_on_error=1}
LINTEL_FUZZ_ROUNDS=${LINTEL_FUZZ_ROUNDS:-2000} "$exe"
