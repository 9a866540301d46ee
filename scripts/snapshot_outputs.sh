#!/usr/bin/env bash
# Writes the JSON output of every command on every scenario in scenarios/ into
# a folder, so that a change meant to keep behaviour (a refactor, a speed-up)
# can be checked byte for byte against the output before it:
#
#   bash scripts/snapshot_outputs.sh OLD_BUILD/thermargin /tmp/before
#   bash scripts/snapshot_outputs.sh build/thermargin /tmp/after
#   diff -r /tmp/before /tmp/after && echo identical
#
# The Monte Carlo runs use their scenario's seed and a fixed thread count, so
# the output depends on the program only.
set -euo pipefail
cli=$(realpath "$1")
out=$2
cd "$(dirname "$0")/.."
mkdir -p "$out"
for f in scenarios/*.ini; do
  name=$(basename "$f" .ini)
  opts=(--montecarlo.threads=2 --montecarlo.units=20000)
  "$cli" check "$f" --format json >"$out/$name.check.json"
  "$cli" budget "$f" --format json "${opts[@]}" >"$out/$name.budget.json"
  "$cli" table "$f" --format json >"$out/$name.table.json"
  "$cli" pick "$f" --format json --series e24 "${opts[@]}" >"$out/$name.pick.json"
  catalogue=scenarios/${name}_catalogue.csv
  if [ -f "$catalogue" ]; then
    "$cli" grades "$f" --catalogue "$catalogue" --volume 10000 --format json "${opts[@]}" >"$out/$name.grades.json"
  fi
done
ls "$out" | wc -l
