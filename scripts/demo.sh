#!/usr/bin/env bash
# The README's demo command: install what is missing, build, and run readyby
# on the fictional Larkspur Valley Medical Centre data plan.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/setup.sh build
RB=build/readyby
PLAN=pipelines/larkspur.plan.yaml

run() { echo; echo "\$ readyby $*"; "$RB" "$@" || echo "(exit status $?)"; }
run validate "$PLAN"
# Four weeks around the US daylight-saving change of 2026-03-08.
run check "$PLAN" --from 2026-02-22 --days 28
run check "$PLAN" --run discharge_delay@2026-03-08T06:30
# Counterfactuals: what a later feed or a later job start would change, how
# much later each feed could land, and what each one's loss would take down.
run what-if "$PLAN" --from 2026-02-22 --days 28 --delay lab_results=PT1H10M
run what-if "$PLAN" --from 2026-02-22 --days 28 --schedule "hie_merge=45 3 * * *"
run margins "$PLAN" --from 2026-02-22 --days 28
run impact "$PLAN" --from 2026-02-22 --days 28
# Nightly monitoring: record 60 days of fictional landings (twice: the second
# time adds nothing), then check one day against what actually landed.
DB_DIR="$(mktemp -d)"
trap 'rm -rf "$DB_DIR"' EXIT
DB="$DB_DIR/history.db"
run record pipelines/landing-logs/feeds-2026-01.csv pipelines/landing-logs/feeds-2026-02.csv \
    pipelines/landing-logs/feeds-2026-03.csv --plan "$PLAN" --db "$DB"
run record pipelines/landing-logs/integration-server.jsonl --plan "$PLAN" --db "$DB" \
    --map node=task,landed_at=load_end_ts,data_through=watermark,status=state
run record pipelines/landing-logs/feeds-2026-03.csv --plan "$PLAN" --db "$DB"
run nightly "$PLAN" --db "$DB" --date 2026-03-03
# Forecast March from that history (seeded: the same numbers every time), and
# backtest the forecast against what happened from 2026-02-26 on.
run forecast "$PLAN" --db "$DB" --from 2026-03-04 --days 28
run forecast "$PLAN" --db "$DB" --backtest-from 2026-02-26
# The screening report for two fictional proposals, with the demo hospital's
# own registry of in-house models (pipelines/registry/) layered over the
# shipped catalogue of published scores.
export READYBY_CACHE_DIR="${READYBY_CACHE_DIR:-$PWD/build/cache}"
run intake pipelines/readmit-30d.proposal.yaml --from 2026-02-22 --days 28 --db "$DB" --registry pipelines/registry
run intake pipelines/day-case-return-to-theatre.proposal.yaml --from 2026-02-22 --days 28 --registry pipelines/registry --format markdown
# The report page: calendars, chain timelines, lineage, history and the screening, in one HTML file.
REPORT="$PWD/build/larkspur-report.html"
run report "$PLAN" --from 2026-02-22 --days 28 --db "$DB" --date 2026-03-03 \
    --proposal pipelines/readmit-30d.proposal.yaml --registry pipelines/registry --out "$REPORT"
echo "Open file://$REPORT in a browser to see the report page."
