#!/usr/bin/env bash
# Speed figures (not tests): the core estimators (build/lintel_bench) and, when the Calc
# benchmark script is there, recalculation times in a real headless Calc.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/deps.sh test
scripts/build.sh
echo "== core (median of 5 runs after a warm-up)"
build/tests/lintel_bench "${1:-}"
if [ -f tests/bench/bench_calc.py ] && [ -z "${1:-}" ]; then
  echo "== Calc (headless soffice, median of 5 recalculations)"
  /usr/bin/python3 tests/bench/bench_calc.py --oxt build/lintel.oxt
fi
