#!/usr/bin/env bash
# Configures and builds Lintel (core, add-in, lintel.oxt, tests) in ./build.
#   scripts/build.sh [cmake options ...]   e.g. -DLINTEL_WERROR=ON
set -euo pipefail
cd "$(dirname "$0")/.."
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release "$@" >/dev/null
cmake --build build -j "$(nproc)"
