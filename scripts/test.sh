#!/usr/bin/env bash
# The test command: installs missing Debian packages, builds, runs every test (ctest: core
# unit tests, reference checks against pandas / statsmodels / R, generated-file checks, and
# the real-Calc integration tests in a throwaway headless LibreOffice).
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/deps.sh test
start=$(date +%s)
scripts/build.sh
built=$(date +%s)
# Reference checks and unit tests run two at a time; the Calc tests share one lock.
(cd build && ctest --output-on-failure -j 2)
tested=$(date +%s)
# The unit tests (with the random-argument robustness test, longer) once more under
# AddressSanitizer and UndefinedBehaviorSanitizer: a memory error in Calc loses work.
cmake -S . -B build-sanitize -DCMAKE_BUILD_TYPE=Debug \
      -DCMAKE_CXX_FLAGS="-fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined" >/dev/null
cmake --build build-sanitize -j "$(nproc)" --target lintel_core_tests
LINTEL_FUZZ_ROUNDS=2000 build-sanitize/tests/lintel_core_tests
end=$(date +%s)
echo "build: $((built - start)) s, tests: $((tested - built)) s, sanitizer run: $((end - tested)) s"
