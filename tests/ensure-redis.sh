#!/usr/bin/env bash
# Cluster tests start their own redis-server from Debian's package; installed here when missing.
set -euo pipefail
if [ ! -x /usr/bin/redis-server ]; then
  echo "Installing redis-server from Debian's packages…"
  if [ "$(id -u)" -eq 0 ]; then SUDO=""; else SUDO="sudo"; fi
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq redis-server >/dev/null
fi
/usr/bin/redis-server --version
