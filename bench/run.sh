#!/usr/bin/env bash
# readyby benchmarks: `cmake --build build --target bench` runs this as
#   bash bench/run.sh BUILD_DIR      (env READYBY = the readyby binary)
# Each section prints its figures; the README quotes them. Generated inputs go
# to a temporary folder and are removed afterwards.
set -uo pipefail
BUILD_DIR="${1:-build}"
READYBY="${READYBY:-$BUILD_DIR/readyby}"
ROOT="$(cd "$(dirname "$0")/.." && pwd)"
WORK="$(mktemp -d)"
trap 'rm -rf "$WORK"' EXIT
command -v /usr/bin/time >/dev/null || { apt-get install -y -qq time >/dev/null 2>&1 || true; }

# Prints "<wall seconds> s (<user CPU seconds> s CPU), <peak MiB> MiB" for a
# command (stdout to /dev/null). On a shared machine the CPU time is the
# steadier figure.
measure() {
  /usr/bin/time -f "%e %U %M" -o "$WORK/time.txt" "$@" >/dev/null 2>"$WORK/stderr.txt"
  read -r secs cpu kib < <(tail -n 1 "$WORK/time.txt")
  echo "${secs} s (${cpu} s CPU), $((kib / 1024)) MiB peak"
}

echo "== plan: validate and check on a generated 20,000-node plan =="
python3 "$ROOT/bench/gen_plan.py" --seed 1 > "$WORK/plan.yaml"
echo "validate (2,000 sources + 8,000 jobs + 10,000 features, 200 models): $(measure "$READYBY" validate "$WORK/plan.yaml")"
echo "check --days 30 --format json (output to a file): $(measure sh -c "'$READYBY' check '$WORK/plan.yaml' --from 2026-03-01 --days 30 --format json > '$WORK/check.json'")"
echo "  runs: $(grep -c '"model": ' "$WORK/check.json"), output $(( $(stat -c %s "$WORK/check.json") / 1048576 )) MiB"
rm -f "$WORK/check.json"
echo "check --days 30 --format text: $(measure "$READYBY" check "$WORK/plan.yaml" --from 2026-03-01 --days 30)"
if [ "${READYBY_BENCH_LONG:-0}" = 1 ]; then
  # A year of runs: the reports stream the runs and keep only those that are
  # not ok; every pattern's fixes are searched and re-checked.
  echo "check --days 365 (text report; target < 10 s, < 300 MiB): $(measure "$READYBY" check "$WORK/plan.yaml" --from 2026-03-01 --days 365)"
  echo "check --days 365 --format json (target < 20 s): $(measure sh -c "'$READYBY' check '$WORK/plan.yaml' --from 2026-03-01 --days 365 --format json > /dev/null")"
fi

echo "== engine: profiles vs per-run recursion (same answers required) =="
"$BUILD_DIR/freshness_bench" "$WORK/plan.yaml" 2026-03-01 30 4000

# ---- counterfactuals: what-if, margins, impact on the 20,000-node plan ----
# The plan is generated with every max_age 200 hours longer, so that about
# 30% of its runs are ok and margins and impact have something to lose (with
# the default plan every run fails). Guarded like the sections below.
advice_bench() {
  local plan="$WORK/advice-plan.yaml"
  python3 "$ROOT/bench/gen_plan.py" --seed 1 --max-age-extra-hours 200 > "$plan" || return 1
  echo "validate (loading alone): $(measure "$READYBY" validate "$plan")"
  echo "what-if --delay src7=PT30M --days 30 (target: < 0.5 s beyond loading): $(measure "$READYBY" what-if "$plan" --from 2026-03-01 --days 30 --delay src7=PT30M)"
  echo "what-if --delay job410=PT1H --days 30 (1,042 profiles rebuilt): $(measure "$READYBY" what-if "$plan" --from 2026-03-01 --days 30 --delay job410=PT1H)"
  echo "margins --days 30, every node (target < 60 s): $(measure "$READYBY" margins "$plan" --from 2026-03-01 --days 30)"
  echo "impact --days 30, every node (target < 60 s): $(measure "$READYBY" impact "$plan" --from 2026-03-01 --days 30)"
  echo "phase by phase (CPU and wall seconds):"
  "$BUILD_DIR/advice_bench" "$plan" 2026-03-01 30 src7,job410 | sed 's/^/  /'
  if [ "${READYBY_BENCH_LONG:-0}" = 1 ]; then
    # Growth with nodes (a quarter, half, all of the plan) and days.
    for scale in 4 2 1; do
      python3 "$ROOT/bench/gen_plan.py" --seed 1 --max-age-extra-hours 200 --sources $((2000 / scale)) \
        --jobs $((8000 / scale)) --features $((10000 / scale)) --daily-models $((150 / scale)) \
        --hourly-models $((50 / scale)) > "$WORK/scaled.yaml" || return 1
      for days in 7 30 90; do
        echo "$((20000 / scale)) nodes, $days days: margins $(measure "$READYBY" margins "$WORK/scaled.yaml" --from 2026-03-01 --days "$days"); impact $(measure "$READYBY" impact "$WORK/scaled.yaml" --from 2026-03-01 --days "$days")"
      done
    done
  fi
}
echo "== counterfactuals: what-if, margins, impact (20,000 nodes) =="
advice_bench || echo "counterfactual benchmark failed"

echo "== time layer =="
"$BUILD_DIR/next_occurrence_bench" 3000000

# ---- catalogue: index build, reuse and search on a generated 5,000-entry catalogue ----
# Guarded: a failure here is reported and does not stop the other sections.
catalog_bench() {
  local cat="$WORK/catalog" cache="$WORK/catalog-cache" runs=7
  python3 "$ROOT/bench/gen_catalog.py" "$cat" 5000 1 || return 1
  # Median wall time in ms of `runs` runs of a command (stdout discarded).
  median_ms() {
    local times=() t0 t1
    for _ in $(seq "$runs"); do
      t0=$(date +%s%N); "$@" >/dev/null 2>&1 || return 1; t1=$(date +%s%N)
      times+=($(( (t1 - t0) / 1000000 )))
    done
    printf '%s\n' "${times[@]}" | sort -n | sed -n "$(( (runs + 1) / 2 ))p"
  }
  local builds=() t0 t1
  for _ in 1 2 3; do
    rm -rf "$cache"
    t0=$(date +%s%N)
    READYBY_REGISTRY="$cat" READYBY_CACHE_DIR="$cache" "$READYBY" catalog search warmup >/dev/null || return 1
    t1=$(date +%s%N)
    builds+=($(( (t1 - t0) / 1000000 )))
  done
  echo "index build (validate + SQLite/FTS5, 5,000 entries): median $(printf '%s\n' "${builds[@]}" | sort -n | sed -n 2p) ms of 3"
  echo "reuse (index exists): median $(READYBY_REGISTRY="$cat" READYBY_CACHE_DIR="$cache" median_ms "$READYBY" reuse "$ROOT/pipelines/readmit-30d.proposal.yaml") ms of $runs"
  echo "catalog search (index exists): median $(READYBY_REGISTRY="$cat" READYBY_CACHE_DIR="$cache" median_ms "$READYBY" catalog search acute risk --setting ward) ms of $runs"
}
echo "== catalogue: generated 5,000 entries =="
catalog_bench || echo "catalogue benchmark failed"

# ---- history: record 1,000,000 landing rows; nightly over 365 days x 500 sources ----
# Guarded: a failure here is reported and does not stop the other sections.
history_bench() {
  local h="$WORK/history"
  mkdir -p "$h" || return 1
  python3 "$ROOT/bench/gen_history.py" "$h/plan.yaml" "$h/million.csv" --sources 500 --days 2000 --end 2026-03-01 || return 1
  echo "record 1,000,000 rows (one CSV file, one transaction, fresh database; target < 15 s, < 500 MiB): $(measure "$READYBY" record "$h/million.csv" --plan "$h/plan.yaml" --db "$h/million.db")"
  echo "record the same file again (idempotent, nothing added): $(measure "$READYBY" record "$h/million.csv" --plan "$h/plan.yaml" --db "$h/million.db")"
  echo "  database: $(( $(stat -c %s "$h/million.db") / 1048576 )) MiB"
  rm -f "$h/million.csv" "$h"/million.db*
  python3 "$ROOT/bench/gen_history.py" "$h/plan.yaml" "$h/year.csv" --sources 500 --days 365 --end 2026-03-01 || return 1
  "$READYBY" record "$h/year.csv" --plan "$h/plan.yaml" --db "$h/year.db" >/dev/null || return 1
  echo "nightly, 365 days x 500 sources recorded, --window 28 (target < 2 s, < 500 MiB): $(measure "$READYBY" nightly "$h/plan.yaml" --db "$h/year.db" --date 2026-03-01)"
  echo "nightly --window 365 --format json: $(measure "$READYBY" nightly "$h/plan.yaml" --db "$h/year.db" --date 2026-03-01 --window 365 --format json)"
}
echo "== history: record and nightly =="
history_bench || echo "history benchmark failed"

# ---- report page: the demo page, and the 20,000-node plan over 30 days ----
# Guarded: a failure here is reported and does not stop the other sections.
report_bench() {
  local r="$WORK/report" logs="$ROOT/pipelines/landing-logs"
  # Wall time, CPU time (user + system: what the page costs on a busy machine) and peak memory.
  measure_cpu() {
    /usr/bin/time -f "%e %U %S %M" -o "$WORK/time.txt" "$@" >/dev/null 2>"$WORK/stderr.txt"
    read -r secs user sys kib < <(tail -n 1 "$WORK/time.txt")
    echo "${secs} s wall, $(awk -v u="$user" -v s="$sys" 'BEGIN{print u + s}') s CPU, $((kib / 1024)) MiB peak"
  }
  mkdir -p "$r" || return 1
  "$READYBY" record "$logs/feeds-2026-01.csv" "$logs/feeds-2026-02.csv" "$logs/feeds-2026-03.csv" \
      --plan "$ROOT/pipelines/larkspur.plan.yaml" --db "$r/demo.db" >/dev/null || return 1
  "$READYBY" record "$logs/integration-server.jsonl" --plan "$ROOT/pipelines/larkspur.plan.yaml" --db "$r/demo.db" \
      --map node=task,landed_at=load_end_ts,data_through=watermark,status=state >/dev/null || return 1
  # Build the catalogue index once, so that the measurement is of the page.
  READYBY_CACHE_DIR="$r/cache" "$READYBY" catalog search warmup >/dev/null || return 1
  echo "demo report (28 days, history, proposal; target < 1 s, < 1 MB): $(READYBY_CACHE_DIR="$r/cache" measure_cpu \
      "$READYBY" report "$ROOT/pipelines/larkspur.plan.yaml" --from 2026-02-22 --days 28 --db "$r/demo.db" \
      --date 2026-03-03 --proposal "$ROOT/pipelines/readmit-30d.proposal.yaml" --out "$r/demo.html")"
  echo "  page: $(( $(stat -c %s "$r/demo.html") / 1024 )) KiB"
  echo "report of the 20,000-node plan, 30 days (target < 10 s, < 20 MB page): $(measure_cpu \
      "$READYBY" report "$WORK/plan.yaml" --from 2026-03-01 --days 30 --out "$r/big.html")"
  echo "  page: $(( $(stat -c %s "$r/big.html") / 1024 )) KiB"
}
echo "== report page =="
report_bench || echo "report benchmark failed"
# ---- forecast: the 20,000-node plan with 500 monitored sources and 365 days of history ----
# Guarded: a failure here is reported and does not stop the other sections.
forecast_section() {
  local f="$WORK/forecast"
  mkdir -p "$f" || return 1
  python3 "$ROOT/bench/gen_history.py" --for-plan "$WORK/plan.yaml" "$f/landings.csv" --monitor 500 --days 365 \
      --end 2026-02-28 || return 1
  "$READYBY" record "$f/landings.csv" --plan "$WORK/plan.yaml" --db "$f/history.db" >/dev/null || return 1
  echo "  history: $(( $(wc -l < "$f/landings.csv") - 1 )) rows for 500 sources over 365 days"
  rm -f "$f/landings.csv"
  echo "forecast --days 30 --draws 2000 --format json (target < 30 s, < 1 GiB on 2 cores): $(measure "$READYBY" forecast "$WORK/plan.yaml" --db "$f/history.db" --from 2026-03-01 --days 30 --draws 2000 --format json)"
  echo "  where the time goes (one thread):"
  "$BUILD_DIR/forecast_bench" "$WORK/plan.yaml" "$f/history.db" 2026-03-01 30 10 | sed 's/^/    /'
  if [ "${READYBY_BENCH_LONG:-0}" = 1 ]; then
    for days in 7 14; do
      echo "  --days $days, one thread:"
      "$BUILD_DIR/forecast_bench" "$WORK/plan.yaml" "$f/history.db" 2026-03-01 "$days" 10 | sed 's/^/    /'
    done
    echo "forecast --draws 8000: $(measure "$READYBY" forecast "$WORK/plan.yaml" --db "$f/history.db" --from 2026-03-01 --days 30 --draws 8000 --format json)"
  fi
}
echo "== forecast =="
forecast_section || echo "forecast benchmark failed"
