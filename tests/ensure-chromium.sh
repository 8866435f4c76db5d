#!/usr/bin/env bash
# Browser tests use Debian's Chromium; a browser is never downloaded by the test tool.
set -euo pipefail
if [ ! -x /usr/bin/chromium ]; then
  echo "Installing Chromium from Debian's packages…"
  if [ "$(id -u)" -eq 0 ]; then SUDO=""; else SUDO="sudo"; fi
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq chromium >/dev/null
fi
/usr/bin/chromium --version
