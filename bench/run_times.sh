#!/usr/bin/env bash
# Whole-run timings of thermargin on this machine, printed as a table: wall
# time, user time, peak memory, and for Monte Carlo runs the throughput in
# unit-temperature evaluations per second. The rows are the runs a user
# makes (docs/engines.md, "Speed", keeps the figures with the machine and
# its load): budget on the built-in default design, with and without the
# ADC noise, on 1 and 2 threads; a Pt1000 design, and each sensor in the
# other's chain; an R-T table sensor and its beta NTC; the worst case of a
# 14-input design; grades over 54 combinations of a Pt1000 design; pick over
# E96 on the 14-input design; and the independent NumPy simulation of the
# default design for comparison. Builds first if needed.
# Usage: bash bench/run_times.sh [build-dir]
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
if [ ! -x "$build/thermargin" ]; then
  cmake -S . -B "$build" -G Ninja -DCMAKE_BUILD_TYPE=Release >/dev/null
  cmake --build "$build" --target thermargin_cli >/dev/null
fi
bin="$build/thermargin"
times=$(mktemp)
trap 'rm -f "$times"' EXIT
echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ *//'), load average $(cut -d' ' -f1-3 /proc/loadavg)"
printf '%-60s %8s %8s %8s %12s\n' "run" "wall s" "user s" "peak MB" "evals/s"
run() {  # label units temperatures command...  (units 0: no rate)
  local label=$1 units=$2 temps=$3
  shift 3
  local wall user kb
  /usr/bin/time -o "$times" -f '%e %U %M' "$@" >/dev/null 2>&1 || true  # budget exits 3 only with --strict
  # GNU time writes "Command exited with non-zero status N" first for a failing run.
  if [ "$(wc -l <"$times")" -gt 1 ]; then
    printf '%-60s %s\n' "$label" "FAILED: $(head -n 1 "$times")"
    return
  fi
  read -r wall user kb <"$times"
  local rate="-"
  if [ "$units" != 0 ]; then rate=$(awk -v u="$units" -v t="$temps" -v w="$wall" 'BEGIN{printf "%.3g", u*t/w}'); fi
  printf '%-60s %8s %8s %8.1f %12s\n' "$label" "$wall" "$user" "$(awk -v k="$kb" 'BEGIN{print k/1024}')" "$rate"
}
default_t=201  # -20..80 degC in 0.5 K steps
pt1000=scenarios/hot_plate_pt1000.ini
pt1000_t=251   # 0..250 degC in 1 K steps
q=--quiet
run "budget, default design, no Monte Carlo" 0 0 "$bin" budget --no-mc $q
run "budget, default design, 1e5 units, 1 thread" 100000 $default_t "$bin" budget --montecarlo.units=100000 --montecarlo.threads=1 $q
run "budget, default design, 1e6 units, 1 thread" 1000000 $default_t "$bin" budget --montecarlo.units=1000000 --montecarlo.threads=1 $q
run "budget, default design, 1e6 units, 2 threads" 1000000 $default_t "$bin" budget --montecarlo.units=1000000 --montecarlo.threads=2 $q
run "budget, default design, no ADC noise, 1e6 units, 1 thread" 1000000 $default_t "$bin" budget --adc.noise=0 --montecarlo.units=1000000 --montecarlo.threads=1 $q
run "budget, Pt1000 (exact conversion), 1e5 units, 1 thread" 100000 $pt1000_t "$bin" budget $pt1000 --montecarlo.units=100000 --montecarlo.threads=1 $q
# The sensor's own cost with the rest of the chain held (docs/engines.md,
# "RTD at NTC speed"): the hot plate with an NTC in its place, and the
# default design with a Pt1000 in its NTC's place (about 2 K of self-heating).
run "budget, the Pt1000 design with a 1 kOhm NTC in place, 1e5 units" 100000 $pt1000_t "$bin" budget $pt1000 \
  --sensor.model=beta --sensor.r25=1k --sensor.beta=3950 --sensor.r25_tol=1% --sensor.beta_tol=1% \
  --montecarlo.units=100000 --montecarlo.threads=1 $q
run "budget, default design with a Pt1000 in place, 1e5 units, 1 thread" 100000 $default_t "$bin" budget \
  --sensor.model=rtd --sensor.r0=1k --sensor.rtd_class=B --divider.r_fixed=1k --firmware.conversion=exact \
  --montecarlo.units=100000 --montecarlo.threads=1 $q
# A table sensor with limit columns, and the same chain with the beta NTC
# that `thermargin fit` gives for its table (BM_MonteCarloBlockKernelFreezer*).
freezer=scenarios/freezer_probe_limits.ini
freezer_t=101  # -40..10 degC in 0.5 K steps
run "budget, freezer R-T table with limit columns, 1e5 units, 1 thread" 100000 $freezer_t "$bin" budget $freezer \
  --montecarlo.units=100000 --montecarlo.threads=1 $q
run "budget, the freezer with its beta NTC in place, 1e5 units" 100000 $freezer_t "$bin" budget $freezer \
  --sensor.model=beta --sensor.r25=10k --sensor.beta=3972.53 --sensor.r25_tol=0.777% --sensor.beta_tol=0.914% \
  --montecarlo.units=100000 --montecarlo.threads=1 $q
run "budget, 14 active inputs (2^14 corners), no Monte Carlo" 0 0 "$bin" budget bench/fourteen_inputs.ini --no-mc --montecarlo.threads=2 $q
run "grades, Pt1000, 54 combinations, 1e4 units each" 0 0 "$bin" grades $pt1000 --catalogue bench/pt1000_oven_catalogue.csv --units 10000 --volume 10000 $q
run "pick --series e96, 14 active inputs" 0 0 "$bin" pick bench/fourteen_inputs.ini --series e96 $q
if [ -x /usr/bin/python3 ] && /usr/bin/python3 -c 'import numpy' 2>/dev/null; then
  # For comparison: the independent, straightforwardly vectorised NumPy
  # simulation of the same chain used by the tests (one core).
  run "NumPy reference simulation, default design, 1e5 units" 100000 $default_t /usr/bin/python3 tests/reference/mc_second_opinion.py \
    units=100000 seed=1 sigma_per_tol=3 r25=10000 r25_tol=0.01 beta=3950 beta_tol=0.01 rf=10000 rf_tol=0.01 \
    rf_tempco=1e-4 diss=0.0015 diss_tol=0.2 offset=2 gain=0.002 inl=1 noise=0.5 bits=12 v_exc=3.3 board_min=10 \
    board_max=40 resolution=0.1 t_min=-20 t_max=80 t_step=0.5 coverage=0.9973 window_min=0 window_max=60 limit=1
fi
echo "(Monte Carlo rates are whole runs: the deterministic engines and the pilot included; the kernel alone: $build/bench/thermargin_bench)"
echo "(the whole test suite, bash scripts/test.sh on a fresh clone, is timed by CI; docs/checks.md)"
