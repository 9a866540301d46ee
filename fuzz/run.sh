#!/usr/bin/env bash
# Runs every libFuzzer target for a bounded time, each from a seed corpus
# built here: the example designs in scenarios/, the R-T tables and fit data
# in tests/data/, the committed seeds in fuzz/seeds/ and engineering-notation
# numbers; every input that once made a target fail is kept in
# fuzz/regressions/TARGET/ and replayed by each run (and is a case of
# tests/bad_input_test.cpp).
#
#   bash fuzz/run.sh BUILD_DIR [SECONDS_PER_TARGET]
#
# Exits non-zero when a target finds a crash, a sanitizer report, an
# exception other than input_error, or a broken invariant; the input is left
# in BUILD_DIR/fuzz/artifacts/ and the log's tail is printed.
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:?usage: fuzz/run.sh BUILD_DIR [SECONDS]}
seconds=${2:-45}
bin=$build/fuzz
work=$build/fuzz/work
rm -rf "$work"
mkdir -p "$work/artifacts"

seed() {  # seed TARGET FILE [PREFIX_BYTE]: copy FILE into TARGET's seed corpus
  local dir=$work/seeds/$1 name
  mkdir -p "$dir"
  name=$(basename "$2")${3:+.$3}
  if [ -n "${3:-}" ]; then { printf "\\x$(printf %02x "$3")"; cat "$2"; } >"$dir/$name"; else cp "$2" "$dir/$name"; fi
}

for f in scenarios/*.ini fuzz/seeds/*.ini; do [ -e "$f" ] && seed fuzz_scenario "$f"; done
for f in scenarios/*.csv tests/data/chain/*.csv tests/data/fit/*.csv fuzz/seeds/*.rt.csv; do
  [ -e "$f" ] || continue
  seed fuzz_rt_table "$f"
  seed fuzz_fit "$f" 0
  seed fuzz_fit "$f" 7
done
for f in fuzz/seeds/*.catalogue.csv tests/data/grades/*.csv; do [ -e "$f" ] && seed fuzz_catalogue "$f"; done
# Numbers: each written value of the example designs and the interface's
# examples, read as every quantity (the first byte picks it).
mkdir -p "$work/seeds/fuzz_number"
{ sed -n 's/^[^#=]*=[[:space:]]*\([^#]*\).*/\1/p' scenarios/*.ini; cat fuzz/seeds/numbers.txt; } | sort -u | head -n 200 >"$work/numbers"
n=0
while IFS= read -r value; do
  for q in 0 1 2 3 4 5 6 7 8 9 10; do
    { printf "\\x$(printf %02x "$q")"; printf '%s' "$value"; } >"$work/seeds/fuzz_number/$n.$q"
  done
  n=$((n + 1))
done <"$work/numbers"

# One target: its run, then one line (or the log's tail on a finding).
run_target() {
  local target=$1 corpus=$work/corpus/$1 log=$work/$1.log start=$SECONDS dict=()
  mkdir -p "$corpus" "$work/seeds/$target"
  [ -f "fuzz/$target.dict" ] && dict=(-dict="fuzz/$target.dict")
  # Inputs that once found something are replayed first, every run.
  mkdir -p "fuzz/regressions/$target"
  if "$bin/$target" "${dict[@]}" -max_total_time="$seconds" -timeout=20 -rss_limit_mb=2560 -max_len=8192 \
       -print_final_stats=1 -artifact_prefix="$work/artifacts/$target-" \
       "$corpus" "$work/seeds/$target" "fuzz/regressions/$target" >"$log" 2>&1; then
    local runs
    runs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log")
    echo "$target: ${runs:-?} inputs in $((SECONDS - start)) s, no finding"
  else
    echo "$target: FINDING after $((SECONDS - start)) s; input kept in $work/artifacts/$target-*; end of the log:"
    tail -n 40 "$log"
    return 1
  fi
}

# The targets run side by side, as many at a time as there are cores (at
# most THERMARGIN_FUZZ_JOBS); each is one process on one core.
jobs=${THERMARGIN_FUZZ_JOBS:-$(nproc)}
status=0
running=0
for target in fuzz_number fuzz_scenario fuzz_rt_table fuzz_fit fuzz_catalogue; do
  if [ "$running" -ge "$jobs" ]; then
    wait -n || status=1
    running=$((running - 1))
  fi
  run_target "$target" &
  running=$((running + 1))
done
while [ "$running" -gt 0 ]; do
  wait -n || status=1
  running=$((running - 1))
done
exit $status
