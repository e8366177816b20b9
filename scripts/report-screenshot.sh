#!/usr/bin/env bash
# Refreshes docs/report-demo.png, the README's picture of the demo report:
# builds, then runs the browser test that renders the demo page in headless
# chromium and checks its screenshot, keeping that screenshot.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/setup.sh build
READYBY_SCREENSHOT_OUT="$PWD/docs/report-demo.png" ./build/readyby_tests "browser: a screenshot of the demo page*"
ls -l docs/report-demo.png
