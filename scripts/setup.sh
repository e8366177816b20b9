#!/usr/bin/env bash
# Shared set-up for the README's commands: install the Debian packages that are
# missing (quietly when all are present), then configure and build.
#   scripts/setup.sh [BUILD_DIR] [extra cmake args...]
#   scripts/setup.sh --install-only      (packages only; READYBY_EXTRA_PACKAGES adds more)
set -euo pipefail
cd "$(dirname "$0")/.."

PACKAGES=(g++ cmake make pkg-config tzdata libyaml-cpp-dev libboost-graph-dev libsqlite3-dev
          libre2-dev libhowardhinnant-date-dev catch2 python3 libxml2-utils
          libgraphviz-dev chromium python3-html5lib)
# A caller may ask for more (scripts/fuzz.sh: clang and libFuzzer).
read -r -a EXTRA <<< "${READYBY_EXTRA_PACKAGES:-}"
PACKAGES+=("${EXTRA[@]}")

missing=()
for p in "${PACKAGES[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$p")
  fi
done
if ((${#missing[@]})); then
  echo "readyby: installing missing packages: ${missing[*]}"
  SUDO=""
  if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${missing[@]}" >/dev/null
fi

if [ "${1:-}" = "--install-only" ]; then exit 0; fi
BUILD_DIR="${1:-build}"
shift || true
cmake -S . -B "$BUILD_DIR" -DCMAKE_BUILD_TYPE=RelWithDebInfo "$@" >/dev/null
# The full log stays in BUILD_DIR/build.log (scripts/test.sh checks it for warnings).
cmake --build "$BUILD_DIR" -j"$(nproc)" > "$BUILD_DIR/build.log" 2>&1 || true
grep -E "error|warning|Error" "$BUILD_DIR/build.log" || true
test -x "$BUILD_DIR/readyby" || { echo "readyby: build failed" >&2; exit 2; }
