#!/usr/bin/env bash
# The cluster (npm run cluster, tests/cluster, bench/cluster.ts) runs Debian's redis-server and nginx.
set -euo pipefail
bash "$(dirname "$0")/ensure-redis.sh"
if [ ! -x /usr/sbin/nginx ]; then
  echo "Installing nginx from Debian's packages…"
  if [ "$(id -u)" -eq 0 ]; then SUDO=""; else SUDO="sudo"; fi
  $SUDO apt-get update -qq
  # Only the program: the package's own service stays stopped (the cluster starts nginx on a free port).
  if [ ! -e /usr/sbin/policy-rc.d ]; then
    echo exit 101 | $SUDO tee /usr/sbin/policy-rc.d >/dev/null && $SUDO chmod +x /usr/sbin/policy-rc.d
    trap '$SUDO rm -f /usr/sbin/policy-rc.d' EXIT
  fi
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq nginx >/dev/null
fi
/usr/sbin/nginx -v
