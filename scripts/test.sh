#!/usr/bin/env bash
# The README's test command: install what is missing, build, run the whole
# suite through ctest, then build and run it again under AddressSanitizer and
# UndefinedBehaviorSanitizer (separate build folder), failing on any report.
set -euo pipefail
cd "$(dirname "$0")/.."

scripts/setup.sh build
# The build must be free of warnings from our code (a fresh build, as in CI,
# compiles every file; an incremental one checks what it recompiled).
if grep -E "^(/.*)?(src|tests|bench)/.*warning:" build/build.log; then
  echo "readyby: the build has warnings" >&2; exit 1
fi
(cd build && ctest --output-on-failure -j"$(nproc)")

echo "== sanitizer run (address, undefined) =="
scripts/setup.sh build-asan -DREADYBY_SANITIZE=ON
export ASAN_OPTIONS=detect_leaks=1:abort_on_error=1:halt_on_error=1
export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
(cd build-asan && ctest --output-on-failure -j"$(nproc)")
