#!/usr/bin/env bash
# `npm run demo`: install what is missing, run the demo study to HTML and PDF, and say where the report is.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/ensure-system-packages.sh
if [[ ! -d node_modules ]] || [[ package-lock.json -nt node_modules/.package-lock.json ]]; then
  npm ci --no-audit --no-fund
fi
pdf_flag=()
if [[ -x "${KVARBOOK_CHROMIUM:-/usr/bin/chromium}" ]]; then pdf_flag=(--pdf); fi
node bin/kvarbook.mjs run studies/caldera-bay-400kv.study.md --out build "${pdf_flag[@]}"
echo "Open build/CBX-RC-001-r2.html in a browser${pdf_flag:+, or build/CBX-RC-001-r2.pdf}."
