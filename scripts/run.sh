#!/usr/bin/env bash
# Builds thermargin (installing missing Debian packages first) and analyses
# the built-in default design. Extra arguments go to `thermargin budget`.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/deps.sh
cmake -S . -B build -G Ninja -DCMAKE_BUILD_TYPE=Release -DTHERMARGIN_TESTS=OFF -DTHERMARGIN_BENCHMARKS=OFF \
  -DTHERMARGIN_UNITY=ON >/dev/null
cmake --build build --target thermargin_cli -j "$(nproc)" >/dev/null
exec ./build/thermargin budget "$@"
