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
