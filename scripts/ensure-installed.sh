#!/usr/bin/env bash
# Makes a fresh clone ready to run: the Debian packages for PDF printing, then the npm packages when they are
# missing or older than package-lock.json, then the bundle in dist/ when a source changed since it was built. Quiet when
# everything is in place; used by `npm test` and `npm run demo`.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/ensure-system-packages.sh
if [[ ! -d node_modules ]] || [[ ! -f node_modules/.package-lock.json ]] || [[ package-lock.json -nt node_modules/.package-lock.json ]]; then
  echo "kvarbook: installing npm packages (npm ci) ..."
  npm ci --no-audit --no-fund
fi
npx tsx scripts/build.ts --if-stale
