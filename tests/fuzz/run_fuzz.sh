#!/usr/bin/env bash
# The ctests "sanitized_build", "fuzz.<harness>": libFuzzer harnesses (tests/fuzz/README.md);
# the same tree builds the unit tests that the ctest "sanitized_unit_tests" runs
# (tests/run_sanitized.sh).
#   run_fuzz.sh build <source dir> <build dir>
#       configures <build dir>/fuzz with clang, -fsanitize=address,undefined and the coverage
#       of libFuzzer for every target, and builds the harnesses and the unit tests (one
#       sanitized build of the core and the add-in logic serves both)
#   run_fuzz.sh run <source dir> <build dir> <harness> [seconds]
#       runs the harness for a bounded time (LINTEL_FUZZ_SECONDS, default 20) on its kept
#       corpus tests/fuzz/corpus/<harness> (read only); the inputs this run adds go to
#       <build dir>/fuzz/corpus/<harness>, emptied first (a corpus grown over many runs would
#       take minutes to replay before fuzzing starts); then runs every file of
#       tests/fuzz/regressions/<harness> once. A crash, a sanitizer report, an
#       uncaught exception, an input slower than 10 s or over 2 GB fails the test and leaves
#       the input in <build dir>/fuzz/artifacts.
set -euo pipefail
mode=$1 src=$2 out=$3/fuzz
cxx=${LINTEL_FUZZ_CXX:-clang++}

case "$mode" in
  build)
    if ! command -v "$cxx" >/dev/null; then
      echo "fuzz: $cxx not found: the fuzz tests need clang and libFuzzer" \
           "(scripts/deps.sh test installs clang and libclang-rt-14-dev)" >&2
      exit 1
    fi
    probe=$(mktemp -d)
    trap 'rm -rf "$probe"' EXIT
    echo 'extern "C" int LLVMFuzzerTestOneInput(const unsigned char*, unsigned long) { return 0; }' >"$probe/p.cpp"
    if ! "$cxx" -fsanitize=fuzzer,address,undefined "$probe/p.cpp" -o "$probe/p" 2>"$probe/err"; then
      cat "$probe/err" >&2
      echo "fuzz: $cxx cannot link a libFuzzer harness: install libclang-rt-14-dev" \
           "(scripts/deps.sh test)" >&2
      exit 1
    fi
    # Every undefined-behaviour check stops at its first report. -O1 -gline-tables-only: the
    # harnesses need speed; the file and line stay in the stack traces.
    flags="-fsanitize=address,undefined,fuzzer-no-link -fno-omit-frame-pointer -fno-sanitize-recover=undefined"
    flags+=" -gline-tables-only -O1"
    cmake -S "$src" -B "$out" -DCMAKE_BUILD_TYPE=None -DCMAKE_CXX_COMPILER="$cxx" \
          -DLINTEL_FUZZ=ON -DLINTEL_BUILD_TESTS=ON -DLINTEL_BUILD_ADDIN=ON \
          -DCMAKE_CXX_FLAGS="$flags" >/dev/null
    cmake --build "$out" -j 2 --target lintel_fuzz_estimators lintel_fuzz_addin_call lintel_core_tests >/dev/null
    ;;
  run)
    harness=$4 seconds=${5:-${LINTEL_FUZZ_SECONDS:-20}}
    exe=$out/tests/fuzz/lintel_$harness
    [ -x "$exe" ] || { echo "fuzz: $exe missing (the ctest sanitized_build builds it)" >&2; exit 1; }
    work=$out/corpus/$harness seeds=$src/tests/fuzz/corpus/$harness
    rm -rf "$work"
    mkdir -p "$work" "$out/artifacts"
    dict=()
    [ -f "$src/tests/fuzz/$harness.dict" ] && dict=(-dict="$src/tests/fuzz/$harness.dict")
    export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1:allocator_may_return_null=1}
    export UBSAN_OPTIONS=${UBSAN_OPTIONS:-print_stacktrace=1:halt_on_error=1}
    "$exe" "${dict[@]}" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -max_len=4096 \
           -print_final_stats=1 -artifact_prefix="$out/artifacts/$harness-" "$work" "$seeds" 2>&1 |
      grep -v '^\(#[0-9]*	\(NEW\|REDUCE\|pulse\)\|	NEW_FUNC\)' || true
    rc=${PIPESTATUS[0]}
    [ "$rc" -eq 0 ] || { echo "fuzz: $harness found a failing input (exit $rc): see above and $out/artifacts" >&2; exit 1; }
    regressions=("$src"/tests/fuzz/regressions/"$harness"/*)
    if [ -e "${regressions[0]}" ]; then
      echo "fuzz: $harness regression inputs: ${#regressions[@]}"
      "$exe" -timeout=10 -rss_limit_mb=2048 "${regressions[@]}" 2>&1 | tail -n 3
      rc=${PIPESTATUS[0]}
      [ "$rc" -eq 0 ] || { echo "fuzz: a regression input of $harness fails again" >&2; exit 1; }
    fi
    ;;
  *) echo "usage: $0 build|run <source dir> <build dir> [harness [seconds]]" >&2; exit 2 ;;
esac
