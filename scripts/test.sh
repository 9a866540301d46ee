#!/usr/bin/env bash
# Builds thermargin with its tests (installing missing Debian packages
# first) and runs the whole test suite with CTest.
set -euo pipefail
cd "$(dirname "$0")/.."
THERMARGIN_TEST_EXTRAS=1 bash scripts/deps.sh
cmake -S . -B build -G Ninja -DCMAKE_BUILD_TYPE=Release -DTHERMARGIN_TESTS=ON -DTHERMARGIN_BENCHMARKS=ON >/dev/null
cmake --build build -j "$(nproc)"
ctest --test-dir build --output-on-failure -j "$(nproc)"
