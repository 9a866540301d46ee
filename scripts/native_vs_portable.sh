#!/usr/bin/env bash
# Holds that the build tuned for this machine's vector unit (THERMARGIN_NATIVE,
# the default) and the portable build give the same bits: builds both CLIs
# (build/ and build-portable/, reused) and compares byte for byte the JSON of
# `budget` (nominal, worst case, linear budget and a Monte Carlo of 20 000
# units) on the default design and every scenario in scenarios/.
# Usage: bash scripts/native_vs_portable.sh   (exit 1 on the first difference)
set -euo pipefail
cd "$(dirname "$0")/.."
launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)
for variant in native portable; do
  dir=build; flag=ON
  [ "$variant" = portable ] && { dir=build-portable; flag=OFF; }
  cmake -S . -B "$dir" -G Ninja -DCMAKE_BUILD_TYPE=Release -DTHERMARGIN_NATIVE=$flag "${launcher[@]}" >/dev/null
  cmake --build "$dir" --target thermargin_cli >/dev/null
done
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
n=0
for design in "" scenarios/*.ini; do
  name=$(basename "${design:-default}" .ini)
  for dir in build build-portable; do
    "$dir/thermargin" budget $design --format json --quiet --montecarlo.units=20000 >"$out/$name.$dir.json" || true
  done
  [ -s "$out/$name.build.json" ] || { echo "no budget output for $name"; exit 1; }
  if ! cmp -s "$out/$name.build.json" "$out/$name.build-portable.json"; then
    echo "native and portable builds differ on $name:"
    cmp "$out/$name.build.json" "$out/$name.build-portable.json" || true
    exit 1
  fi
  n=$((n + 1))
done
echo "native and portable builds agree byte for byte on $n designs ($(grep -m1 -o -w -E 'avx512f|avx2' /proc/cpuinfo | head -1) host)"
