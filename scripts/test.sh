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
end=$(date +%s)
echo "build: $((built - start)) s, tests: $((end - built)) s"
