#!/usr/bin/env bash
# npm test: typecheck, build, unit + integration tests, then browser tests against the build.
set -euo pipefail
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1
echo "== typecheck"; npm run typecheck
echo "== build"; npm run build
echo "== unit and integration tests"; bash tests/ensure-redis.sh && npx vitest run
echo "== cluster tests"; bash tests/ensure-cluster-tools.sh && npx vitest run --config tests/cluster/vitest.config.ts
echo "== browser tests"; bash tests/ensure-chromium.sh && npx playwright test
