#!/usr/bin/env bash
# Fuzzing: install what is missing (clang and libFuzzer besides the usual
# packages), build the libFuzzer targets of tests/fuzz/ with AddressSanitizer
# and UndefinedBehaviorSanitizer into build-fuzz/, and run each target for
# SECONDS (default 30) from its seed corpus tests/fuzz/corpus/TARGET/ (and
# with the dictionary tests/fuzz/TARGET.dict of keys and tokens, if any).
# Fails on any crash, sanitizer report, leak, input slower than 10 s or use of
# more than 2 GB; the input that did it is saved as build-fuzz/findings/TARGET-*.
#   scripts/fuzz.sh [SECONDS] [TARGET...]      e.g. scripts/fuzz.sh 600 plan_fuzz
# New inputs found on the way stay in build-fuzz/corpus/TARGET/ (not in the
# repository); a finding worth keeping goes into tests/fuzz/corpus/ by hand.
set -euo pipefail
cd "$(dirname "$0")/.."

SECONDS_PER_TARGET="${1:-30}"
shift || true

# setup.sh installs what is missing (clang and libFuzzer besides the usual
# packages) and builds (the readyby binary too, instrumented).
export READYBY_EXTRA_PACKAGES="clang libfuzzer-14-dev"
scripts/setup.sh --install-only
CXX_COMPILER="$(command -v clang++-14 || command -v clang++)"
scripts/setup.sh build-fuzz -DREADYBY_FUZZ=ON -DREADYBY_TESTS=OFF -DCMAKE_CXX_COMPILER="$CXX_COMPILER"
# Our code compiles without warnings under clang too.
if grep -E "^(/.*)?(src|tests|bench)/.*warning:" build-fuzz/build.log; then
  echo "readyby: the clang build has warnings" >&2; exit 1
fi

if (($#)); then
  targets=("$@")
else
  targets=()
  for src in tests/fuzz/*_fuzz.cpp; do targets+=("$(basename "$src" .cpp)"); done
fi

export ASAN_OPTIONS=detect_leaks=1:abort_on_error=1
export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
mkdir -p build-fuzz/findings
failed=()
summary=()
for t in "${targets[@]}"; do
  name="${t%_fuzz}"
  test -x "build-fuzz/$t" || { echo "readyby: no fuzz target build-fuzz/$t" >&2; exit 2; }
  mkdir -p "build-fuzz/corpus/$name"
  echo "== $t: ${SECONDS_PER_TARGET} s =="
  log="build-fuzz/$t.log"
  dict=()
  if [ -f "tests/fuzz/$name.dict" ]; then dict=(-dict="tests/fuzz/$name.dict"); fi
  status=0
  "build-fuzz/$t" -max_total_time="$SECONDS_PER_TARGET" -timeout=10 -rss_limit_mb=2048 -max_len=8192 \
    -print_final_stats=1 -artifact_prefix="build-fuzz/findings/$t-" "${dict[@]}" \
    "build-fuzz/corpus/$name" "tests/fuzz/corpus/$name" > "$log" 2>&1 || status=$?
  execs="$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -1)"
  peak="$(sed -n 's/^stat::peak_rss_mb: *//p' "$log" | tail -1)"
  if ((status != 0)); then
    failed+=("$t")
    summary+=("$(printf '%-22s FAILED (exit %s) after %s executions' "$t" "$status" "${execs:-?}")")
    grep -E "ERROR|runtime error|invariant|SUMMARY|Test unit written" "$log" | head -20 >&2 || true
  else
    summary+=("$(printf '%-22s %10s executions, peak %s MB' "$t" "${execs:-?}" "${peak:-?}")")
  fi
done

echo "== fuzzing summary (${SECONDS_PER_TARGET} s per target) =="
printf '%s\n' "${summary[@]}"
if ((${#failed[@]})); then
  echo "readyby: fuzzing found problems in: ${failed[*]} (logs in build-fuzz/, inputs in build-fuzz/findings/)" >&2
  exit 1
fi
