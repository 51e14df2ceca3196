#!/usr/bin/env bash
# The test command: installs missing Debian packages, builds, runs every test (ctest: core
# unit tests, reference checks against pandas / statsmodels / R, generated-file checks, the
# libFuzzer harnesses for about 20 s each (tests/fuzz), and the real-Calc integration tests in
# a throwaway headless LibreOffice).
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/deps.sh test
start=$(date +%s)
# In CI (CI=true) warnings of our own targets are errors.
werror=OFF
if [ "${CI:-}" = true ]; then werror=ON; fi
scripts/build.sh -DLINTEL_WERROR=$werror
built=$(date +%s)
echo "build: $((built - start)) s"
# Two at a time; the sanitized tree (unit tests and fuzz harnesses) builds meanwhile.
cd build
exec ctest --output-on-failure -j 2
