#!/usr/bin/env bash
# Writes the output of every command on every scenario in scenarios/, in each
# format (JSON, text and CSV; the table command's C header and CSV too; the
# fit command on every R-T data file), into a folder, so that a change meant
# to keep behaviour (a refactor, a speed-up) can be checked byte for byte
# against the output before it:
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
  for fmt in json text csv; do
    "$cli" check "$f" --format "$fmt" >"$out/$name.check.$fmt"
    "$cli" budget "$f" --format "$fmt" "${opts[@]}" >"$out/$name.budget.$fmt"
    "$cli" table "$f" --format "$fmt" >"$out/$name.table.$fmt"
    "$cli" pick "$f" --format "$fmt" --series e24 "${opts[@]}" >"$out/$name.pick.$fmt"
    catalogue=scenarios/${name}_catalogue.csv
    if [ -f "$catalogue" ]; then
      "$cli" grades "$f" --catalogue "$catalogue" --volume 10000 --format "$fmt" "${opts[@]}" >"$out/$name.grades.$fmt"
    fi
  done
  "$cli" table "$f" --emit c >"$out/$name.table_emit.h"
  "$cli" table "$f" --emit csv >"$out/$name.table_emit.csv"
done
# R-T data files (every CSV that is not a catalogue): the fit command.
for f in scenarios/*.csv; do
  case "$f" in *_catalogue.csv) continue ;; esac
  name=$(basename "$f" .csv)
  for fmt in json text csv; do
    "$cli" fit "$f" --format "$fmt" >"$out/$name.fit.$fmt"
  done
done
ls "$out" | wc -l
