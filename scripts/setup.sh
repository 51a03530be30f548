#!/usr/bin/env bash
# One command from a fresh clone to a running Wavefit with demo data:
# installs the npm packages, builds the web app, migrates and seeds the SQLite database,
# then starts the server (API + web app on one port).
set -euo pipefail
cd "$(dirname "$0")/.."
if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  npm ci --no-audit --no-fund
fi
npx expo export --platform web --output-dir dist
npm run seed
# The demo reads its e-mails in the local outbox (site admins only); a real deployment leaves this unset.
export WAVEFIT_DEV_OUTBOX="${WAVEFIT_DEV_OUTBOX:-1}"
exec npm start
