#!/usr/bin/env bash
# `npm test`: every test. vitest (engine and app), then a build and Playwright
# against the built server. Exits non-zero on the first failure.
set -euo pipefail
cd "$(dirname "$0")/.."

missing=()
[ -x /usr/bin/chromium ] || command -v chromium >/dev/null 2>&1 || missing+=(chromium)
command -v iverilog >/dev/null 2>&1 || missing+=(iverilog)
if [ ${#missing[@]} -gt 0 ]; then
  if [ "$(id -u)" = 0 ]; then
    echo "[test] installing Debian packages: chromium iverilog"
    apt-get update
    apt-get install -y chromium iverilog
  else
    echo "[test] missing: ${missing[*]}. Install them with: sudo apt-get install -y chromium iverilog" >&2
    exit 1
  fi
fi

echo "[test] vitest"
npx vitest run

echo "[test] build"
npx astro build

echo "[test] playwright"
npx playwright test
