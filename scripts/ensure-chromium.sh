#!/usr/bin/env bash
# The browser tests drive Debian's Chromium; nothing may download a browser of its own.
set -euo pipefail
chromium_path="${CHROMIUM_PATH:-/usr/bin/chromium}"
need_pdf=0
command -v pdftotext >/dev/null 2>&1 || need_pdf=1
if [ -x "$chromium_path" ] && [ "$need_pdf" = 0 ]; then exit 0; fi
if [ "$(id -u)" != "0" ]; then
  echo "The browser tests need Debian's packages 'chromium' and 'poppler-utils'." >&2
  echo "Install them as root: apt-get update && apt-get install -y chromium poppler-utils" >&2
  exit 1
fi
echo "Installing Debian's chromium and poppler-utils for the browser and PDF tests..."
apt-get update -qq
DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium poppler-utils >/dev/null
