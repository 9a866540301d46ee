#!/usr/bin/env bash
# The consumer test: installs the build tree's package into a fresh prefix,
# builds tests/consumer against it with find_package(thermargin), runs it,
# and compares its figures with the command-line program's on the same
# (built-in default) design.
#   run.sh BUILD_DIR CLI
set -euo pipefail
build=$1 cli=$2
here=$(cd "$(dirname "$0")" && pwd)
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
cmake --install "$build" --prefix "$work/prefix" >/dev/null
cmake -S "$here" -B "$work/build" -G Ninja -DCMAKE_BUILD_TYPE=Release -DCMAKE_PREFIX_PATH="$work/prefix" >/dev/null
cmake --build "$work/build" >/dev/null
read -r wc rss < <("$work/build/consumer")
"$cli" budget --format json --montecarlo.units=1000 --output "$work/budget.json"
/usr/bin/python3 - "$wc" "$rss" "$work/budget.json" <<'PY'
import json, sys
wc, rss, doc = float(sys.argv[1]), float(sys.argv[2]), json.load(open(sys.argv[3]))
w = doc["window"]
ok = abs(wc - w["wc_max_abs"]) <= 1e-9 * max(1.0, wc) and abs(rss - w["rss_max_abs"]) <= 1e-9 * max(1.0, rss)
print(f"consumer: worst case {wc:.6f} K, linear {rss:.6f} K; CLI {w['wc_max_abs']:.6f} K, {w['rss_max_abs']:.6f} K")
sys.exit(0 if ok else 1)
PY
