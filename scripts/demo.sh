#!/usr/bin/env bash
# The README's demo command: install what is missing, build, and run readyby
# on the fictional Larkspur Valley Medical Centre data plan.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/setup.sh build
RB=build/readyby
PLAN=pipelines/larkspur.plan.yaml

run() { echo; echo "\$ readyby $*"; "$RB" "$@" || true; }
run validate "$PLAN"
