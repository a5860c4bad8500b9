#!/usr/bin/env bash
# `npm test`: every test. vitest (engine and app), then a build and Playwright
# against the built server. Exits non-zero on the first failure.
set -euo pipefail
cd "$(dirname "$0")/.."

missing=()
[ -x /usr/bin/chromium ] || command -v chromium >/dev/null 2>&1 || missing+=(chromium)
command -v iverilog >/dev/null 2>&1 || missing+=(iverilog)
command -v yosys >/dev/null 2>&1 || missing+=(yosys)
if [ ${#missing[@]} -gt 0 ]; then
  if [ "$(id -u)" = 0 ]; then
    echo "[test] installing Debian packages: ${missing[*]}"
    apt-get update
    apt-get install -y "${missing[@]}"
  else
    echo "[test] missing: ${missing[*]}. Install them with: sudo apt-get install -y ${missing[*]}" >&2
    exit 1
  fi
fi

reports=.test-reports
rm -rf "$reports" && mkdir -p "$reports"

echo "[test] type check"
npx astro check --minimumSeverity error

echo "[test] vitest"
npx vitest run --reporter=default --reporter=json --outputFile.json="$reports/vitest.json"

echo "[test] build"
npx astro build

echo "[test] playwright"
PLAYWRIGHT_JSON_OUTPUT_NAME="$reports/playwright.json" npx playwright test --reporter=list,json

# One closing line for both runners: "N passed, N failed".
node -e '
const fs = require("fs");
const v = JSON.parse(fs.readFileSync(process.argv[1], "utf8"));
const p = JSON.parse(fs.readFileSync(process.argv[2], "utf8")).stats;
const passed = v.numPassedTests + p.expected;
const failed = v.numFailedTests + p.unexpected + p.flaky;
console.log(`vitest ${v.numPassedTests} and playwright ${p.expected} tests passed`);
console.log(`${passed} passed, ${failed} failed`);
' "$reports/vitest.json" "$reports/playwright.json"
