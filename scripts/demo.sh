#!/usr/bin/env bash
# `npm run demo`: install what is missing, run the demo study to HTML and PDF, and say where the report is.
set -euo pipefail
cd "$(dirname "$0")/.."

bash scripts/ensure-installed.sh
pdf_flag=()
if [[ -x "${KVARBOOK_CHROMIUM:-/usr/bin/chromium}" ]]; then pdf_flag=(--pdf); fi
node bin/kvarbook.mjs run studies/caldera-bay-400kv.study.md --out build "${pdf_flag[@]}"
echo "Open build/CBX-RC-001-r4.html in a browser${pdf_flag:+, or build/CBX-RC-001-r4.pdf}."
