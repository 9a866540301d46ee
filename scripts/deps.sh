#!/usr/bin/env bash
# Installs the Debian packages thermargin needs, when any is missing.
# Sourced by run.sh and test.sh; safe to run again.
set -euo pipefail
THERMARGIN_PACKAGES=(g++ cmake ninja-build libboost-dev libboost-program-options-dev libboost-math-dev
  libeigen3-dev nlohmann-json3-dev libgtest-dev libbenchmark-dev python3-scipy python3-numpy)
if [ "${THERMARGIN_TEST_EXTRAS:-0}" = 1 ]; then
  # clang and its runtime for the libFuzzer targets, llvm for symbolised
  # sanitizer reports, ccache to reuse objects across the four builds' runs.
  THERMARGIN_PACKAGES+=(clang libclang-rt-14-dev llvm chromium ccache)
fi
missing=()
for p in "${THERMARGIN_PACKAGES[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "Installing missing packages: ${missing[*]}" >&2
  SUDO=""
  [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${missing[@]}" >/dev/null
fi
