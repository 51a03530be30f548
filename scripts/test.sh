#!/usr/bin/env bash
# Runs every Wavefit test on a fresh machine or a warm one:
#  1. installs what the tests need from Debian (chromium, networkx, scipy, poppler, redis-server,
#     postgresql) when missing; the tests start private Redis and PostgreSQL servers on loopback
#     ports and stop them (the packages' own services are not used),
#  2. installs the npm packages when missing or stale,
#  3. builds the web app (dist/) that the browser tests drive,
#  4. type-checks, then runs all vitest suites (engine, API, browser),
#  5. ends with one plain line "N passed, N failed" counted over all suites.
set -uo pipefail
cd "$(dirname "$0")/.."
mkdir -p tmp

need=()
[ -x /usr/bin/chromium ] || need+=(chromium)
/usr/bin/python3 -c 'import networkx' 2>/dev/null || need+=(python3-networkx)
/usr/bin/python3 -c 'import scipy, numpy' 2>/dev/null || need+=(python3-scipy python3-numpy)
command -v pdftoppm >/dev/null 2>&1 || need+=(poppler-utils)
[ -x /usr/bin/redis-server ] || need+=(redis-server)
ls /usr/lib/postgresql/*/bin/pg_ctl >/dev/null 2>&1 || need+=(postgresql)
if [ ${#need[@]} -gt 0 ]; then
  echo "test: installing Debian packages: ${need[*]}"
  SUDO=""; [ "$(id -u)" = 0 ] || SUDO="sudo"
  $SUDO apt-get update -qq && DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${need[@]}" >/dev/null \
    || { echo "test: could not install ${need[*]}"; echo "0 passed, 1 failed"; exit 1; }
fi

if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "test: installing npm packages"
  npm ci --no-audit --no-fund || { echo "0 passed, 1 failed"; exit 1; }
fi

if [ "${WAVEFIT_SKIP_EXPORT:-0}" != 1 ]; then
  echo "test: building the web app into dist/"
  npx expo export --platform web --output-dir dist >tmp/export.log 2>&1 \
    || { tail -40 tmp/export.log; echo "test: web export failed"; echo "0 passed, 1 failed"; exit 1; }
fi

echo "test: type-checking"
typecheck=0
npx tsc --noEmit -p tsconfig.json || typecheck=1

rm -f tmp/vitest-report.json
npx vitest run --reporter=default --reporter=json --outputFile.json=tmp/vitest-report.json "$@"
status=$?

node -e '
  const fs = require("fs");
  let passed = 0, failed = 0;
  try {
    const r = JSON.parse(fs.readFileSync("tmp/vitest-report.json", "utf8"));
    passed = r.numPassedTests; failed = r.numFailedTests + (r.numRuntimeErrorTestSuites || 0);
    if (r.numFailedTestSuites && !r.numFailedTests) failed += r.numFailedTestSuites;
  } catch (e) { failed = 1; console.error("test: no vitest report:", e.message); }
  failed += Number(process.argv[1]);
  if (Number(process.argv[1])) console.log("test: the type check failed (counted as one failure)");
  console.log(`${passed} passed, ${failed} failed`);
' "$typecheck"

[ "$status" = 0 ] && [ "$typecheck" = 0 ]
