#!/usr/bin/env bash
# Makes sure the Debian packages for PDF printing and checking are present: chromium, poppler-utils,
# fonts-liberation (the charts' first font; chromium does not depend on any font package), and postgresql (the
# archive's queue test).
# Idempotent and quiet when everything is installed; installs as root, otherwise says what is missing.
set -euo pipefail

missing=()
command -v chromium >/dev/null 2>&1 || [[ -x /usr/bin/chromium ]] || missing+=(chromium)
if ! command -v pdftoppm >/dev/null 2>&1 || ! command -v pdftotext >/dev/null 2>&1; then
  missing+=(poppler-utils)
fi
dpkg-query -W -f='${Status}' fonts-liberation 2>/dev/null | grep -q 'install ok installed' || missing+=(fonts-liberation)
# The archive's queue test runs against a local PostgreSQL (scripts/ensure-postgres.sh starts it).
command -v pg_lsclusters >/dev/null 2>&1 || missing+=(postgresql)

if [[ ${#missing[@]} -eq 0 ]]; then
  exit 0
fi

if [[ $(id -u) -ne 0 ]]; then
  echo "kvarbook: missing system packages: ${missing[*]} (install with: sudo apt-get install -y ${missing[*]})"
  exit 0
fi

echo "kvarbook: installing ${missing[*]} ..."
apt-get update -qq
DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}" >/dev/null
echo "kvarbook: installed ${missing[*]}"
