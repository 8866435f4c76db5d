#!/usr/bin/env bash
# Runs a fontTools script (server/staff-glyphs.py, server/font-subsets.py) from the repository's root. fontTools comes
# from Debian's packages, installed when missing, so Debian's own python3 runs it.
set -euo pipefail
if ! /usr/bin/python3 -c "import fontTools, brotli" 2>/dev/null; then
  echo "Installing fontTools from Debian's packages…"
  if [ "$(id -u)" -eq 0 ]; then SUDO=""; else SUDO="sudo"; fi
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq python3-fonttools python3-brotli >/dev/null
fi
/usr/bin/python3 "$@"
