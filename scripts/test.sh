#!/usr/bin/env bash
# Builds thermargin with its tests (installing missing Debian packages
# first) and runs the whole test suite with CTest; then the hardening steps:
#
#   1. build/       Release build, every test (ctest)
#   2. build-asan/  clang: every test again under AddressSanitizer + UndefinedBehaviorSanitizer
#   3. build-tsan/  the Monte Carlo and worst-case engines' tests, and the CLI
#                   runs across thread counts, under ThreadSanitizer (in shards,
#                   one per core)
#   4. build-asan/  each libFuzzer target (built in step 2, the same sanitizers) for
#                   THERMARGIN_FUZZ_SECONDS (default 40), as many side by side as there are cores
#
# A failing step stops the script with a non-zero status. THERMARGIN_QUICK=1
# runs step 1 only. Build directories are reused, and ccache (when present)
# keeps compiled objects between runs.
set -euo pipefail
cd "$(dirname "$0")/.."
THERMARGIN_TEST_EXTRAS=1 bash scripts/deps.sh
jobs=$(( $(nproc) < 2 ? $(nproc) : 2 ))
fuzz_seconds=${THERMARGIN_FUZZ_SECONDS:-40}
launcher=()
if command -v ccache >/dev/null; then
  launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)
  # Objects are shared between checkouts in other folders (CI clones afresh);
  # a unity source names its files by their full paths, so those objects are
  # shared only between checkouts in the same folder.
  export CCACHE_BASEDIR=$PWD CCACHE_NOHASHDIR=1
  # The tests' precompiled header is cacheable only with these (ccache's manual, "Precompiled headers").
  export CCACHE_SLOPPINESS=pch_defines,time_macros,include_file_mtime,include_file_ctime
fi
started=$SECONDS
summary=()

# Runs a step, printing its name before and its time after.
step() {
  local name=$1 t0=$SECONDS
  shift
  echo "=== $name"
  "$@"
  summary+=("$name: passed in $((SECONDS - t0)) s")
  echo "=== $name: passed in $((SECONDS - t0)) s"
}

# Every build here is a fresh one on CI: the library, the CLI and the tests
# are compiled eight files to a unit (THERMARGIN_UNITY, CMakeLists.txt),
# in about 60 % of the processor time of one file at a time.
configure() {  # configure DIR [cmake options...]
  local dir=$1
  shift
  cmake -S . -B "$dir" -G Ninja "${launcher[@]}" -DTHERMARGIN_UNITY=ON "$@" >/dev/null
}

# The bad-input catalogue prints its count; ctest keeps every test's output in LastTest.log.
catalogue_line() {
  grep -h -m1 "^bad-input catalogue:" "$1/Testing/Temporary/LastTest.log" ||
    { echo "the bad-input catalogue did not run" >&2; return 1; }
}

release() {
  configure build -DCMAKE_BUILD_TYPE=Release -DTHERMARGIN_TESTS=ON -DTHERMARGIN_BENCHMARKS=ON
  cmake --build build -j "$jobs"
  ctest --test-dir build --output-on-failure -j "$jobs"
  catalogue_line build
}

# Sanitizer reports end the program (-fno-sanitize-recover=all), so a test
# that meets one fails; the CLI the tests start is built the same way.
export ASAN_OPTIONS=detect_leaks=1:strict_string_checks=1
export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
export TSAN_OPTIONS=halt_on_error=1:second_deadlock_stack=1

# One clang build for the sanitizer run and the fuzzers: the library, the
# CLI, every test and the libFuzzer targets, all with ASan + UBSan (the
# library's readers also carry libFuzzer's coverage hooks, docs/checks.md).
asan() {
  # -O1, as the sanitizer's own guide suggests: most of this step is
  # compiling the whole test program a second time, and -O1 compiles it
  # markedly faster than -O2 while the tests still run at a fair speed.
  CC=clang CXX=clang++ configure build-asan -DCMAKE_BUILD_TYPE=RelWithDebInfo "-DCMAKE_CXX_FLAGS_RELWITHDEBINFO=-O1 -DNDEBUG" \
    -DTHERMARGIN_SANITIZE=address,undefined -DTHERMARGIN_NATIVE=OFF -DTHERMARGIN_TESTS=ON -DTHERMARGIN_BENCHMARKS=OFF \
    -DTHERMARGIN_FUZZ=ON
  cmake --build build-asan -j "$jobs"
  ctest --test-dir build-asan --output-on-failure -j "$jobs"
  catalogue_line build-asan
}

# The threaded engines under ThreadSanitizer: the library and the CLI built
# with -fsanitize=thread, and only the tests that thread them compiled
# against it (saving a third build of the whole test program).
tsan_tests=(monte_carlo_test worst_case_test budget_cli_test determinism_test)
tsan() {
  configure build-tsan -DCMAKE_BUILD_TYPE=RelWithDebInfo -DTHERMARGIN_SANITIZE=thread \
    -DTHERMARGIN_NATIVE=OFF -DTHERMARGIN_TESTS=OFF -DTHERMARGIN_BENCHMARKS=OFF
  cmake --build build-tsan -j "$jobs"
  local out=build-tsan/engine_tests
  local cxx=(c++ -std=c++20 -O1 -g1 -fsanitize=thread -fno-sanitize-recover=all -fno-omit-frame-pointer
    -Ilib/include -Itests -I/usr/include/eigen3 "-DTHERMARGIN_SOURCE_DIR=\"$PWD\""
    "-DTHERMARGIN_CLI=\"$PWD/build-tsan/thermargin\"" "-DTHERMARGIN_PYTHON=\"/usr/bin/python3\""
    -DTHERMARGIN_SANITIZER_SUBSET)  # the covering subset of scenarios, as in step 2 (docs/checks.md)
  [ ${#launcher[@]} -eq 0 ] || cxx=(ccache "${cxx[@]}")
  mkdir -p "$out"
  printf '%s\n' "${tsan_tests[@]}" | xargs -P "$jobs" -I{} "${cxx[@]}" -c tests/{}.cpp -o "$out/{}.o"
  local objects=("${tsan_tests[@]/#/$out/}")
  "${cxx[@]}" "${objects[@]/%/.o}" build-tsan/lib/libthermargin.a -lboost_program_options \
    -lgtest -lgtest_main -pthread -o "$out/engine_tests"
  # One test program, its tests shared out between the cores (GoogleTest's
  # sharding): most of them run one thread at a time. Eight shards per core,
  # each started when a core comes free, so that the longest tests (10 to
  # 18 s each) do not all land on one core, as they did with one shard each.
  local shards=$((8 * jobs)) status=0 i
  seq 0 $((shards - 1)) | xargs -P "$jobs" -I{} sh -c \
    'GTEST_TOTAL_SHARDS=$2 GTEST_SHARD_INDEX={} "$1/engine_tests" --gtest_brief=1 >"$1/shard{}.log" 2>&1' \
    sh "$out" "$shards" || status=1
  local ran=0 n
  for ((i = 0; i < shards; i++)); do
    if grep -q "FAILED\|ERROR\|WARNING: ThreadSanitizer" "$out/shard$i.log" || ! grep -q "PASSED" "$out/shard$i.log"; then
      cat "$out/shard$i.log"
    fi
    n=$(sed -n 's/^\[==========\] \([0-9]*\) tests\? from .* ran\..*/\1/p' "$out/shard$i.log")
    ran=$((ran + ${n:-0}))
  done
  echo "ThreadSanitizer: $ran tests in $shards shards, status $status"
  return $status
}

fuzz() {
  THERMARGIN_FUZZ_JOBS=$jobs bash fuzz/run.sh build-asan "$fuzz_seconds"
}

step "release build and every test" release
if [ "${THERMARGIN_QUICK:-0}" != 1 ]; then
  step "AddressSanitizer + UndefinedBehaviorSanitizer, every test" asan
  step "ThreadSanitizer, Monte Carlo and worst-case engines" tsan
  step "libFuzzer targets, ${fuzz_seconds} s each" fuzz
fi
echo
printf '%s\n' "${summary[@]}"
echo "test.sh: ${#summary[@]} steps passed in $((SECONDS - started)) s"
