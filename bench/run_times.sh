#!/usr/bin/env bash
# Whole-run timings of thermargin on this machine, printed as a table:
# wall time, user time, peak memory, and Monte Carlo throughput in
# unit-temperature evaluations per second. Builds first if needed.
# Usage: bash bench/run_times.sh [build-dir]
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
if [ ! -x "$build/thermargin" ]; then
  cmake -S . -B "$build" -G Ninja -DCMAKE_BUILD_TYPE=Release >/dev/null
  cmake --build "$build" --target thermargin_cli >/dev/null
fi
bin="$build/thermargin"
temps=201
printf '%-52s %9s %9s %10s %14s\n' "run" "wall s" "user s" "peak MB" "evals/s"
run() {  # label units command...
  local label=$1 units=$2; shift 2
  local out
  out=$( { /usr/bin/time -f '%e %U %M' "$@" >/dev/null; } 2>&1 | tail -n 1)
  read -r wall user kb <<<"$out"
  local rate="-"
  if [ "$units" != 0 ]; then rate=$(awk -v u="$units" -v t="$temps" -v w="$wall" 'BEGIN{printf "%.3g", u*t/w}'); fi
  printf '%-52s %9s %9s %10.1f %14s\n' "$label" "$wall" "$user" "$(awk -v k="$kb" 'BEGIN{print k/1024}')" "$rate"
}
run "budget, default design, no Monte Carlo" 0 "$bin" budget --no-mc
run "budget, default design, 1e5 units, 1 thread" 100000 "$bin" budget --montecarlo.units=100000 --montecarlo.threads=1
run "budget, default design, 1e6 units, 1 thread" 1000000 "$bin" budget --montecarlo.units=1000000 --montecarlo.threads=1
run "budget, default design, 1e6 units, 2 threads" 1000000 "$bin" budget --montecarlo.units=1000000 --montecarlo.threads=2
if [ -x /usr/bin/python3 ] && /usr/bin/python3 -c 'import numpy' 2>/dev/null; then
  # For comparison: the independent, straightforwardly vectorised NumPy
  # simulation of the same chain used by the tests (one core).
  run "NumPy reference simulation, 1e5 units" 100000 /usr/bin/python3 tests/reference/mc_second_opinion.py \
    units=100000 seed=1 sigma_per_tol=3 r25=10000 r25_tol=0.01 beta=3950 beta_tol=0.01 rf=10000 rf_tol=0.01 \
    rf_tempco=1e-4 diss=0.0015 diss_tol=0.2 offset=2 gain=0.002 inl=1 noise=0.5 bits=12 v_exc=3.3 board_min=10 \
    board_max=40 resolution=0.1 t_min=-20 t_max=80 t_step=0.5 coverage=0.9973 window_min=0 window_max=60 limit=1
fi
echo "(Monte Carlo rates include the deterministic engines and the pilot; the kernel alone: build/bench/thermargin_bench)"
