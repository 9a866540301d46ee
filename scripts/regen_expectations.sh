#!/bin/sh
# Regenerates tests/expected/<scenario>.json, the verdict and key figures
# `ctest -R scenario` holds every shipped scenario to, from the program as
# built. Review the diff (git diff tests/expected/) and commit it with the
# change that moved the figures; docs/checks.md says what they are.
#
# Usage: scripts/regen_expectations.sh [BUILD_DIR]   (default: build)
set -eu
root=$(cd "$(dirname "$0")/.." && pwd)
build=${1:-$root/build}
program=$build/thermargin
[ -x "$program" ] || { echo "no program at $program: build the thermargin_cli target first" >&2; exit 1; }
for scenario in "$root"/scenarios/*.ini; do
  name=$(basename "$scenario" .ini)
  (cd "$root" && /usr/bin/python3 tests/expected/scenario_figures.py "$program" "scenarios/$name.ini" \
      --write "tests/expected/$name.json")
  echo "tests/expected/$name.json"
done
